/**
 * The analog (s-domain) prototype of every band and edge: the design the user specified, before
 * any digital mapping. A digital section departs from it as its frequency nears Nyquist (cramping):
 * the bilinear transform squeezes the whole analog axis into 0 .. fs/2, so a band's upper skirt is
 * pulled down and every bilinear response is forced to its analog value at infinity at Nyquist.
 *
 * Each prototype is written in the normalized s of its reference frequency f_ref (s = j f / f_ref):
 * - bands: the Audio EQ Cookbook's analog prototypes (R. Bristow-Johnson; docs/references.md
 *   "Audio EQ Cookbook"), the H(s) the cookbook's digital formulas are the bilinear transform of,
 *   with f_ref the band frequency; first-order types with their pre-warped frequency;
 * - edges: the Butterworth / Bessel poles of prototypes.ts (a Linkwitz-Riley edge uses each
 *   Butterworth pole twice), with f_ref the edge frequency, as crossover.ts maps them.
 * Raw bands have no analog prototype.
 */
import { DEFAULT_Q, DEFAULT_SLOPE } from './cookbook';
import { analogSection, edgePrototype, type AnalogSection } from './crossover';
import type { Band, Crossover, EdgeKind } from '../plan/types';

export type { AnalogSection } from './crossover';

/** One band's or edge's analog prototype: sections in s = j f / frequencyHz, times `gain`. */
export interface AnalogPrototype {
  frequencyHz: number;
  gain: number;
  sections: AnalogSection[];
}

const second = (B: [number, number, number], A: [number, number, number]): AnalogSection => ({ B, A, firstOrder: false });
const first = (B1: number, B2: number, A1: number, A2: number): AnalogSection => ({ B: [0, B1, B2], A: [0, A1, A2], firstOrder: true });

/**
 * The 1/Q a shelf's analog prototype uses: its own q, or from the slope S (cookbook:
 * 1/Q = sqrt((A + 1/A)(1/S - 1) + 2)).
 */
export function shelfInverseQ(band: Band, A: number): number {
  if (band.q !== undefined) return 1 / band.q;
  const S = band.slope ?? DEFAULT_SLOPE;
  return Math.sqrt(Math.max(0, (A + 1 / A) * (1 / S - 1) + 2));
}

/** The analog prototype of a band (cookbook H(s), s normalized to the band frequency); null for raw bands. */
export function bandPrototype(band: Band): AnalogPrototype | null {
  if (band.type === 'raw') return null;
  const q = band.q ?? DEFAULT_Q;
  const A = Math.pow(10, (band.gainDb ?? 0) / 40);
  const one = (s: AnalogSection): AnalogPrototype => ({ frequencyHz: band.frequency, gain: 1, sections: [s] });
  switch (band.type) {
    case 'lowPass':
      return one(second([0, 0, 1], [1, 1 / q, 1])); // 1 / (s^2 + s/Q + 1)
    case 'highPass':
      return one(second([1, 0, 0], [1, 1 / q, 1])); // s^2 / (s^2 + s/Q + 1)
    case 'bandPass':
      return one(second([0, 1 / q, 0], [1, 1 / q, 1])); // (s/Q) / (s^2 + s/Q + 1), 0 dB peak
    case 'notch':
      return one(second([1, 0, 1], [1, 1 / q, 1])); // (s^2 + 1) / (s^2 + s/Q + 1)
    case 'allPass':
      return one(second([1, -1 / q, 1], [1, 1 / q, 1])); // (s^2 - s/Q + 1) / (s^2 + s/Q + 1)
    case 'peaking':
      return one(second([1, A / q, 1], [1, 1 / (A * q), 1])); // (s^2 + s A/Q + 1) / (s^2 + s/(A Q) + 1)
    case 'lowShelf': {
      const k = Math.sqrt(A) * shelfInverseQ(band, A);
      // A (s^2 + (sqrt A / Q) s + A) / (A s^2 + (sqrt A / Q) s + 1)
      return { frequencyHz: band.frequency, gain: A, sections: [second([1, k, A], [A, k, 1])] };
    }
    case 'highShelf': {
      const k = Math.sqrt(A) * shelfInverseQ(band, A);
      // A (A s^2 + (sqrt A / Q) s + 1) / (s^2 + (sqrt A / Q) s + A)
      return { frequencyHz: band.frequency, gain: A, sections: [second([A, k, 1], [1, k, A])] };
    }
    case 'lowPass1':
      return one(first(0, 1, 1, 1)); // 1 / (s + 1)
    case 'highPass1':
      return one(first(1, 0, 1, 1)); // s / (s + 1)
    case 'allPass1':
      return one(first(-1, 1, 1, 1)); // (1 - s) / (1 + s): -90 degrees at f, as the digital one
  }
}

/** The analog prototype of an edge: its family's poles at 1 rad/s = the edge frequency. */
export function edgeAnalogPrototype(edge: Crossover, kind: EdgeKind): AnalogPrototype {
  const { poles, repeat } = edgePrototype(edge);
  const sections: AnalogSection[] = [];
  for (const p of poles) for (let r = 0; r < repeat; r++) sections.push(analogSection(p, kind));
  return { frequencyHz: edge.frequency, gain: 1, sections };
}

