/**
 * The command line, as pure code: arguments and a file reader in, stdout, stderr and an exit code
 * out (0 success, 1 an invalid plan or input file, 2 a usage error). `src/node/cli.ts` is the Node
 * adapter that runs it on process.argv.
 */
import { analyzePlan } from '../analysis/check';
import { diagnosticMessage, targetPath } from '../diagnostics';
import { HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION } from '../analysis/thresholds';
import { headroomLine } from '../analysis/headroom-text';
import { designPlan, type DesignedOutput } from '../design/chain';
import { readPlanText } from '../plan/read';
import type { Plan } from '../plan/types';
import { designedResponse, logFrequencies, MAGNITUDE_FLOOR_DB, type Response } from '../response/chain-response';
import { optChoice, optNumber, optString, parseArgs, UsageError, type ParsedArgs } from './args';
import { coeffsCsvText, coeffsCText, coeffsJsonText, coeffsListing, coeffsText } from './coeffs';
import { numText } from '../export/list';
import { printable } from '../export/format';
import { cmdExport, cmdImport, cmdProfiles, quantizedResponseText } from './export';
import { cmdMeasure } from './measure';
import { acousticCsvColumns, acousticJson, acousticSection, smoothingOption } from './acoustic';
import { cmdAttach } from './attach';

export interface CliIo {
  /** Reads a text file; throws an Error with a readable message when it cannot. */
  readText(path: string): string;
  /** Reads a file's bytes (measurement files may be WAV); throws like readText. */
  readBytes?(path: string): Uint8Array;
}

export interface CliResult {
  code: 0 | 1 | 2;
  stdout: string;
  stderr: string;
}

export const USAGE = `usage: biquadrant <command> [options]

commands:
  coeffs PLAN [--format json|csv|text|c] [--output ID]
      the sections of every output (or one) in the file convention
      H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2)
  response PLAN [--freqs F1,F2,...] [--points N --from F --to F] [--format json|csv] [--quantize Qm.n]
           [--acoustic [--smooth 1/N|var]]
      magnitude (dB), phase (degrees) and group delay (ms) of each unmuted output and of their sum
      (default: 512 log-spaced points from 20 Hz to 20 kHz, clipped below Nyquist);
      --quantize Qm.n (e.g. Q5.23): of the sections quantized to Qm.n, from the exact integers;
      --acoustic: also the predicted acoustic response (driver measurement x chain x offset) of
      each unmuted output with a driver measurement, and their predicted sum; null outside a
      measurement's range; --smooth: the driver measurements smoothed first
  check PLAN [--format text|json]
      validates the plan and prints the warnings (headroom, stability, Nyquist, missing high-pass)
  export PLAN [--profile NAME|FILE] [--format text|csv|json|c] [--output ID] [--arrange as-designed|suggested]
      the coefficient list a DSP board wants, per its board profile (default: the plan's own,
      else "float"); refused when an output needs more sections than the board runs.
      Saturated coefficients and sections unstable after quantization are flagged on stderr.
      --arrange suggested: sections reordered and scaled so no internal node peaks above 0 dBFS
  profiles [--format text|json]
      the built-in board profiles
  import FILE --profile NAME|FILE [--format auto|text|csv|json|c] [--name NAME] [--sample-rate HZ]
      a coefficient list (any export format) as a plan of raw bands, written to stdout
  measure FILE [--format json|csv] [--channel N] [--gate START_MS,LENGTH_MS] [--smooth 1/N|var] [--min-phase]
      a measurement (text columns of Hz, dB, optional degrees; or a WAV impulse response) as
      imported: JSON {name, frequencyHz, magnitudeDb, phaseDeg, phaseEstimated, delayMs, notes}
      or CSV frequencyHz,magnitudeDb,phaseDeg; WAV: --channel from 1 (default 1), --gate ms
      before the peak and length (default 2,500); --min-phase: phase estimated from magnitude
  attach PLAN FILE (--output ID | --system) [--offset-mm N] [--name NAME]
      the plan with the measurement in FILE (text columns, or a WAV impulse response: first
      channel, default gate) added as the output's driver measurement or as a system
      measurement, written to stdout

exit codes: 0 success, 1 invalid plan or input file, 2 usage error`;

export class InputError extends Error {}

/** Registered commands; later features add theirs here. */
export const COMMANDS: Record<string, (argv: string[], io: CliIo) => CliResult> = {
  coeffs: cmdCoeffs,
  response: cmdResponse,
  check: cmdCheck,
  export: cmdExport,
  profiles: (argv) => cmdProfiles(argv),
  import: cmdImport,
  measure: cmdMeasure,
  attach: cmdAttach,
};

