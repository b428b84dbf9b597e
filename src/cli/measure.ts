/**
 * `measure FILE [--format json|csv] [--channel N] [--gate START_MS,LENGTH_MS] [--smooth 1/N|var]
 * [--min-phase]`: a measurement file (text columns or a WAV impulse response) as the importer
 * reads it, optionally as minimum phase and smoothed. Registered in run.ts's COMMANDS.
 */
import { numText } from '../export/list';
import { MeasurementFileError, measurementName } from '../measure/errors';
import { importMeasurement, measurementKind } from '../measure/import';
import { withMinimumPhase } from '../measure/minphase';
import { parseSmoothing, smoothMeasurement, type Smoothing } from '../measure/smooth';
import { parseMeasurementText } from '../measure/text';
import type { MeasuredResponse } from '../measure/types';
import type { Gate } from '../measure/gate';
import { optChoice, optString, parseArgs, UsageError, type ParsedArgs } from './args';
import { InputError, type CliIo, type CliResult } from './io';

/** `--channel N` (from 1) as a 0-based channel; shared with `attach`. */
export function channelOption(args: ParsedArgs): number | undefined {
  const v = optString(args, 'channel');
  if (v === undefined) return undefined;
  const n = Number(v);
  if (!/^\d+$/.test(v) || !(n >= 1)) throw new UsageError(`--channel must be a whole number from 1 (the first channel), not "${v}"`);
  return n - 1;
}

/** `--gate START_MS,LENGTH_MS`; shared with `attach`. */
export function gateOption(args: ParsedArgs): Gate | undefined {
  const v = optString(args, 'gate');
  if (v === undefined) return undefined;
  const parts = v.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.length !== 2 || parts.some((s) => s === '') || !nums.every(Number.isFinite)) {
    throw new UsageError(`--gate must be START_MS,LENGTH_MS (ms before the peak, whole length), not "${v}"`);
  }
  return { startMs: nums[0], lengthMs: nums[1] };
}

function smoothingOption(args: ParsedArgs): Smoothing | undefined {
  const v = optString(args, 'smooth');
  if (v === undefined) return undefined;
  const s = parseSmoothing(v);
  if (!s) throw new UsageError(`--smooth must be 1/N (N > 0, e.g. 1/6), var or none, not "${v}"`);
  return s;
}

/** The JSON of a measurement: the fields of MeasuredResponse. */
export function measurementJsonText(m: MeasuredResponse): string {
  return (
    JSON.stringify({
      name: m.name,
      frequencyHz: m.frequencyHz,
      magnitudeDb: m.magnitudeDb,
      phaseDeg: m.phaseDeg,
      phaseEstimated: m.phaseEstimated,
      delayMs: m.delayMs,
      notes: m.notes,
    }) + '\n'
  );
}

/** CSV columns frequencyHz,magnitudeDb,phaseDeg (phase empty when there is none). */
export function measurementCsvText(m: MeasuredResponse): string {
  const rows = ['frequencyHz,magnitudeDb,phaseDeg'];
  for (let i = 0; i < m.frequencyHz.length; i++) {
    rows.push(`${numText(m.frequencyHz[i])},${numText(m.magnitudeDb[i])},${m.phaseDeg === null ? '' : numText(m.phaseDeg[i])}`);
  }
  return rows.join('\n') + '\n';
}

export function cmdMeasure(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['format', 'channel', 'gate', 'smooth'], ['min-phase']);
  const format = optChoice(args, 'format', ['json', 'csv'] as const, 'json');
  const channel = channelOption(args);
  const gate = gateOption(args);
  const smoothing = smoothingOption(args);
  if (args.positionals.length !== 1) throw new UsageError('measure needs one measurement FILE (text columns or a WAV impulse response)');
  const path = args.positionals[0];
  let m: MeasuredResponse;
  try {
    if (io.readBytes) {
      const bytes = io.readBytes(path);
      if (measurementKind(bytes) === 'text' && (channel !== undefined || gate !== undefined)) {
        throw new UsageError('--channel and --gate apply to WAV impulse responses only');
      }
      m = importMeasurement(path, bytes, { channel, gate });
    } else {
      if (channel !== undefined || gate !== undefined) throw new UsageError('--channel and --gate apply to WAV impulse responses only');
      m = parseMeasurementText(io.readText(path), measurementName(path));
    }
  } catch (e) {
    if (e instanceof MeasurementFileError) throw new InputError(`${path}: ${e.message}`);
    if (e instanceof UsageError) throw e;
    throw new InputError(`${path}: cannot read (${(e as Error).message})`);
  }
  if (args.options.has('min-phase')) m = withMinimumPhase(m);
  if (smoothing) m = smoothMeasurement(m, smoothing);
  return { code: 0, stdout: format === 'csv' ? measurementCsvText(m) : measurementJsonText(m), stderr: '' };
}
