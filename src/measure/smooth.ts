/**
 * Fractional-octave smoothing of a measured response (docs/measurements.md, "Smoothing").
 *
 * Definition. At each frequency f of the data, smoothing of width w octaves (w = 1/N) gives
 *   magnitude: 10 log10 of the mean of |H|^2 over log f in [f 2^(-w/2), f 2^(w/2)],
 *   phase:     the angle of the mean of H over the same interval,
 * where between two data points H is the interpolant that is linear in log f for both the level
 * in dB and the unwrapped phase in degrees. Power averaging over a 1/N-octave log interval:
 * Hatziantoniou and Mourjopoulos, JAES 48(4), 2000; log-frequency symmetry of the interval:
 * Tylka, Boren and Choueiri, JAES 65(3), 2017. The phase is the stored one, relative to the
 * measurement's delay, so the bulk delay is out before the complex mean, as the first paper asks.
 *
 * Each integral is exact for that interpolant: on a piece where the level is L0 + s (u - u0)
 * (u = log2 f) and the phase p0 + q (u - u0), |H|^2 and H are exponentials in u, integrated in
 * closed form with expm1 so a flat piece loses nothing.
 *
 * Ends. Near the first and last data points the interval is narrowed symmetrically in log f to
 * the widest one that stays inside the data: a point 1/200 octave from the end is smoothed over
 * 1/100 octave, and the first and last points keep their values. Nothing is extrapolated, and
 * the interval stays centred on f, so a level or phase that is linear in log f is not bent at the
 * ends.
 *
 * Everything is computed relative to the level and phase at f itself, so smoothing a constant
 * returns the constant exactly (the mean of exactly 1 over the same pieces is exactly 1).
 */
import type { MeasuredResponse } from './types';

/** None, a fixed 1/N octave, or the variable setting (see smoothingWidthOctaves). */
export type Smoothing = { kind: 'none' } | { kind: 'octave'; n: number } | { kind: 'variable' };

/** The fixed settings offered: 1/48 ... 1/1 octave. */
export const OCTAVE_FRACTIONS = [48, 24, 12, 6, 3, 2, 1] as const;

/** Variable smoothing: VARIABLE_LOW.n octave up to VARIABLE_LOW.hz, VARIABLE_HIGH.n from VARIABLE_HIGH.hz. */
export const VARIABLE_LOW = { hz: 100, n: 48 };
export const VARIABLE_HIGH = { hz: 10000, n: 3 };

/**
 * Width in octaves at frequency f. Variable: 1/48 octave below 100 Hz, 1/3 octave at 10 kHz and
 * above, and in between the log of the width is linear in log f (1/12 octave at 1 kHz).
 */
export function smoothingWidthOctaves(s: Smoothing, frequencyHz: number): number {
  if (s.kind === 'none') return 0;
  if (s.kind === 'octave') return 1 / s.n;
  const lo = 1 / VARIABLE_LOW.n;
  const hi = 1 / VARIABLE_HIGH.n;
  if (frequencyHz <= VARIABLE_LOW.hz) return lo;
  if (frequencyHz >= VARIABLE_HIGH.hz) return hi;
  const t = Math.log(frequencyHz / VARIABLE_LOW.hz) / Math.log(VARIABLE_HIGH.hz / VARIABLE_LOW.hz);
  return lo * Math.pow(hi / lo, t);
}

/** "none", "var" / "variable", or "1/N" (N > 0; also "N" alone). Null when not one of these. */
export function parseSmoothing(text: string): Smoothing | null {
  const t = text.trim().toLowerCase();
  if (t === 'none' || t === '0') return { kind: 'none' };
  if (t === 'var' || t === 'variable') return { kind: 'variable' };
  const m = /^(?:1\/)?(\d+(?:\.\d+)?)$/.exec(t);
  if (!m) return null;
  const n = Number(m[1]);
  if (!(n > 0) || n > 1000) return null;
  return { kind: 'octave', n };
}

/** The label of a setting: "none", "1/6 oct", "variable". */
export function smoothingLabel(s: Smoothing): string {
  return s.kind === 'none' ? 'none' : s.kind === 'variable' ? 'variable' : `1/${s.n} oct`;
}

const C_POWER = Math.LN10 / 10; // |H|^2 = exp(C_POWER * dB)
const C_AMPL = Math.LN10 / 20; // |H| = exp(C_AMPL * dB)
const DEG = Math.PI / 180;

/** expm1(x) / x, 1 at 0. */
function expm1OverX(x: number): number {
  return x === 0 ? 1 : Math.expm1(x) / x;
}

