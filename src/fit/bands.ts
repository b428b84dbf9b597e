/**
 * The level of cookbook sections on a fit grid, computed from the designed coefficients (the
 * plan's own designs, src/design/cookbook.ts), so a fitted band is exactly what the plan will run.
 *
 * |N(e^jt)| for N = b0 + b1 z^-1 + b2 z^-2 is |F(t)| with F = (b0 + b1 + b2) - (b0 + b2) u +
 * j (b0 - b2) sin t and u = 1 - cos t = 2 sin^2(t/2) (N e^jt = F, the kernel's form around z = 1,
 * src/response/kernel.ts): at low frequencies it keeps full relative precision where 1 - cos t
 * computed directly would not.
 */
import type { Section } from '../design/section';

/** Per point of a grid: u = 2 sin^2(t/2) and sin t, t = 2 pi f / fs. */
export interface GridTrig {
  u: Float64Array;
  sinT: Float64Array;
}

export function gridTrig(frequenciesHz: ArrayLike<number>, sampleRateHz: number): GridTrig {
  const n = frequenciesHz.length;
  const u = new Float64Array(n);
  const sinT = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = (2 * Math.PI * frequenciesHz[i]) / sampleRateHz;
    const s = Math.sin(t / 2);
    u[i] = 2 * s * s;
    sinT[i] = Math.sin(t);
  }
  return { u, sinT };
}

const DB_PER_LN_POWER = 10 / Math.LN10;

/** Adds `sign` times the level in dB of `s` at every grid point to `into`. */
export function addSectionDb(s: Section, g: GridTrig, into: Float64Array, sign = 1): void {
  const nSum = s.b0 + s.b1 + s.b2;
  const nMid = s.b0 + s.b2;
  const nOdd = s.b0 - s.b2;
  const dSum = 1 + s.a1 + s.a2;
  const dMid = 1 + s.a2;
  const dOdd = 1 - s.a2;
  const k = sign * DB_PER_LN_POWER;
  for (let i = 0; i < into.length; i++) {
    const u = g.u[i];
    const st = g.sinT[i];
    const nr = nSum - nMid * u;
    const ni = nOdd * st;
    const dr = dSum - dMid * u;
    const di = dOdd * st;
    into[i] += k * Math.log((nr * nr + ni * ni) / (dr * dr + di * di));
  }
}
