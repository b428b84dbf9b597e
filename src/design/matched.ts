/**
 * Matched second-order designs: sections whose magnitude follows the analog prototype up to
 * Nyquist, after M. Vicanek, "Matched Second Order Digital Filters" (2016; docs/references.md,
 * "Lower-cramping designs near Nyquist").
 *
 * The method, in the paper's symbols:
 * 1. Poles by impulse invariance of the analog poles (exact pole positions, no warping): with
 *    w0 = 2 pi f / fs and q = 1 / (2 Q) of the pole pair,
 *    a2 = e^(-2 q w0), a1 = -2 e^(-q w0) cos(sqrt(1 - q^2) w0)  (cosh(sqrt(q^2 - 1) w0) for q > 1).
 * 2. The magnitude squared of any section is linear in three basis functions,
 *    |B(e^jw)|^2 = B0 phi0 + B1 phi1 + B2 phi2 with phi1 = sin^2(w/2), phi0 = 1 - phi1,
 *    phi2 = 4 phi0 phi1, B0 = (b0 + b1 + b2)^2, B1 = (b0 - b1 + b2)^2, B2 = -4 b0 b2
 *    (likewise A0, A1, A2 for the poles), so the numerator follows from three conditions on the
 *    analog magnitude, solved in closed form, and is then factored back into b0, b1, b2.
 *
 * Conditions per type:
 * - peaking (paper): exact at DC, exact gain at f, and a peak at f (zero slope of |H|^2 there);
 * - lowPass (paper): exact at DC and at f (|H| = Q), b2 = 0;
 * - highPass (paper): zeros at DC (b = b0 [1, -2, 1]), exact at f (|H| = Q);
 * - bandPass (paper): zero at DC, exact 0 dB at f and a peak there;
 * - notch (ours, not in the paper): the zeros of the analog notch mapped exactly (on the unit
 *   circle at f), gain exact at DC;
 * - lowShelf, highShelf (ours, the paper's basis applied to three points): exact at DC, at f (the
 *   shelf midpoint) and at Nyquist.
 * Limits (stated by the method, and checked in tests/design/matched.test.ts): the phase is not
 * matched (only the magnitude); the match is exact only at the chosen points, in between it
 * follows the analog shape closely but not exactly; poles of an analog pair above Nyquist (a
 * high shelf's poles sit at f sqrt(A)) alias; where the conditions ask for a negative square
 * (very low Q close to Nyquist), the nearest realizable value (0) is used. All-pass and
 * first-order types have no matched design here: the plan refuses `"design": "matched"` on them
 * and a plan-wide default leaves them bilinear.
 */
import { MATCHED_DESIGN_TYPES, type Band, type BandType } from '../plan/types';
import { DEFAULT_Q } from './cookbook';
import { bandPrototype, shelfInverseQ } from './analog';
import type { Section } from './section';

/** The band types with a matched design. */
export const MATCHED_TYPES: readonly BandType[] = MATCHED_DESIGN_TYPES;

export function hasMatchedDesign(type: BandType): boolean {
  return MATCHED_TYPES.includes(type);
}

/** Impulse-invariant poles of the analog pair with frequency w (rad/sample) and quality factor Q. */
export function impulseInvariantPoles(w: number, Q: number): { a1: number; a2: number } {
  const q = 1 / (2 * Q);
  const a2 = Math.exp(-2 * q * w);
  const r = Math.exp(-q * w);
  const a1 = q <= 1 ? -2 * r * Math.cos(Math.sqrt(1 - q * q) * w) : -2 * r * Math.cosh(Math.sqrt(q * q - 1) * w);
  return { a1, a2 };
}

/** The paper's basis at w: phi1 = sin^2(w/2), phi0 = 1 - phi1, phi2 = 4 phi0 phi1. */
function basis(w: number): { p0: number; p1: number; p2: number } {
  const s = Math.sin(w / 2);
  const p1 = s * s;
  const p0 = 1 - p1;
  return { p0, p1, p2: 4 * p0 * p1 };
}

/** |analog prototype|^2 of the band at f Hz. */
function analogPower(band: Band, frequencyHz: number): number {
  const p = bandPrototype(band);
  if (!p) return 1;
  const x = frequencyHz / p.frequencyHz;
  let m = p.gain * p.gain;
  for (const s of p.sections) {
    const [n0, n1, n2] = s.B;
    const [d0, d1, d2] = s.A;
    const nr = n2 - n0 * x * x;
    const dr = d2 - d0 * x * x;
    m *= (nr * nr + n1 * n1 * x * x) / (dr * dr + d1 * d1 * x * x);
  }
  return m;
}

/**
 * b0, b1, b2 from B0, B1, B2: sqrt(B0) = b0 + b1 + b2, sqrt(B1) = b0 - b1 + b2, -4 b0 b2 = B2.
 * With W = b0 + b2: b1 = (sqrt B0 - sqrt B1) / 2, b0 = (W + sqrt(W^2 + B2)) / 2, b2 = W - b0.
 * `signB1` gives the sign of b0 - b1 + b2 (negative for a band-pass, whose numerator vanishes at DC).
 */
