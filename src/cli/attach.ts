/**
 * `attach PLAN FILE (--output ID | --system) [--offset-mm N] [--name NAME]`: the plan with the
 * measurement in FILE (text columns, or a WAV impulse response with the importer's default gate
 * and first channel) added, written to stdout (the plan file itself is never changed). The
 * measurement becomes the output's driver measurement, or one of the plan's system measurements.
 * The result is read back through the plan reader before it is written, so stdout is always a
 * valid plan; anything the contract refuses is an input error naming the field.
 */
import { measurementName, MeasurementFileError } from '../measure/errors';
import { importMeasurement, measurementKind as bytesKind } from '../measure/import';
import { parseMeasurementText } from '../measure/text';
import type { MeasuredResponse } from '../measure/types';
import { readPlanText, readPlanValue } from '../plan/read';
import { LIMITS, PLAN_VERSION, type Measurement, type MeasurementKind, type Plan } from '../plan/types';
import { planToJson, writePlanText } from '../plan/write';
import { optNumber, optString, parseArgs, UsageError } from './args';
import { InputError, type CliIo, type CliResult } from './io';

/** Where a new measurement goes. */
export type AttachTarget = { output: string; offsetMm?: number } | { system: true };

/**
 * A measurement id for `name`, unique in the plan: lower case, runs of other characters turned
 * into "-", at most 32 characters, "-2", "-3", ... appended on a clash.
 */
export function measurementId(plan: Plan, name: string): string {
  const taken = new Set((plan.measurements ?? []).map((m) => m.id));
  const base =
    name
      .toLowerCase()
      .replace(/[^a-z0-9_-]+/g, '-')
      .replace(/^-+|-+$/g, '')
      .slice(0, 32) || 'measurement';
  if (!taken.has(base)) return base;
  for (let k = 2; ; k++) {
    const suffix = `-${k}`;
    const id = base.slice(0, 32 - suffix.length) + suffix;
    if (!taken.has(id)) return id;
  }
}

/**
 * Notes as the plan keeps them: at most LIMITS.measurementNotesMax lines of at most
 * LIMITS.measurementNoteMaxLength characters, control characters (tabs aside) shown as spaces.
 * Notes are a file's header lines, not data, so trimming them loses nothing measured.
 */
function planNotes(notes: readonly string[]): string[] {
  return notes
    .slice(0, LIMITS.measurementNotesMax)
    .map((n) => n.replace(/[\u0000-\u0008\u000a-\u001f\u007f-\u009f\u2028\u2029]/g, ' ').slice(0, LIMITS.measurementNoteMaxLength));
}

/**
 * The plan with `m` added as a measurement (a new id from its name) and referenced as `target`
 * says. Pure: the given plan is not changed. Throws `InputError` when the result is not a valid
 * plan (the reader's message, with its field path) or the output does not exist.
 */
export function attachMeasurement(plan: Plan, m: MeasuredResponse, source: { fileName: string; kind: MeasurementKind }, target: AttachTarget): Plan {
  const measurement: Measurement = {
    id: measurementId(plan, m.name),
    name: m.name,
    source: { fileName: source.fileName.split(/[\\/]/).pop() ?? '', kind: source.kind },
    frequencyHz: m.frequencyHz.slice(),
    magnitudeDb: m.magnitudeDb.slice(),
    phaseDeg: m.phaseDeg === null ? null : m.phaseDeg.slice(),
    phaseEstimated: m.phaseEstimated,
    delayMs: m.delayMs,
    notes: planNotes(m.notes),
  };
  // A fresh plain copy in the file's shape: the caller's plan is not touched.
  const next = planToJson({ ...plan, version: PLAN_VERSION, measurements: [...(plan.measurements ?? []), measurement] });
  if ('system' in target) {
    next.systemMeasurementIds = [...(plan.systemMeasurementIds ?? []), measurement.id];
  } else {
    const outputs = next.outputs as Record<string, unknown>[];
    const out = outputs.find((o) => o.id === target.output);
    if (!out) throw new InputError(`no output "${target.output}" (the plan has ${plan.outputs.map((o) => o.id).join(', ')})`);
    out.driverMeasurementId = measurement.id;
    if (target.offsetMm !== undefined) out.acousticOffset = { value: target.offsetMm, unit: 'mm' };
  }
  // Through the reader: the contract's checks (lengths, names, ranges) with their field paths.
  const checked = readPlanValue(next);
  if (!checked.ok) throw new InputError(`the measurement does not fit the plan: ${checked.error.message}`);
  return checked.plan;
}

