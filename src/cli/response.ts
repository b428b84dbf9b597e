/** The `response` command's frequency list and columns, shared with the quantized branch in export.ts. */
import type { DesignedOutput } from '../design/chain';
import { numText } from '../export/list';
import { designedResponse, logFrequencies, MAGNITUDE_FLOOR_DB, type Response } from '../response/chain-response';
import { HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION } from '../analysis/thresholds';
import { optNumber, optString, UsageError, type ParsedArgs } from './args';
import type { CliResult } from './io';

/** The frequency list of `response`: --freqs, or --points/--from/--to (defaults 512, 20 Hz, 20 kHz). */
export function responseFrequencies(args: ParsedArgs, sampleRate: number): Float64Array {
  const nyquist = sampleRate / 2;
  const list = optString(args, 'freqs');
  if (list !== undefined) {
    if (args.options.has('points') || args.options.has('from') || args.options.has('to')) {
      throw new UsageError('--freqs cannot be combined with --points, --from or --to');
    }
    const parts = list.split(',').map((s) => s.trim());
    const freqs = parts.map((s) => {
      const f = Number(s);
      if (s === '' || !Number.isFinite(f)) throw new UsageError(`--freqs: "${s}" is not a number`);
      if (f < 0 || f > nyquist) throw new UsageError(`--freqs: ${s} Hz is outside 0 .. ${nyquist} Hz (Nyquist at ${sampleRate} Hz)`);
      return f;
    });
    return Float64Array.from(freqs);
  }
  const points = optNumber(args, 'points') ?? 512;
  if (!Number.isInteger(points) || points < 1 || points > 1_000_000) throw new UsageError('--points must be a whole number from 1 to 1000000');
  const from = optNumber(args, 'from') ?? 20;
  // "Clipped below Nyquist": the default top is 20 kHz or 99.9% of Nyquist, whichever is lower.
  const to = optNumber(args, 'to') ?? Math.min(HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION * nyquist);
  if (!(from > 0)) throw new UsageError('--from must be > 0 Hz');
  if (to > nyquist) throw new UsageError(`--to must be at most Nyquist (${nyquist} Hz)`);
  if (!(to >= from)) throw new UsageError('--to must not be below --from');
  if (points > 1 && to === from) throw new UsageError('--from and --to must differ when --points > 1');
  return logFrequencies(points, from, to);
}

const RAD_TO_DEG = 180 / Math.PI;

/** Degrees wrapped to (-180, 180] from radians in (-pi, pi]. */
export function toDegreesWrapped(rad: number): number {
  const d = rad * RAD_TO_DEG;
  return d <= -180 ? d + 360 : d > 180 ? d - 360 : d;
}

export interface ResponseColumns {
  magnitudeDb: (number | null)[];
  phaseDeg: (number | null)[];
  groupDelayMs: (number | null)[];
}

export function responseColumns(r: Response): ResponseColumns {
  const n = r.magnitudeDb.length;
  const out: ResponseColumns = { magnitudeDb: [], phaseDeg: [], groupDelayMs: [] };
  for (let i = 0; i < n; i++) {
    const m = r.magnitudeDb[i];
    const floor = !(m >= MAGNITUDE_FLOOR_DB);
    out.magnitudeDb.push(Number.isFinite(m) ? m : null);
    out.phaseDeg.push(Number.isFinite(m) ? toDegreesWrapped(r.phaseRad[i]) : null);
    out.groupDelayMs.push(floor || !Number.isFinite(r.groupDelayMs[i]) ? null : r.groupDelayMs[i]);
  }
  return out;
}

/** More of a `response`: JSON members after the electrical ones, CSV columns after theirs. */
export interface ResponseAddition {
  json: Record<string, unknown>;
  csv: { header: string[]; row: (i: number) => string[] };
}

export function responseCsv(freqs: Float64Array, named: { id: string; cols: ResponseColumns }[], addition?: ResponseAddition): string {
  const header = ['frequencyHz'];
  for (const n of named) header.push(`${n.id}.magnitudeDb`, `${n.id}.phaseDeg`, `${n.id}.groupDelayMs`);
  if (addition) header.push(...addition.csv.header);
  const rows = [header.join(',')];
  const cell = (x: number | null) => (x === null ? '' : numText(x));
  for (let i = 0; i < freqs.length; i++) {
    const row = [numText(freqs[i])];
    for (const n of named) row.push(cell(n.cols.magnitudeDb[i]), cell(n.cols.phaseDeg[i]), cell(n.cols.groupDelayMs[i]));
    if (addition) row.push(...addition.csv.row(i));
    rows.push(row.join(','));
  }
  return rows.join('\n') + '\n';
}

/**
 * The `response` output of designed outputs: each unmuted output and the sum, as CSV or JSON.
 * `extra` fields follow `sampleRate` in the JSON (the quantized branch names its format there).
 */
export function responseResult(
  designed: readonly DesignedOutput[],
  sampleRate: number,
  freqs: Float64Array,
  format: 'json' | 'csv',
  extra: Record<string, unknown> = {},
  stderr = '',
  addition?: ResponseAddition,
): CliResult {
  const r = designedResponse(designed, freqs, sampleRate);
  const outputs = r.outputs.filter((o) => !o.mute).map((o) => ({ id: o.id, cols: responseColumns(o.response) }));
  const sum = responseColumns(r.sum);
  if (format === 'csv') {
    return { code: 0, stdout: responseCsv(freqs, [...outputs, { id: 'sum', cols: sum }], addition), stderr };
  }
  const json = {
    sampleRate,
    ...extra,
    frequencies: Array.from(freqs),
    outputs: outputs.map((o) => ({ id: o.id, ...o.cols })),
    sum,
    ...addition?.json,
  };
  return { code: 0, stdout: JSON.stringify(json) + '\n', stderr };
}