export function runCli(argv: readonly string[], io: CliIo): CliResult {
  const [command, ...rest] = argv;
  try {
    if (command === undefined || command === '--help' || command === '-h' || command === 'help') {
      return { code: command === undefined ? 2 : 0, stdout: command === undefined ? '' : USAGE + '\n', stderr: command === undefined ? USAGE + '\n' : '' };
    }
    const fn = COMMANDS[command];
    if (!fn) throw new UsageError(`unknown command "${command}"`);
    return fn(rest, io);
  } catch (e) {
    if (e instanceof UsageError) return { code: 2, stdout: '', stderr: `error: ${e.message}\n\n${USAGE}\n` };
    if (e instanceof InputError) return { code: 1, stdout: '', stderr: `error: ${e.message}\n` };
    throw e;
  }
}

/** Reads and validates the plan named by the single positional argument. */
export function loadPlan(args: ParsedArgs, io: CliIo): { plan: Plan; path: string } {
  if (args.positionals.length === 0) throw new UsageError('a PLAN file is required');
  if (args.positionals.length > 1) throw new UsageError(`one PLAN file only (got ${args.positionals.join(' ')})`);
  const path = args.positionals[0];
  let text: string;
  try {
    text = io.readText(path);
  } catch (e) {
    throw new InputError(`${printable(path)}: cannot read (${printable((e as Error).message)})`);
  }
  const r = readPlanText(text);
  // One line whatever the file name holds.
  if (!r.ok) throw new InputError(`${printable(path)}: ${r.error.message}`);
  return { plan: r.plan, path };
}

export function checkOutputId(plan: Plan, id: string | undefined): void {
  if (id !== undefined && !plan.outputs.some((o) => o.id === id)) {
    throw new UsageError(`--output ${id}: no such output (the plan has ${plan.outputs.map((o) => o.id).join(', ')})`);
  }
}

function cmdCoeffs(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['format', 'output']);
  const format = optChoice(args, 'format', ['json', 'csv', 'text', 'c'] as const, 'json');
  const outputId = optString(args, 'output');
  const { plan } = loadPlan(args, io);
  checkOutputId(plan, outputId);
  const l = coeffsListing(plan, outputId);
  const text =
    format === 'json' ? coeffsJsonText(l) : format === 'csv' ? coeffsCsvText(l) : format === 'text' ? coeffsText(l, plan.name) : coeffsCText(l, plan.name);
  return { code: 0, stdout: text, stderr: '' };
}

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

function cmdResponse(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['freqs', 'points', 'from', 'to', 'format', 'quantize', 'smooth'], ['acoustic']);
  const format = optChoice(args, 'format', ['json', 'csv'] as const, 'json');
  const acoustic = args.options.get('acoustic') === true;
  if (!acoustic && args.options.has('smooth')) throw new UsageError('--smooth applies to the acoustic prediction: add --acoustic');
  const smoothing = smoothingOption(optString(args, 'smooth'));
  const { plan } = loadPlan(args, io);
  const quantize = optString(args, 'quantize');
  if (quantize !== undefined && acoustic) throw new UsageError('--acoustic cannot be combined with --quantize');
  if (quantize !== undefined) return quantizedResponseText(plan, args, quantize, format);
  const freqs = responseFrequencies(args, plan.sampleRate);
  if (!acoustic) return responseResult(designPlan(plan), plan.sampleRate, freqs, format);
  const a = acousticSection(plan, freqs, smoothing);
  const addition = { json: { acoustic: acousticJson(plan, a) }, csv: acousticCsvColumns(a) };
  return responseResult(designPlan(plan), plan.sampleRate, freqs, format, {}, a.notes.map((l) => l + '\n').join(''), addition);
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

function cmdCheck(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['format']);
  const format = optChoice(args, 'format', ['text', 'json'] as const, 'text');
  const { plan, path } = loadPlan(args, io);
  const a = analyzePlan(plan);
  if (format === 'json') {
    const warnings = a.warnings.map((w) => ({ severity: w.severity, code: w.code, where: targetPath(w.target), message: diagnosticMessage(w) }));
    return { code: 0, stdout: JSON.stringify({ valid: true, outputs: a.outputs, warnings }, null, 2) + '\n', stderr: '' };
  }
  const lines = [`${path}: valid plan "${plan.name}", ${plan.outputs.length} output(s) at ${plan.sampleRate} Hz`];
  for (const o of a.outputs) {
    lines.push(
      `  ${o.id}: ${headroomLine(o)}; largest pole radius ${Number.isFinite(o.largestPoleRadius) ? o.largestPoleRadius.toFixed(6) : 'not computable'}${o.stable ? '' : ' (UNSTABLE)'}`,
    );
  }
  if (a.warnings.length === 0) lines.push('no warnings');
  for (const w of a.warnings) lines.push(`${w.severity}: ${diagnosticMessage(w)}`);
  lines.push('Caution: high listening levels damage hearing and large boosts can destroy drivers; follow local regulations and qualified professionals.');
  return { code: 0, stdout: lines.join('\n') + '\n', stderr: '' };
}
