/**
 * Crossover edges: Butterworth 1-8, Linkwitz-Riley 2/4/6/8 (a Butterworth of half the order,
 * squared: Lipshitz and Vanderkooy, JAES 34(11), 1986) and Bessel 1-8 in three normalizations.
 *
 * Digital sections come from the analog prototype by the bilinear transform pre-warped at the edge
 * frequency, the design of scipy.signal.butter / scipy.signal.bessel with `fs=`:
 * s_prototype = (1/K) (1 - z^-1) / (1 + z^-1), K = tan(pi f / fs).
 */
import type { Crossover, EdgeKind } from '../plan/types';
import { normalizeSection, type Section } from './section';
import { prototypePoles, type Pole } from './prototypes';

/**
 * An analog section in the prototype's s: (B0 s^2 + B1 s + B2) / (A0 s^2 + A1 s + A2); a first-order
 * one has B0 = A0 = 0 and is read as (B1 s + B2) / (A1 s + A2).
 */
export interface AnalogSection {
  B: [number, number, number];
  A: [number, number, number];
  firstOrder: boolean;
}

/** Analog sections of one pole (pair), low-pass with unit DC gain or high-pass (s -> 1/s) with unit HF gain. */
export function analogSection(p: Pole, kind: EdgeKind): AnalogSection {
  if (p.im === 0) {
    const sigma = -p.re;
    // Low-pass sigma / (s + sigma); high-pass s / (s + 1/sigma).
    return kind === 'lowPass'
      ? { B: [0, 0, sigma], A: [0, 1, sigma], firstOrder: true }
      : { B: [0, 1, 0], A: [0, 1, 1 / sigma], firstOrder: true };
  }
  const w2 = p.re * p.re + p.im * p.im; // w0^2
  const bw = -2 * p.re; // w0 / Q
  // Low-pass w0^2 / (s^2 + (w0/Q) s + w0^2); high-pass s^2 / (s^2 + (1/(Q w0)) s + 1/w0^2).
  return kind === 'lowPass'
    ? { B: [0, 0, w2], A: [1, bw, w2], firstOrder: false }
    : { B: [1, 0, 0], A: [1, bw / w2, 1 / w2], firstOrder: false };
}

/** Bilinear transform s = c (1 - z^-1) / (1 + z^-1) of one analog section, normalized by a0. */
function bilinear(sec: AnalogSection, c: number): Section {
  const c2 = c * c;
  if (sec.firstOrder) {
    const [, B1, B2] = sec.B;
    const [, A1, A2] = sec.A;
    return normalizeSection(B1 * c + B2, B2 - B1 * c, 0, A1 * c + A2, A2 - A1 * c, 0);
  }
  const [B0, B1, B2] = sec.B;
  const [A0, A1, A2] = sec.A;
  return normalizeSection(
    B0 * c2 + B1 * c + B2,
    2 * (B2 - B0 * c2),
    B0 * c2 - B1 * c + B2,
    A0 * c2 + A1 * c + A2,
    2 * (A2 - A0 * c2),
    A0 * c2 - A1 * c + A2,
  );
}

/** The analog prototype poles of an edge (for a Linkwitz-Riley edge: the Butterworth's, each used twice). */
export function edgePrototype(edge: Crossover): { poles: Pole[]; repeat: number } {
  switch (edge.family) {
    case 'butterworth':
      return { poles: prototypePoles('butterworth', edge.order), repeat: 1 };
    case 'linkwitz-riley':
      return { poles: prototypePoles('butterworth', edge.order / 2), repeat: 2 };
    case 'bessel':
      return { poles: prototypePoles('bessel', edge.order, edge.normalization ?? 'phase'), repeat: 1 };
  }
}

/** The digital sections of one edge at a sample rate, first-order section first, then by increasing Q. */
export function designEdge(edge: Crossover, kind: EdgeKind, sampleRateHz: number): Section[] {
  const { poles, repeat } = edgePrototype(edge);
  // Pre-warp: the prototype's 1 rad/s lands exactly on the edge frequency.
  const K = Math.tan((Math.PI * edge.frequency) / sampleRateHz);
  const c = 1 / K;
  const sections: Section[] = [];
  for (const p of poles) {
    const s = bilinear(analogSection(p, kind), c);
    for (let r = 0; r < repeat; r++) sections.push({ ...s });
  }
  return sections;
}
