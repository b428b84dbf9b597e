/**
 * The one coefficient type of the project.
 *
 * A section is the biquad
 *
 *     H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2)
 *
 * normalized so that a0 = 1, with the difference equation
 *
 *     y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] - a1 y[n-1] - a2 y[n-2].
 *
 * A first-order section has b2 = a2 = 0. This is the convention of the plan file, the command
 * line and every export unless a board profile says otherwise.
 */
export interface Section {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/** The numbers per section in a packed cascade (see `packSections`). */
export const SECTION_STRIDE = 5;

/** Divides by a0 (the one place where normalization happens). */
export function normalizeSection(b0: number, b1: number, b2: number, a0: number, a1: number, a2: number): Section {
  return { b0: b0 / a0, b1: b1 / a0, b2: b2 / a0, a1: a1 / a0, a2: a2 / a0 };
}

/** The section with its numerator (b0 b1 b2) times `factor`: its response times `factor` at every frequency. */
export function scaleNumerator<T extends Section>(s: T, factor: number): T {
  return { ...s, b0: s.b0 * factor, b1: s.b1 * factor, b2: s.b2 * factor };
}

/** Packs sections as [b0, b1, b2, a1, a2] per section into one Float64Array for the response kernel. */
export function packSections(sections: readonly Section[], into?: Float64Array): Float64Array {
  const out = into && into.length >= sections.length * SECTION_STRIDE ? into : new Float64Array(sections.length * SECTION_STRIDE);
  for (let i = 0; i < sections.length; i++) {
    const s = sections[i];
    const o = i * SECTION_STRIDE;
    out[o] = s.b0;
    out[o + 1] = s.b1;
    out[o + 2] = s.b2;
    out[o + 3] = s.a1;
    out[o + 4] = s.a2;
  }
  return out;
}

export function isFiniteSection(s: Section): boolean {
  return Number.isFinite(s.b0) && Number.isFinite(s.b1) && Number.isFinite(s.b2) && Number.isFinite(s.a1) && Number.isFinite(s.a2);
}
