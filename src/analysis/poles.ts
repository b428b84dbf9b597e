/**
 * Poles and zeros of sections, and stability. A section's poles are the roots of
 * z^2 + a1 z + a2 (of z + a1 for a first-order one); it is stable when every pole lies strictly
 * inside the unit circle (for a second-order section: |a2| < 1 and |a1| < 1 + a2, the stability
 * triangle of any DSP text).
 */
import type { Section } from '../design/section';

export interface Root {
  re: number;
  im: number;
}

/** Roots of x^2 + p x + q (or of p' x + q' when `firstOrder`), the stable quadratic formula. */
function quadraticRoots(c2: number, c1: number, c0: number): Root[] {
  if (c2 === 0) {
    if (c1 === 0) return [];
    return [{ re: -c0 / c1, im: 0 }];
  }
  const p = c1 / c2;
  const q = c0 / c2;
  const disc = p * p - 4 * q;
  if (disc >= 0) {
    // Avoid cancellation: r1 = (-p - sign(p) sqrt(disc)) / 2, r2 = q / r1.
    const sq = Math.sqrt(disc);
    const r1 = p >= 0 ? (-p - sq) / 2 : (-p + sq) / 2;
    const r2 = r1 !== 0 ? q / r1 : -p - r1;
    return [
      { re: r1, im: 0 },
      { re: r2, im: 0 },
    ];
  }
  const im = Math.sqrt(-disc) / 2;
  return [
    { re: -p / 2, im },
    { re: -p / 2, im: -im },
  ];
}

/** Poles in z. A section with a2 = 0 has one pole (at -a1) and one at the origin, which is left out. */
export function sectionPoles(s: Section): Root[] {
  return s.a2 === 0 ? [{ re: -s.a1, im: 0 }] : quadraticRoots(1, s.a1, s.a2);
}

/** Zeros in z (roots of b0 z^2 + b1 z + b2). */
export function sectionZeros(s: Section): Root[] {
  if (s.b2 === 0) return s.b0 === 0 ? [] : [{ re: -s.b1 / s.b0, im: 0 }];
  if (s.b0 === 0) return quadraticRoots(0, s.b1, s.b2);
  return quadraticRoots(s.b0, s.b1, s.b2);
}

export function poleRadius(s: Section): number {
  let r = 0;
  for (const p of sectionPoles(s)) r = Math.max(r, Math.hypot(p.re, p.im));
  return r;
}

/** The largest pole radius of a cascade (0 for none); >= 1 means unstable. */
export function largestPoleRadius(sections: readonly Section[]): number {
  let r = 0;
  for (const s of sections) r = Math.max(r, poleRadius(s));
  return r;
}

export function isStable(s: Section): boolean {
  return poleRadius(s) < 1;
}
