/**
 * Band designs: the Audio EQ Cookbook (R. Bristow-Johnson, "Cookbook formulae for audio EQ biquad
 * filter coefficients", also a W3C Working Group Note) for the second-order types, and first-order
 * sections by the bilinear transform pre-warped at the band frequency.
 *
 * Every type builds (b0, b1, b2, a0, a1, a2) and `normalizeSection` divides by a0 once.
 * Symbols follow the cookbook: A = 10^(gainDb/40), w0 = 2 pi f0 / fs, alpha = sin(w0) / (2 Q).
 */
import { maxShelfSlope, safeShelfSlope, shelfSlopeLimitText, SHELF_SLOPE_Q_MAX } from '../plan/shelf';
import type { Band, BandType } from '../plan/types';
import { normalizeSection, type Section } from './section';

/** Default Q where a band needs one and the plan gives none: 1/sqrt(2), the Butterworth Q. */
export const DEFAULT_Q = Math.SQRT1_2;
/** Default shelf slope S: 1, the steepest slope that keeps the shelf monotonic (cookbook). */
export const DEFAULT_SLOPE = 1;

/** Which parameters each band type uses; the UI reads this to show its fields. */
export const BAND_PARAMETERS: Record<BandType, { gain: boolean; q: boolean; slope: boolean; coefficients: boolean }> = {
  peaking: { gain: true, q: true, slope: false, coefficients: false },
  lowShelf: { gain: true, q: true, slope: true, coefficients: false },
  highShelf: { gain: true, q: true, slope: true, coefficients: false },
  lowPass: { gain: false, q: true, slope: false, coefficients: false },
  highPass: { gain: false, q: true, slope: false, coefficients: false },
  bandPass: { gain: false, q: true, slope: false, coefficients: false },
  notch: { gain: false, q: true, slope: false, coefficients: false },
  allPass: { gain: false, q: true, slope: false, coefficients: false },
  lowPass1: { gain: false, q: false, slope: false, coefficients: false },
  highPass1: { gain: false, q: false, slope: false, coefficients: false },
  allPass1: { gain: false, q: false, slope: false, coefficients: false },
  raw: { gain: false, q: false, slope: false, coefficients: true },
};

/**
 * The Q whose cookbook alpha equals the bandwidth form's alpha (cookbook, "BW" case):
 * alpha = sin(w0) sinh(ln2/2 * BW * w0 / sin(w0)), so Q = 1 / (2 sinh(ln2/2 * BW * w0 / sin w0)).
 * The w0/sin(w0) factor is the cookbook's bilinear-transform correction of the digital bandwidth.
 */
export function qFromBandwidthOctaves(bandwidthOct: number, frequencyHz: number, sampleRateHz: number): number {
  const w0 = (2 * Math.PI * frequencyHz) / sampleRateHz;
  const s = Math.sin(w0);
  // w0 -> 0: w0 / sin(w0) -> 1.
  const ratio = s > 1e-12 ? w0 / s : 1;
  return 1 / (2 * Math.sinh((Math.LN2 / 2) * bandwidthOct * ratio));
}

/** Inverse of `qFromBandwidthOctaves`. */
export function bandwidthOctavesFromQ(q: number, frequencyHz: number, sampleRateHz: number): number {
  const w0 = (2 * Math.PI * frequencyHz) / sampleRateHz;
  const s = Math.sin(w0);
  const ratio = s > 1e-12 ? w0 / s : 1;
  return (2 * Math.asinh(1 / (2 * q))) / (Math.LN2 * ratio);
}

/** The shelf slope limits (src/plan/shelf.ts, where the reader needs them). */
export { maxShelfSlope, safeShelfSlope, shelfSlopeLimitText, SHELF_SLOPE_Q_MAX };

/** The cookbook's steepest slope whose shelf is monotonic (no overshoot): S = 1. */
export const MONOTONIC_SHELF_SLOPE = 1;

/** The Q a shelf gets: its own `q` when set, else from its slope (default S = 1). */
export function shelfAlpha(band: Band, sinW0: number, A: number): number {
  if (band.q !== undefined) return sinW0 / (2 * band.q);
  const S = band.slope ?? DEFAULT_SLOPE;
  // Cookbook: alpha = sin(w0)/2 * sqrt((A + 1/A)(1/S - 1) + 2). Clamped at 0 for S a hair past the
  // limit by rounding; the validator refuses slopes clearly past it.
  return (sinW0 / 2) * Math.sqrt(Math.max(0, (A + 1 / A) * (1 / S - 1) + 2));
}

