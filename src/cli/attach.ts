/**
 * `attach PLAN FILE (--output ID | --system) [--offset-mm N | --offset-ms N] [--channel N]
 * [--gate START_MS,LENGTH_MS] [--name NAME]`: the plan with the measurement in FILE (text columns,
 * or a WAV impulse response read as `measure` reads it: the first channel and the default gate
 * unless chosen) added, written to stdout (the plan file itself is never changed). The
 * measurement becomes the output's driver measurement, or one of the plan's system measurements.
 * The result is read back through the plan reader before it is written, so stdout is always a
 * valid plan; anything the contract refuses is an input error naming the field.
 */
import { measurementName, MeasurementFileError } from '../measure/errors';
import { importMeasurement, measurementKind as bytesKind } from '../measure/import';
import { measurementId, toPlanMeasurement } from '../measure/plan-measurement';
import { parseMeasurementText } from '../measure/text';
import type { MeasuredResponse } from '../measure/types';
import { readPlanText, readPlanValue } from '../plan/read';
import { PLAN_VERSION, type Measurement, type MeasurementKind, type Plan } from '../plan/types';
import { planToJson, writePlanText } from '../plan/write';
import { optNumber, optString, parseArgs, UsageError } from './args';
import { InputError, type CliIo, type CliResult } from './io';
import { channelOption, gateOption } from './measure';

/** Where a new measurement goes. */
export type AttachTarget = { output: string; offsetMm?: number; offsetMs?: number } | { system: true };

export { measurementId };

/**
 * The plan with `m` added as a measurement (a new id from its name) and referenced as `target`
 * says. Pure: the given plan is not changed. Throws `InputError` when the result is not a valid
 * plan (the reader's message, with its field path) or the output does not exist.
 */
export function attachMeasurement(plan: Plan, m: MeasuredResponse, source: { fileName: string; kind: MeasurementKind }, target: AttachTarget): Plan {
  const measurement: Measurement = { ...toPlanMeasurement(m, measurementId(plan, m.name), source), name: m.name };
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
    else if (target.offsetMs !== undefined) out.acousticOffset = { value: target.offsetMs, unit: 'ms' };
  }
  // Through the reader: the contract's checks (lengths, names, ranges) with their field paths.
  const checked = readPlanValue(next);
  if (!checked.ok) throw new InputError(`the measurement does not fit the plan: ${checked.error.message}`);
  return checked.plan;
}

export function cmdAttach(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['output', 'offset-mm', 'offset-ms', 'channel', 'gate', 'name'], ['system']);
  if (args.positionals.length !== 2) throw new UsageError('attach takes a PLAN file and a measurement FILE');
  const [planPath, filePath] = args.positionals;
  const outputId = optString(args, 'output');
  const system = args.options.get('system') === true;
  if ((outputId === undefined) === !system) throw new UsageError('attach needs exactly one of --output ID (a driver measurement) or --system');
  const offsetMm = optNumber(args, 'offset-mm');
  const offsetMs = optNumber(args, 'offset-ms');
  if (offsetMm !== undefined && offsetMs !== undefined) throw new UsageError('give the acoustic offset once: --offset-mm or --offset-ms, not both');
  if ((offsetMm !== undefined || offsetMs !== undefined) && system) {
    throw new UsageError(`${offsetMm !== undefined ? '--offset-mm' : '--offset-ms'} belongs to an output (--output ID), not to a system measurement`);
  }
  const channel = channelOption(args);
  const gate = gateOption(args);
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
      if (kind === 'text' && (channel !== undefined || gate !== undefined)) throw new UsageError('--channel and --gate apply to WAV impulse responses only');
      m = importMeasurement(filePath, bytes, { channel, gate });
    } else {
      if (/\.wave?$/i.test(filePath)) throw new InputError(`${filePath}: this host reads text files only; WAV impulse responses need the command line's file reader`);
      if (channel !== undefined || gate !== undefined) throw new UsageError('--channel and --gate apply to WAV impulse responses only');
      kind = 'text';
      m = parseMeasurementText(readOrFail(io, filePath), measurementName(filePath));
    }
  } catch (e) {
    if (e instanceof MeasurementFileError) throw new InputError(`${filePath}: ${e.message}`);
    throw e;
  }
  if (name !== undefined) m = { ...m, name };
  const fileName = filePath.split(/[\\/]/).pop() ?? filePath;
  const target: AttachTarget = system ? { system: true } : { output: outputId!, offsetMm, offsetMs };
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