function factorNumerator(B0: number, B1: number, B2: number, signB1 = 1): [number, number, number] {
  const r0 = Math.sqrt(Math.max(0, B0));
  const r1 = signB1 * Math.sqrt(Math.max(0, B1));
  const b1 = (r0 - r1) / 2;
  const W = (r0 + r1) / 2;
  const b0 = (W + Math.sqrt(Math.max(0, W * W + B2))) / 2;
  // b2 = W - b0 loses digits when b0 ~ W; -B2 / (4 b0) keeps them (both are exact algebraically).
  const b2 = b0 !== 0 ? -B2 / (4 * b0) : W - b0;
  return [b0, b1, b2];
}

/** The matched section of a band whose type has one (see MATCHED_TYPES). */
export function designMatched(band: Band, sampleRateHz: number): Section {
  const w0 = (2 * Math.PI * band.frequency) / sampleRateHz;
  const Q = band.q ?? DEFAULT_Q;
  const A = Math.pow(10, (band.gainDb ?? 0) / 40);
  let poles: { a1: number; a2: number };
  switch (band.type) {
    case 'peaking':
      // Denominator s^2 + s/(A Q) + 1: the pole pair's Q is A Q.
      poles = impulseInvariantPoles(w0, A * Q);
      break;
    case 'lowShelf':
      // A s^2 + (sqrt A / Q) s + 1: poles at f / sqrt(A) with Q = 1 / invQ.
      poles = impulseInvariantPoles(w0 / Math.sqrt(A), 1 / shelfInverseQ(band, A));
      break;
    case 'highShelf':
      poles = impulseInvariantPoles(w0 * Math.sqrt(A), 1 / shelfInverseQ(band, A));
      break;
    case 'lowPass':
    case 'highPass':
    case 'bandPass':
    case 'notch':
      poles = impulseInvariantPoles(w0, Q);
      break;
    default:
      throw new Error(`no matched design for ${band.type} bands`);
  }
  const { a1, a2 } = poles;
  const A0 = (1 + a1 + a2) * (1 + a1 + a2);
  const A1 = (1 - a1 + a2) * (1 - a1 + a2);
  const A2 = -4 * a2;
  const { p0, p1, p2 } = basis(w0);
  // The denominator's |A|^2 at w0 and its derivative in phi1 (phi0 = 1 - phi1, phi2 = 4 phi1 (1 - phi1)).
  const D0 = A0 * p0 + A1 * p1 + A2 * p2;
  const dD = -A0 + A1 + 4 * (p0 - p1) * A2;
  let b: [number, number, number];
  switch (band.type) {
    case 'peaking': {
      const G2 = A * A * A * A; // |H(f)|^2 = (A^2)^2
      const R1 = D0 * G2;
      const R2 = dD * G2;
      const B0 = A0;
      const B2 = (R1 - R2 * p1 - B0) / (4 * p1 * p1);
      const B1 = R2 + B0 + 4 * (p1 - p0) * B2;
      b = factorNumerator(B0, B1, B2);
      break;
    }
    case 'lowPass': {
      const B0 = A0;
      const B1 = (D0 * Q * Q - B0 * p0) / p1;
      const r0 = Math.sqrt(B0);
      const b0 = (r0 + Math.sqrt(Math.max(0, B1))) / 2;
      b = [b0, r0 - b0, 0];
      break;
    }
    case 'highPass': {
      const b0 = (Q * Math.sqrt(D0)) / (4 * p1);
      b = [b0, -2 * b0, b0];
      break;
    }
    case 'bandPass': {
      const R1 = D0;
      const R2 = dD;
      const B2 = (R1 - R2 * p1) / (4 * p1 * p1);
      const B1 = R2 + 4 * (p1 - p0) * B2;
      b = factorNumerator(0, B1, B2, -1);
      break;
    }
    case 'notch': {
      // g |1 - 2 cos w0 z^-1 + z^-2| at DC is g (2 - 2 cos w0) = g 4 sin^2(w0/2) = 4 g phi1(w0).
      const g = (1 + a1 + a2) / (4 * p1);
      b = [g, -2 * Math.cos(w0) * g, g];
      break;
    }
    default: {
      // Shelves: exact at DC, at f and at Nyquist (phi0 = 0, phi1 = 1, phi2 = 0 there).
      const B0 = A0 * analogPower(band, 0);
      const B1 = A1 * analogPower(band, sampleRateHz / 2);
      const B2 = (D0 * analogPower(band, band.frequency) - B0 * p0 - B1 * p1) / p2;
      b = factorNumerator(B0, B1, B2);
    }
  }
  return { b0: b[0], b1: b[1], b2: b[2], a1, a2 };
}