/**
 * The smoothed level and phase at every data point. `phaseDeg` may be null (magnitude only).
 * Returns new arrays; the inputs are not changed.
 */
export function smoothColumns(
  frequencyHz: readonly number[],
  magnitudeDb: readonly number[],
  phaseDeg: readonly number[] | null,
  s: Smoothing,
): { magnitudeDb: number[]; phaseDeg: number[] | null } {
  const n = frequencyHz.length;
  const outMag = magnitudeDb.slice();
  const outPhase = phaseDeg === null ? null : phaseDeg.slice();
  if (s.kind === 'none' || n < 2) return { magnitudeDb: outMag, phaseDeg: outPhase };
  const u = new Float64Array(n);
  for (let i = 0; i < n; i++) u[i] = Math.log2(frequencyHz[i]);
  const uFirst = u[0];
  const uLast = u[n - 1];

  for (let c = 0; c < n; c++) {
    const uc = u[c];
    const half = Math.min(smoothingWidthOctaves(s, frequencyHz[c]) / 2, uc - uFirst, uLast - uc);
    if (!(half > 0)) continue;
    const ua = uc - half;
    const ub = uc + half;
    const lc = magnitudeDb[c];
    const pc = phaseDeg === null ? 0 : phaseDeg[c];
    // First piece: the segment [k, k+1] that holds ua.
    let k = c;
    while (k > 0 && u[k] > ua) k--;
    let width = 0;
    let power = 0;
    let re = 0;
    let im = 0;
    for (; k < n - 1 && u[k] < ub; k++) {
      const u0 = u[k];
      const u1 = u[k + 1];
      const x0 = Math.max(u0, ua);
      const x1 = Math.min(u1, ub);
      const d = x1 - x0;
      if (!(d > 0)) continue;
      const span = u1 - u0;
      const sL = (magnitudeDb[k + 1] - magnitudeDb[k]) / span; // dB per octave
      const l0 = magnitudeDb[k] + sL * (x0 - u0) - lc; // level at x0, relative to f's
      width += d;
      power += Math.exp(C_POWER * l0) * d * expm1OverX(C_POWER * sL * d);
      if (phaseDeg !== null) {
        // H relative to f's value: exp(a + b (u - x0)) with a = C_AMPL l0 + j p0, b = C_AMPL sL + j q.
        const sP = ((phaseDeg[k + 1] - phaseDeg[k]) / span) * DEG;
        const p0 = (phaseDeg[k] - pc) * DEG + sP * (x0 - u0);
        const ar = C_AMPL * l0;
        const br = C_AMPL * sL;
        // Integral over [0, d] of exp(b t) dt = (exp(b d) - 1) / b, written without cancellation.
        const [ir, ii] = complexExpm1OverB(br, sP, d);
        const ea = Math.exp(ar);
        const cr = ea * Math.cos(p0);
        const ci = ea * Math.sin(p0);
        re += cr * ir - ci * ii;
        im += cr * ii + ci * ir;
      }
    }
    outMag[c] = lc + 10 * Math.log10(power / width);
    if (outPhase !== null) outPhase[c] = pc + Math.atan2(im, re) / DEG;
  }
  return { magnitudeDb: outMag, phaseDeg: outPhase };
}

/** (exp(b d) - 1) / b for complex b = br + j bi, as [re, im]; d when b = 0. */
function complexExpm1OverB(br: number, bi: number, d: number): [number, number] {
  if (br === 0 && bi === 0) return [d, 0];
  const x = br * d;
  const y = bi * d;
  // exp(x + jy) - 1 = (expm1(x) cos y - 2 sin^2(y/2)) + j exp(x) sin y
  const sh = Math.sin(y / 2);
  const nr = Math.expm1(x) * Math.cos(y) - 2 * sh * sh;
  const ni = Math.exp(x) * Math.sin(y);
  if (Math.abs(x) + Math.abs(y) < 1e-6) {
    // Series to second order: d (1 + b d / 2), accurate to ~1e-13 relative here.
    return [d * (1 + x / 2 + (x * x - y * y) / 6), d * (y / 2 + (x * y) / 3)];
  }
  const den = br * br + bi * bi;
  return [(nr * br + ni * bi) / den, (ni * br - nr * bi) / den];
}

/** The measurement smoothed; frequencies, delay, notes and name kept. */
export function smoothMeasurement(m: MeasuredResponse, s: Smoothing): MeasuredResponse {
  const r = smoothColumns(m.frequencyHz, m.magnitudeDb, m.phaseDeg, s);
  return { ...m, frequencyHz: m.frequencyHz.slice(), magnitudeDb: r.magnitudeDb, phaseDeg: r.phaseDeg, notes: m.notes.slice() };
}
