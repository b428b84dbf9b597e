/**
 * The Response view's analog curves (each band and edge as its analog prototype,
 * src/analysis/analog-response.ts) in the plot's curve shape, the sum's largest departure from
 * them over the plotted range, and the note on the delays the board runs.
 */
import { analogPlanResponse, type AnalogCurves } from '$core/analysis/analog-response';
import { largestDeviation } from '$core/analysis/cramping';
import { DELAY_ROUNDING_SHOW_DB } from '$core/analysis/thresholds';
import { delaysRounded } from '$core/design/board-delay';
import { dbText, formatFrequency } from '$core/format';
import type { Plan } from '$core/plan/types';
import { unwrapInto } from '$core/response/chain-response';
import type { CurveData } from '../charts/response-plots';
import type { PlanFrame } from './response-cache';

export interface AnalogFrame {
  /** Per output, in plan order. */
  outputs: CurveData[];
  sum: CurveData;
}

function curve(c: AnalogCurves): CurveData {
  const phaseUnwrappedRad = new Float64Array(c.phaseRad.length);
  unwrapInto(c.phaseRad, phaseUnwrappedRad);
  return { magnitudeDb: c.magnitudeDb, phaseRad: c.phaseRad, phaseUnwrappedRad, groupDelayMs: c.groupDelayMs };
}

export function analogCurveData(plan: Plan, grid: Float64Array): AnalogFrame {
  const a = analogPlanResponse(plan, grid);
  return { outputs: a.outputs.map((o) => curve(o.curves)), sum: curve(a.sum) };
}

/** "Sum vs analog: -2.31 dB at 18.4 kHz" over the plotted grid. */
export function analogNote(frame: PlanFrame, analog: AnalogFrame, grid: Float64Array): string {
  const d = largestDeviation(frame.sum.magnitudeDb, analog.sum.magnitudeDb!, grid);
  return `sum vs analog: ${dbText(d.deviationDb)} at ${formatFrequency(d.frequencyHz)}`;
}

/** The note on the board's delays: null when they are the exact ones or move the sum by at most 0.1 dB. */
export function delayNote(plan: Plan, frame: PlanFrame, exactFrame: (p: Plan) => PlanFrame): string | null {
  if (!delaysRounded(plan)) return null;
  const exact = exactFrame(plan);
  let worst = 0;
  let at = 0;
  for (let i = 0; i < frame.frequencies.length; i++) {
    const d = frame.sum.magnitudeDb[i] - exact.sum.magnitudeDb[i];
    if (Number.isFinite(d) && Math.abs(d) > Math.abs(worst)) {
      worst = d;
      at = frame.frequencies[i];
    }
  }
  return Math.abs(worst) > DELAY_ROUNDING_SHOW_DB ? `board delays: sum ${dbText(worst)} at ${formatFrequency(at)} vs exact` : null;
}
