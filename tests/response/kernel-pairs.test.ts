/**
 * The kernel takes the sections two at a time (the product of two factors as one polynomial in
 * u = 1 - cos t), and pairs only factors whose evaluation is well conditioned: two zeros or poles
 * next to the unit circle at the same frequency (a notch doubled for depth, stacked high-Q bands)
 * would otherwise lose about the product of their condition numbers instead of the sum.
 *
 * Reference: the definition of the cascade's response, H(z) = prod (b0 + b1 z^-1 + b2 z^-2) /
 * (1 + a1 z^-1 + a2 z^-2), evaluated directly in double precision, and the group delay of each
 * factor as Re(z^-1 (b1 + 2 b2 z^-1) / N(z)) (docs/references.md, "Group delay"). The direct
 * evaluation's own error is bounded by the perturbation bounds of tests/helpers/reference.ts
 * (`sensitivity`, `groupDelaySensitivity`), so the tolerance is a small multiple of those bounds:
 * large next to a notch, where any float64 evaluation loses digits, but far below what a badly
 * paired cascade loses there (whole orders of magnitude of |H|).
 */
import { describe, expect, it } from 'vitest';
import { designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import { packSections, type Section } from '../../src/design/section';
import { allocateComplexResponse, cascadeComplex, cascadeComplexJs, normalizedOmega, useWasmKernel } from '../../src/response/kernel';
import { EPS, groupDelaySensitivity, sensitivity } from '../helpers/reference';

const FS = 48000;
const band = (type: 'notch' | 'peaking', frequency: number, q: number, gainDb = 0) => designBand({ id: 'x', type, frequency, gainDb, q, enabled: true }, FS);

/** Probes at relative distances 1e-2 .. 1e-9 on both sides of f0, then a few spread ones. */
function around(f0: number): number[] {
  const f: number[] = [];
  for (let e = 2; e <= 9; e += 0.5) f.push(f0 * (1 + 10 ** -e), f0 * (1 - 10 ** -e));
  for (let k = 1; k <= 10; k++) f.push(f0 * Math.pow(2, k / 3), f0 / Math.pow(2, k / 3));
  return f;
}

/** H and tau of a cascade straight from the definition, in double precision. */
function direct(sections: readonly Section[], w: number): { re: number; im: number; tau: number } {
  const zr = Math.cos(w);
  const zi = -Math.sin(w); // z^-1
  const z2r = zr * zr - zi * zi;
  const z2i = 2 * zr * zi; // z^-2
  let hr = 1;
  let hi = 0;
  let tau = 0;
  const div = (ar: number, ai: number, br: number, bi: number) => {
    const m = br * br + bi * bi;
    return [(ar * br + ai * bi) / m, (ai * br - ar * bi) / m];
  };
  for (const s of sections) {
    const nr = s.b0 + s.b1 * zr + s.b2 * z2r;
    const ni = s.b1 * zi + s.b2 * z2i;
    const dr = 1 + s.a1 * zr + s.a2 * z2r;
    const di = s.a1 * zi + s.a2 * z2i;
    const [qr, qi] = div(nr, ni, dr, di);
    [hr, hi] = [hr * qr - hi * qi, hr * qi + hi * qr];
    tau += div(s.b1 * zr + 2 * s.b2 * z2r, s.b1 * zi + 2 * s.b2 * z2i, nr, ni)[0];
    tau -= div(s.a1 * zr + 2 * s.a2 * z2r, s.a1 * zi + 2 * s.a2 * z2i, dr, di)[0];
  }
  return { re: hr, im: hi, tau };
}

const CASES: { name: string; sections: Section[]; freqs: number[] }[] = [
  { name: 'a notch doubled (two Q 30 notches at 1 kHz) with a peaking band', sections: [...band('notch', 1000, 30), ...band('notch', 1000, 30), ...band('peaking', 500, 2, 6)], freqs: around(1000) },
  {
    name: 'four Q 20 peaking bands stacked at 50 Hz between calm crossover sections',
    sections: [
      ...designEdge({ family: 'linkwitz-riley', order: 4, frequency: 3000 }, 'lowPass', FS),
      ...band('peaking', 50, 20, 12),
      ...band('peaking', 50, 20, -12),
      ...band('peaking', 50, 20, 12),
      ...band('peaking', 50.5, 20, -12),
      ...designEdge({ family: 'butterworth', order: 4, frequency: 20 }, 'highPass', FS),
    ],
    freqs: around(50),
  },
  { name: 'three notches a hair apart, with an odd count of sections', sections: [...band('notch', 2000, 10), ...band('notch', 2000.01, 10), ...band('notch', 1999.99, 10)], freqs: around(2000) },
];

describe('pairs of sections keep the precision of the sections taken one by one', () => {
  for (const c of CASES) {
    for (const kernel of ['wasm', 'js'] as const) {
      it(`${kernel}: ${c.name}`, () => {
        useWasmKernel(true);
        const omega = normalizedOmega(c.freqs, FS);
        const out = allocateComplexResponse(omega.length);
        const packed = packSections(c.sections);
        if (kernel === 'js') cascadeComplexJs(packed, c.sections.length, omega, out);
        else cascadeComplex(packed, c.sections.length, omega, out);
        for (let i = 0; i < omega.length; i++) {
          const ref = direct(c.sections, omega[i]);
          const mag = Math.hypot(ref.re, ref.im);
          const scale = Math.pow(2, out.log2Scale[i]);
          const at = `${c.freqs[i]} Hz`;
          // 64 ulps x the direct evaluation's bound (the kernel's own error is smaller still).
          expect(Math.hypot(out.re[i] * scale - ref.re, out.im[i] * scale - ref.im), at).toBeLessThanOrEqual(64 * EPS * sensitivity(c.sections, omega[i]) * mag);
          expect(Math.abs(out.groupDelaySamples[i] - ref.tau), at).toBeLessThanOrEqual(64 * EPS * groupDelaySensitivity(c.sections, omega[i]) + 1e-12 * Math.abs(ref.tau));
        }
      });
    }
  }
});