export function cmdAttach(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['output', 'offset-mm', 'name'], ['system']);
  if (args.positionals.length !== 2) throw new UsageError('attach takes a PLAN file and a measurement FILE');
  const [planPath, filePath] = args.positionals;
  const outputId = optString(args, 'output');
  const system = args.options.get('system') === true;
  if ((outputId === undefined) === !system) throw new UsageError('attach needs exactly one of --output ID (a driver measurement) or --system');
  const offsetMm = optNumber(args, 'offset-mm');
  if (offsetMm !== undefined && system) throw new UsageError('--offset-mm belongs to an output (--output ID), not to a system measurement');
  const name = optString(args, 'name');

  const planText = readOrFail(io, planPath);
  const read = readPlanText(planText);
  if (!read.ok) throw new InputError(`${planPath}: ${read.error.message}`);
  const plan = read.plan;
  if (outputId !== undefined && !plan.outputs.some((o) => o.id === outputId)) {
    throw new UsageError(`--output ${outputId}: no such output (the plan has ${plan.outputs.map((o) => o.id).join(', ')})`);
  }

  // A WAV impulse response is told by its header, whatever the file is called (the importers'
  // rule); a host that reads text only gets text columns.
  let kind: MeasurementKind;
  let m: MeasuredResponse;
  try {
    if (io.readBytes) {
      const bytes = readBytesOrFail(io, filePath);
      kind = bytesKind(bytes);
      m = importMeasurement(filePath, bytes);
    } else {
      if (/\.wave?$/i.test(filePath)) throw new InputError(`${filePath}: this host reads text files only; WAV impulse responses need the command line's file reader`);
      kind = 'text';
      m = parseMeasurementText(readOrFail(io, filePath), measurementName(filePath));
    }
  } catch (e) {
    if (e instanceof MeasurementFileError) throw new InputError(`${filePath}: ${e.message}`);
    throw e;
  }
  if (name !== undefined) m = { ...m, name };
  const fileName = filePath.split(/[\\/]/).pop() ?? filePath;
  const target: AttachTarget = system ? { system: true } : { output: outputId!, offsetMm };
  const next = attachMeasurement(plan, m, { fileName, kind }, target);
  const added = next.measurements![next.measurements!.length - 1];
  const where = system ? 'as a system measurement' : `as the driver measurement of output "${outputId}"`;
  const replaced = !system && plan.outputs.find((o) => o.id === outputId)?.driverMeasurementId;
  const lines = [`attached "${added.name}" (id ${added.id}, ${added.frequencyHz.length} points, ${added.phaseDeg ? 'with phase' : 'magnitude only'}) ${where}`];
  if (replaced) lines.push(`output "${outputId}" no longer uses measurement "${replaced}" (it stays in the plan)`);
  return { code: 0, stdout: writePlanText(next), stderr: lines.join('\n') + '\n' };
}

function readBytesOrFail(io: CliIo, path: string): Uint8Array {
  try {
    return io.readBytes!(path);
  } catch (e) {
    throw new InputError(`${path}: cannot read (${(e as Error).message})`);
  }
}

function readOrFail(io: CliIo, path: string): string {
  try {
    return io.readText(path);
  } catch (e) {
    throw new InputError(`${path}: cannot read (${(e as Error).message})`);
  }
}
