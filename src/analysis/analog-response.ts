/**
 * The analog response of a plan: every output's chain with each band and edge replaced by its
 * analog prototype (src/design/analog.ts), times its gain, polarity and exact delay, and the
 * complex sum of the unmuted outputs with its exact group delay (S' = sum H_k (slope_k - j tau_k),
 * as the digital sum). Raw bands have no analog prototype and are left out (listed).
 */
import { analogComplex, bandPrototype, edgeAnalogPrototype, type AnalogComplex, type AnalogPrototype } from '../design/analog';
import { outputGain } from '../design/chain';
import type { Band, Output, Plan } from '../plan/types';

export interface AnalogCurves {
  magnitudeDb: Float64Array;
  /** Wrapped to (-pi, pi]. */
  phaseRad: Float64Array;
  groupDelayMs: Float64Array;
}

export interface AnalogPlanResponse {
  outputs: { id: string; mute: boolean; complex: AnalogComplex; curves: AnalogCurves }[];
  sum: AnalogCurves;
  /** "outputId/bandId" (or "input/bandId") of every enabled raw band left out. */
  leftOut: string[];
}

function prototypesOf(bands: readonly Band[], prefix: string, leftOut: string[], into: AnalogPrototype[]): void {
  for (const b of bands) {
    if (!b.enabled) continue;
    const p = bandPrototype(b);
    if (p) into.push(p);
    else leftOut.push(`${prefix}/${b.id}`);
  }
}

export function analogCurves(h: AnalogComplex): AnalogCurves {
  const n = h.re.length;
  const out: AnalogCurves = { magnitudeDb: new Float64Array(n), phaseRad: new Float64Array(n), groupDelayMs: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    out.magnitudeDb[i] = 10 * Math.log10(h.re[i] * h.re[i] + h.im[i] * h.im[i]);
    out.phaseRad[i] = Math.atan2(h.im[i], h.re[i]);
    out.groupDelayMs[i] = h.groupDelayS[i] * 1000;
  }
  return out;
}

/** One output's analog response (input bands, edges, its bands, gain, polarity, delay). */
export function analogOutputComplex(plan: Plan, output: Output, frequenciesHz: ArrayLike<number>, leftOut: string[] = []): AnalogComplex {
  const protos: AnalogPrototype[] = [];
  prototypesOf(plan.input.bands, 'input', leftOut, protos);
  for (const kind of ['highPass', 'lowPass'] as const) {
    const e = output[kind];
    if (e) protos.push(edgeAnalogPrototype(e, kind));
  }
  prototypesOf(output.bands, output.id, leftOut, protos);
  return analogComplex(protos, frequenciesHz, outputGain(output), output.delayMs / 1000);
}

export function analogPlanResponse(plan: Plan, frequenciesHz: ArrayLike<number>): AnalogPlanResponse {
  const leftOut: string[] = [];
  const outputs = plan.outputs.map((o) => {
    const complex = analogOutputComplex(plan, o, frequenciesHz, leftOut);
    return { id: o.id, mute: o.mute, complex, curves: analogCurves(complex) };
  });
  const n = frequenciesHz.length;
  const sum: AnalogComplex = { re: new Float64Array(n), im: new Float64Array(n), groupDelayS: new Float64Array(n), logSlope: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    let sr = 0;
    let si = 0;
    let dr = 0;
    let di = 0;
    for (const o of outputs) {
      if (o.mute) continue;
      const { re, im, groupDelayS, logSlope } = o.complex;
      sr += re[i];
      si += im[i];
      // H (slope - j tau).
      dr += re[i] * logSlope[i] + im[i] * groupDelayS[i];
      di += im[i] * logSlope[i] - re[i] * groupDelayS[i];
    }
    sum.re[i] = sr;
    sum.im[i] = si;
    // tau = -Im(S'/S).
    const m = sr * sr + si * si;
    sum.groupDelayS[i] = m > 0 ? -(di * sr - dr * si) / m : NaN;
  }
  return { outputs, sum: analogCurves(sum), leftOut };
}