/** The section(s) of one band at a sample rate. A disabled band still designs (callers skip it). */
export function designBand(band: Band, sampleRateHz: number): Section[] {
  if (band.type === 'raw') {
    const c = band.coefficients;
    if (!c) throw new Error('raw band without coefficients');
    return [normalizeSection(c.b0, c.b1, c.b2, c.a0, c.a1, c.a2)];
  }
  const f0 = band.frequency;
  if (band.type === 'lowPass1' || band.type === 'highPass1' || band.type === 'allPass1') {
    return [firstOrder(band.type, f0, sampleRateHz)];
  }
  const w0 = (2 * Math.PI * f0) / sampleRateHz;
  const cosW0 = Math.cos(w0);
  const sinW0 = Math.sin(w0);
  const q = band.q ?? DEFAULT_Q;
  const alpha = sinW0 / (2 * q);
  const gainDb = band.gainDb ?? 0;
  const A = Math.pow(10, gainDb / 40);

  switch (band.type) {
    case 'lowPass': {
      // 1 - cos(w0) as 2 sin^2(w0/2): the difference loses every digit of a low-frequency section
      // (at 20 Hz, 192 kHz, 1 - cos w0 is 1e-7, and the subtraction keeps only ~9 of its 16 digits).
      const sh = Math.sin(w0 / 2);
      const oneMinusCos = 2 * sh * sh;
      return [normalizeSection(oneMinusCos / 2, oneMinusCos, oneMinusCos / 2, 1 + alpha, -2 * cosW0, 1 - alpha)];
    }
    case 'highPass':
      return [normalizeSection((1 + cosW0) / 2, -(1 + cosW0), (1 + cosW0) / 2, 1 + alpha, -2 * cosW0, 1 - alpha)];
    case 'bandPass':
      // Constant 0 dB peak gain form.
      return [normalizeSection(alpha, 0, -alpha, 1 + alpha, -2 * cosW0, 1 - alpha)];
    case 'notch':
      return [normalizeSection(1, -2 * cosW0, 1, 1 + alpha, -2 * cosW0, 1 - alpha)];
    case 'allPass':
      return [normalizeSection(1 - alpha, -2 * cosW0, 1 + alpha, 1 + alpha, -2 * cosW0, 1 - alpha)];
    case 'peaking':
      return [normalizeSection(1 + alpha * A, -2 * cosW0, 1 - alpha * A, 1 + alpha / A, -2 * cosW0, 1 - alpha / A)];
    case 'lowShelf': {
      const al = shelfAlpha(band, sinW0, A);
      const t = 2 * Math.sqrt(A) * al;
      return [
        normalizeSection(
          A * (A + 1 - (A - 1) * cosW0 + t),
          2 * A * (A - 1 - (A + 1) * cosW0),
          A * (A + 1 - (A - 1) * cosW0 - t),
          A + 1 + (A - 1) * cosW0 + t,
          -2 * (A - 1 + (A + 1) * cosW0),
          A + 1 + (A - 1) * cosW0 - t,
        ),
      ];
    }
    case 'highShelf': {
      const al = shelfAlpha(band, sinW0, A);
      const t = 2 * Math.sqrt(A) * al;
      return [
        normalizeSection(
          A * (A + 1 + (A - 1) * cosW0 + t),
          -2 * A * (A - 1 + (A + 1) * cosW0),
          A * (A + 1 + (A - 1) * cosW0 - t),
          A + 1 - (A - 1) * cosW0 + t,
          2 * (A - 1 - (A + 1) * cosW0),
          A + 1 - (A - 1) * cosW0 - t,
        ),
      ];
    }
  }
  throw new Error(`unknown band type ${String(band.type)}`);
}

/**
 * First-order sections by the bilinear transform pre-warped at f: k = tan(pi f / fs).
 * Low-pass: b0 = b1 = k/(1+k), a1 = (k-1)/(k+1). High-pass: b0 = -b1 = 1/(1+k).
 * All-pass: b0 = a1 = (k-1)/(k+1), b1 = 1 (unit magnitude, -90 degrees at f).
 */
export function firstOrder(type: 'lowPass1' | 'highPass1' | 'allPass1', frequencyHz: number, sampleRateHz: number): Section {
  const k = Math.tan((Math.PI * frequencyHz) / sampleRateHz);
  const a1 = (k - 1) / (k + 1);
  switch (type) {
    case 'lowPass1':
      return { b0: k / (1 + k), b1: k / (1 + k), b2: 0, a1, a2: 0 };
    case 'highPass1':
      return { b0: 1 / (1 + k), b1: -1 / (1 + k), b2: 0, a1, a2: 0 };
    case 'allPass1':
      return { b0: a1, b1: 1, b2: 0, a1, a2: 0 };
  }
}