/** H(j f / f_ref) of prototypes multiplied together, with the exact group delay (s). */
export interface AnalogComplex {
  re: Float64Array;
  im: Float64Array;
  /** -d arg H / d(2 pi f), seconds. */
  groupDelayS: Float64Array;
  /** d ln|H| / d(2 pi f), per rad/s: with the group delay, dH/dw = H (logSlope - j groupDelay), for sums. */
  logSlope: Float64Array;
}

/**
 * The product of analog prototypes on a frequency grid (Hz), times `gain` and a pure delay.
 * Each polynomial P(s) = c0 s^2 + c1 s + c2 is evaluated at s = j x (x = f / f_ref):
 * P = (c2 - c0 x^2) + j c1 x; its phase derivative d arg P / dw = Im(P'(s) j / P) / w_ref with
 * P'(s) = 2 c0 s + c1, so the group delay is exact, with no finite differences.
 */
export function analogComplex(prototypes: readonly AnalogPrototype[], frequenciesHz: ArrayLike<number>, gain = 1, delayS = 0): AnalogComplex {
  const n = frequenciesHz.length;
  const out: AnalogComplex = { re: new Float64Array(n), im: new Float64Array(n), groupDelayS: new Float64Array(n), logSlope: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    const f = frequenciesHz[i];
    let hr = gain;
    let hi = 0;
    let tau = delayS;
    let slope = 0;
    for (const p of prototypes) {
      const x = f / p.frequencyHz;
      const wRef = 2 * Math.PI * p.frequencyHz;
      hr *= p.gain;
      hi *= p.gain;
      for (const s of p.sections) {
        const [n0, n1, n2] = s.B;
        const [d0, d1, d2] = s.A;
        const nr = n2 - n0 * x * x;
        const ni = n1 * x;
        const dr = d2 - d0 * x * x;
        const di = d1 * x;
        // H *= N / D.
        const dd = dr * dr + di * di;
        const qr = (nr * dr + ni * di) / dd;
        const qi = (ni * dr - nr * di) / dd;
        const tr = hr * qr - hi * qi;
        hi = hr * qi + hi * qr;
        hr = tr;
        // d arg P / dw = Im(j P'(jx) / P(jx)) / wRef = Re(P'/P) / wRef, with P'(jx) = c1 + j 2 c0 x:
        // Re(P'/P) = (c1 Re P + 2 c0 x Im P) / |P|^2.
        const numSlope = (n1 * nr + 2 * n0 * x * ni) / (nr * nr + ni * ni);
        const denSlope = (d1 * dr + 2 * d0 * x * di) / dd;
        tau -= (numSlope - denSlope) / wRef;
        // d ln|P| / dw = Re(j P'/P) / wRef = -Im(P'/P) / wRef, Im(P'/P) = (2 c0 x Re P - c1 Im P) / |P|^2.
        const numLog = (2 * n0 * x * nr - n1 * ni) / (nr * nr + ni * ni);
        const denLog = (2 * d0 * x * dr - d1 * di) / dd;
        slope -= (numLog - denLog) / wRef;
      }
    }
    out.re[i] = hr;
    out.im[i] = hi;
    out.groupDelayS[i] = tau;
    out.logSlope[i] = slope;
  }
  // A pure delay multiplies by e^{-j 2 pi f D}.
  if (delayS !== 0) {
    for (let i = 0; i < n; i++) {
      const ph = -2 * Math.PI * frequenciesHz[i] * delayS;
      const c = Math.cos(ph);
      const s = Math.sin(ph);
      const r = out.re[i];
      out.re[i] = r * c - out.im[i] * s;
      out.im[i] = r * s + out.im[i] * c;
    }
  }
  return out;
}

/** 20 log10 |H| of an analog response. */
export function analogMagnitudeDb(h: AnalogComplex): Float64Array {
  const out = new Float64Array(h.re.length);
  for (let i = 0; i < out.length; i++) out[i] = 10 * Math.log10(h.re[i] * h.re[i] + h.im[i] * h.im[i]);
  return out;
}

/**
 * What the bilinear transform pre-warped at f does to an analog low-frequency group delay: near
 * DC the digital frequency maps to W = tan(w/2) / tan(wc/2), so the delay is scaled by
 * dW/dw at 0 over the analog 1 / wc: wc / (2 tan(wc / 2)), wc = 2 pi f / fs. A Bessel edge
 * normalized for delay keeps its 1 / (2 pi f) only while this is near 1 (0.993 at 2.2 kHz,
 * 0.605 at 16 kHz at 48 kHz; docs/references.md, "Analog prototypes and cramping").
 */
export function bilinearLowFrequencyDelayRatio(frequencyHz: number, sampleRateHz: number): number {
  const wc = (2 * Math.PI * frequencyHz) / sampleRateHz;
  return wc / (2 * Math.tan(wc / 2));
}
