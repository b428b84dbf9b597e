/**
 * `response PLAN --acoustic [--smooth 1/N|var]`: beside the electrical response (unchanged), the
 * predicted acoustic response of every unmuted output with a driver measurement and their
 * predicted sum (src/measure/acoustic.ts), at the same frequencies. Where a measurement has no
 * value (outside its range, or no phase) the number is null, never an extrapolated one.
 * Smoothing is applied to each driver measurement on its own frequencies before the prediction;
 * the plan's data is not changed.
 */
import { predictAcoustic, type AcousticPrediction } from '../measure/acoustic';
import { parseSmoothing, smoothingLabel, smoothMeasurement, type Smoothing } from '../measure/smooth';
import { numText } from '../export/list';
import { DEFAULT_AIR_TEMPERATURE_C, type Plan } from '../plan/types';
import type { Response } from '../response/chain-response';
import { UsageError } from './args';

export interface AcousticColumns {
  magnitudeDb: (number | null)[];
  phaseDeg: (number | null)[];
  groupDelayMs: (number | null)[];
}

const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Degrees wrapped to (-180, 180] from radians in (-pi, pi]; null when unknown. */
function degrees(rad: number): number | null {
  if (!Number.isFinite(rad)) return null;
  const d = (rad * 180) / Math.PI;
  return d <= -180 ? d + 360 : d > 180 ? d - 360 : d;
}

/** A predicted response as columns, null wherever a value is unknown or not finite. */
export function acousticColumns(r: Response): AcousticColumns {
  const n = r.magnitudeDb.length;
  const out: AcousticColumns = { magnitudeDb: [], phaseDeg: [], groupDelayMs: [] };
  for (let i = 0; i < n; i++) {
    const m = finite(r.magnitudeDb[i]);
    out.magnitudeDb.push(m);
    out.phaseDeg.push(m === null ? null : degrees(r.phaseRad[i]));
    out.groupDelayMs.push(m === null ? null : finite(r.groupDelayMs[i]));
  }
  return out;
}

/** The --smooth option: none, 1/N octave (N from 1 to 96) or "var". */
export function smoothingOption(text: string | undefined): Smoothing {
  if (text === undefined) return { kind: 'none' };
  const s = parseSmoothing(text);
  if (!s) throw new UsageError(`--smooth must be none, 1/N (1/48 ... 1/1 octave) or var, not "${text}"`);
  return s;
}

export interface AcousticSection {
  prediction: AcousticPrediction;
  smoothing: Smoothing;
  /** The unmuted outputs with a driver measurement, as columns. */
  outputs: ({ id: string; measurementId: string; phaseEstimated: boolean; offsetMs: number } & AcousticColumns)[];
  sum: AcousticColumns | null;
  /** Lines for stderr: what was left out and why. */
  notes: string[];
}

export function acousticSection(plan: Plan, freqs: Float64Array, smoothing: Smoothing): AcousticSection {
  const prediction = predictAcoustic(plan, freqs, smoothing.kind === 'none' ? {} : { measurement: (m) => smoothMeasurement(m, smoothing) });
  const outputs = prediction.outputs
    .filter((o) => !o.mute)
    .map((o) => ({ id: o.id, measurementId: o.measurementId, phaseEstimated: o.phaseEstimated, offsetMs: o.offsetMs, ...acousticColumns(o.response) }));
  const notes: string[] = [];
  if (prediction.outputs.length === 0) notes.push('note: no output has a driver measurement; there is no acoustic prediction (attach one with the attach command)');
  else if (prediction.unmeasured.length > 0) {
    notes.push(`note: the predicted sum leaves out ${prediction.unmeasured.map((id) => `"${id}"`).join(', ')}: no driver measurement`);
  }
  const noPhase = prediction.outputs.filter((o) => !o.mute && !o.hasPhase).map((o) => `"${o.id}"`);
  if (noPhase.length > 0) notes.push(`note: the driver measurement of ${noPhase.join(', ')} has no phase, so the predicted sum has no value`);
  const estimated = prediction.outputs.filter((o) => !o.mute && o.phaseEstimated).map((o) => `"${o.id}"`);
  if (estimated.length > 0) notes.push(`note: the phase of ${estimated.join(', ')} is a minimum-phase estimate, not measured`);
  return { prediction, smoothing, outputs, sum: prediction.sum ? acousticColumns(prediction.sum) : null, notes };
}

/** The `acoustic` member of the response JSON. */
export function acousticJson(plan: Plan, a: AcousticSection): Record<string, unknown> {
  return {
    airTemperatureC: plan.airTemperatureC ?? DEFAULT_AIR_TEMPERATURE_C,
    speedOfSoundMps: a.prediction.speedOfSoundMps,
    smoothing: smoothingLabel(a.smoothing),
    outputs: a.outputs,
    summed: a.prediction.summed,
    unmeasured: a.prediction.unmeasured,
    sum: a.sum,
  };
}

/** CSV columns after the electrical ones: acoustic.<id>.magnitudeDb, ..., acoustic.sum.groupDelayMs. */
export function acousticCsvColumns(a: AcousticSection): { header: string[]; row: (i: number) => string[] } {
  const named = a.outputs.map((o) => ({ id: o.id, cols: o as AcousticColumns }));
  if (a.sum) named.push({ id: 'sum', cols: a.sum });
  const header = named.flatMap((n) => [`acoustic.${n.id}.magnitudeDb`, `acoustic.${n.id}.phaseDeg`, `acoustic.${n.id}.groupDelayMs`]);
  const cell = (x: number | null) => (x === null ? '' : numText(x));
  return { header, row: (i) => named.flatMap((n) => [cell(n.cols.magnitudeDb[i]), cell(n.cols.phaseDeg[i]), cell(n.cols.groupDelayMs[i])]) };
}
