/**
 * Time responses of a designed output: the impulse response by running the cascade's difference
 * equations (transposed direct form II, y = b0 x + s1; s1 = b1 x - a1 y + s2; s2 = b2 x - a2 y)
 * on a unit impulse, and the step response as its running sum. The delay is applied rounded to
 * whole samples, as a board applies it.
 */
import type { Section } from '../design/section';

/** `length` samples of the impulse response of `sections` times `gain`, delayed by `delaySamples` (rounded). */
export function impulseResponse(sections: readonly Section[], gain: number, delaySamples: number, length: number): Float64Array {
  const out = new Float64Array(length);
  const d = Math.max(0, Math.round(delaySamples));
  if (d >= length) return out;
  const x = new Float64Array(length - d);
  x[0] = gain;
  for (const s of sections) {
    let s1 = 0;
    let s2 = 0;
    for (let n = 0; n < x.length; n++) {
      const xn = x[n];
      const y = s.b0 * xn + s1;
      s1 = s.b1 * xn - s.a1 * y + s2;
      s2 = s.b2 * xn - s.a2 * y;
      x[n] = y;
    }
  }
  out.set(x, d);
  return out;
}

/** The step response: the running sum of the impulse response. */
export function stepResponse(impulse: Float64Array): Float64Array {
  const out = new Float64Array(impulse.length);
  let acc = 0;
  for (let n = 0; n < impulse.length; n++) {
    acc += impulse[n];
    out[n] = acc;
  }
  return out;
}
