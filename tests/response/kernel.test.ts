/**
 * The response kernel, both implementations (WebAssembly SIMD and the JavaScript fallback),
 * against the 50-digit references of the fixtures, against each other, and on cascades deep
 * enough to need the kernel's rescaling (products far below 1e-308).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { designEdge } from '../../src/design/crossover';
import { designedResponse } from '../../src/response/chain-response';
import { packSections, type Section } from '../../src/design/section';
import { allocateKernelOutput, cascadeResponse, cascadeResponseJs, normalizedOmega, useWasmKernel, wasmKernel, type KernelOutput } from '../../src/response/kernel';
import { angleDiffDeg, DB_PER_NEPER, EPS, loadFixture, RAD2DEG, sensitivity, sosToSections, type EdgeFixtureCase } from '../helpers/reference';

type EdgeCase = EdgeFixtureCase;

type Kernel = 'js' | 'wasm';
function evaluate(kernel: Kernel, sections: readonly Section[], omega: Float64Array): KernelOutput {
  const out = allocateKernelOutput(omega.length);
  if (kernel === 'js') cascadeResponseJs(packSections(sections), sections.length, omega, out);
  else {
    useWasmKernel(true);
    expect(omega.length).toBeGreaterThanOrEqual(32); // the WebAssembly path runs from 32 points
    cascadeResponse(packSections(sections), sections.length, omega, out);
  }
  return out;
}
afterAll(() => useWasmKernel(true));

it('WebAssembly SIMD is available under Node 20 (so the wasm cases below really run it)', () => {
  useWasmKernel(true);
  expect(wasmKernel()).not.toBeNull();
});

/** The fixture's frequencies repeated to 36 points (>= 32) so the WebAssembly path is taken. */
function tiled(freqs: number[]): number[] {
  const out: number[] = [];
  while (out.length < 36) out.push(...freqs);
  return out;
}

for (const kernel of ['js', 'wasm'] as Kernel[]) {
  describe(`${kernel} kernel against the 50-digit references`, () => {
    for (const name of ['butterworth.json', 'bessel.json', 'linkwitz-riley.json']) {
      const fx = loadFixture<EdgeCase>(name);
      it(`${name}: scipy's sections (8 ulps x sensitivity) and our designs (64 ulps x sensitivity), group delay 1e-8`, () => {
        // Tolerances and their reasons: see edges-reference.test.ts.
        for (const c of fx.cases) {
          const freqs = tiled(c.freqs);
          const omega = normalizedOmega(freqs, c.sampleRate);
          const n = c.freqs.length;
          for (const [sections, ref, ulps] of [
            [sosToSections(c.sos), c.sosExact, 8],
            [designEdge({ family: c.family, order: c.order, frequency: c.frequency, normalization: c.normalization }, c.kind, c.sampleRate), c.design, 64],
          ] as const) {
            const k = evaluate(kernel, sections, omega);
            freqs.forEach((f, j) => {
              const i = j % n;
              const u = ulps * EPS * sensitivity(sections, omega[j]);
              const what = `${c.call} at ${f}`;
              expect(Math.abs(k.magnitudeDb[j] - ref.magnitudeDb[i]), what).toBeLessThanOrEqual(DB_PER_NEPER * u + 1e-12);
              expect(angleDiffDeg(k.phaseRad[j] * RAD2DEG, ref.phaseDeg[i]), what).toBeLessThanOrEqual(RAD2DEG * u + 1e-12);
              expect(Math.abs(k.groupDelaySamples[j] - ref.groupDelaySamples[i]), what).toBeLessThanOrEqual(1e-8 * Math.abs(ref.groupDelaySamples[i]) + 1e-12);
            });
          }
        }
      });
    }
  });
}

describe('WebAssembly and JavaScript kernels agree', () => {
  it('on every fixture design over a dense grid, 0 Hz and Nyquist included', () => {
    // Not bit-identical: the SIMD loop forms tau and the slope over |N|^2 |D|^2 in one division.
    // Both are held to the float64 evaluation bound (16 ulps x sensitivity) and 1e-9 relative for
    // tau and the slope, where both kernels are finite. At exact zeros (a high-pass at 0 Hz, a
    // low-pass at Nyquist) both must give -Infinity dB, never NaN.
    for (const name of ['butterworth.json', 'bessel.json', 'linkwitz-riley.json']) {
      for (const c of loadFixture<EdgeCase>(name).cases) {
        const secs = designEdge({ family: c.family, order: c.order, frequency: c.frequency, normalization: c.normalization }, c.kind, c.sampleRate);
        const omega = normalizedOmega(Array.from({ length: 101 }, (_, i) => (i / 100) * 0.5 * c.sampleRate), c.sampleRate);
        const a = evaluate('js', secs, omega);
        const b = evaluate('wasm', secs, omega);
        for (let i = 0; i < omega.length; i++) {
          const what = `${c.call} at w = ${omega[i]}`;
          expect(Number.isNaN(b.magnitudeDb[i]), what).toBe(false);
          expect(Number.isNaN(b.phaseRad[i]), what).toBe(false);
          if (a.magnitudeDb[i] === -Infinity) {
            expect(b.magnitudeDb[i], what).toBe(-Infinity);
            continue;
          }
          const u = 16 * EPS * sensitivity(secs, omega[i]);
          expect(Math.abs(a.magnitudeDb[i] - b.magnitudeDb[i]), what).toBeLessThanOrEqual(DB_PER_NEPER * u + 1e-12);
          expect(angleDiffDeg(a.phaseRad[i] * RAD2DEG, b.phaseRad[i] * RAD2DEG), what).toBeLessThanOrEqual(RAD2DEG * u + 1e-12);
          if (Number.isFinite(a.groupDelaySamples[i])) expect(Math.abs(a.groupDelaySamples[i] - b.groupDelaySamples[i]), what).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(a.groupDelaySamples[i])));
          if (Number.isFinite(a.logSlope[i])) expect(Math.abs(a.logSlope[i] - b.logSlope[i]), what).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(a.logSlope[i])));
        }
      }
    }
  });
  it('an exact zero in one output does not turn the sum NaN (found by this suite: the SIMD loop gave NaN there)', () => {
    // LR4 low-pass + high-pass at 48 kHz on 40 points up to Nyquist: the low-pass has a 4th-order
    // zero at 24 kHz (the probe, 2 pi 24000 / 48000 in doubles, lands within an ulp of pi, so the
    // low-pass is either exactly 0 or far below -600 dB), the high-pass 1; the sum there is the
    // high-pass alone (0 dB, Lipshitz and Vanderkooy).
    const lp = designEdge({ family: 'linkwitz-riley', order: 4, frequency: 2200 }, 'lowPass', 48000);
    const f = Array.from({ length: 40 }, (_, i) => 1000 * Math.pow(24, i / 39));
    f[39] = 24000;
    const k = evaluate('wasm', lp, normalizedOmega(f, 48000));
    expect(k.magnitudeDb[39]).toBeLessThan(-600);
    expect(Number.isNaN(k.phaseRad[39])).toBe(false);
    const hp = designEdge({ family: 'linkwitz-riley', order: 4, frequency: 2200 }, 'highPass', 48000);
    const outs = [lp, hp].map((sections, i) => ({ id: `o${i}`, gain: 1, delayMs: 0, delaySamplesExact: 0, mute: false, sections: sections.map((x) => ({ ...x, from: 'x' })) }));
    const r = designedResponse(outs, f, 48000);
    r.sum.magnitudeDb.forEach((m, i) => expect(Math.abs(m), `sum at ${f[i]} Hz`).toBeLessThan(1e-9));
  });
  it('an odd number of points (the SIMD lane padding) gives the same values as an even one', () => {
    const secs = designEdge({ family: 'butterworth', order: 5, frequency: 700 }, 'lowPass', 48000);
    const f = Array.from({ length: 41 }, (_, i) => 20 * Math.pow(1000, i / 40));
    const odd = evaluate('wasm', secs, normalizedOmega(f, 48000));
    const even = evaluate('wasm', secs, normalizedOmega([...f, 123], 48000));
    for (let i = 0; i < f.length; i++) expect(odd.magnitudeDb[i]).toBe(even.magnitudeDb[i]);
  });
});

describe('deep cascades: the running product is rescaled, not underflowed', () => {
  // 100 LR8 low-pass edges at 200 Hz (400 sections) evaluated up to 20 kHz reach about -30000 dB:
  // far below the smallest double (1e-308 = -6160 dB). Independent reference: the sum of each
  // section's own magnitude in dB (each one well inside double range).
  const one = designEdge({ family: 'linkwitz-riley', order: 8, frequency: 200 }, 'lowPass', 48000);
  const many: Section[] = [];
  for (let i = 0; i < 100; i++) many.push(...one);
  const f = Array.from({ length: 40 }, (_, i) => 50 * Math.pow(400, i / 39));
  const omega = normalizedOmega(f, 48000);
  for (const kernel of ['js', 'wasm'] as Kernel[]) {
    it(`${kernel}: magnitude = sum of per-section dB, phase and group delay = sums too`, () => {
      const k = evaluate(kernel, many, omega);
      const single = one.map((s) => evaluate(kernel, [s], omega));
      f.forEach((fr, i) => {
        let db = 0;
        let tau = 0;
        let ph = 0;
        for (const s of single) {
          db += s.magnitudeDb[i];
          tau += s.groupDelaySamples[i];
          ph += s.phaseRad[i];
        }
        db *= 100;
        tau *= 100;
        ph *= 100;
        expect(Number.isFinite(k.magnitudeDb[i])).toBe(true);
        // 400 terms of rounding: 1e-9 relative.
        expect(Math.abs(k.magnitudeDb[i] - db), `at ${fr}`).toBeLessThanOrEqual(1e-9 * Math.abs(db) + 1e-9);
        expect(Math.abs(k.groupDelaySamples[i] - tau)).toBeLessThanOrEqual(1e-9 * Math.abs(tau));
        expect(angleDiffDeg(k.phaseRad[i] * RAD2DEG, ph * RAD2DEG)).toBeLessThanOrEqual(1e-6);
      });
      expect(k.magnitudeDb[f.length - 1]).toBeLessThan(-20000);
    });
  }
});

/**
 * The kernel near z = 1 and z = -1: sections probed a hair above 0 Hz and a hair below Nyquist,
 * where N(e^{jw}) written in powers of cos w and sin w cancels (a high-pass's zeros at z = 1, a
 * low-pass's at z = -1, poles crowding either point). Reference: the same float64 sections
 * evaluated at 50 digits with mpmath (tests/reference/fixtures/extreme-probes.json, written by
 * make_fixtures.py from scipy.signal.butter / bessel and the Audio EQ Cookbook).
 *
 * Tolerances: the only error left is the probe itself, w = 2 pi f / fs rounded to a double
 * (relative 1e-16). Near Nyquist the kernel works with t = w - pi, exact by Sterbenz's lemma but
 * carrying w's absolute error of about 4e-16 rad: relative 6e-11 of t at 0.05 Hz from Nyquist at
 * 48 kHz, which a zero of order 6 there turns into 4e-10 relative, 3e-9 dB. Hence 1e-8 dB and
 * 1e-6 degrees; group delay to 1e-8 relative (it is far less sensitive).
 */
interface ProbeCase {
  name: string;
  call: string;
  sampleRate: number;
  sos: number[][];
  freqs: number[];
  sosExact: { magnitudeDb: number[]; phaseDeg: number[]; groupDelaySamples: number[] };
}

const fixture = loadFixture<ProbeCase>('extreme-probes.json');
const toSections = (sos: number[][]): Section[] => sos.map(([b0, b1, b2, , a1, a2]) => ({ b0, b1, b2, a1, a2 }));

describe(`kernel near 0 Hz and Nyquist vs 50-digit mpmath (scipy ${fixture.meta.scipy}, mpmath ${fixture.meta.mpmath})`, () => {
  for (const c of fixture.cases) {
    for (const kernel of ['js', 'wasm'] as const) {
      it(`${kernel}: ${c.call}`, () => {
        const sections = toSections(c.sos);
        const packed = packSections(sections);
        // The WebAssembly path runs from 32 points up: repeat the probes to get there.
        const copies = kernel === 'wasm' ? Math.ceil(32 / c.freqs.length) : 1;
        const freqs = Array.from({ length: copies }, () => c.freqs).flat();
        const omega = normalizedOmega(freqs, c.sampleRate);
        const out = allocateKernelOutput(freqs.length);
        if (kernel === 'js') cascadeResponseJs(packed, sections.length, omega, out);
        else cascadeResponse(packed, sections.length, omega, out);
        c.freqs.forEach((f, i) => {
          const at = `${f} Hz`;
          expect(Math.abs(out.magnitudeDb[i] - c.sosExact.magnitudeDb[i]), at).toBeLessThan(1e-8);
          expect(angleDiffDeg((out.phaseRad[i] * 180) / Math.PI, c.sosExact.phaseDeg[i]), at).toBeLessThan(1e-6);
          const g = c.sosExact.groupDelaySamples[i];
          expect(Math.abs(out.groupDelaySamples[i] - g), at).toBeLessThan(1e-8 * Math.max(1, Math.abs(g)));
        });
      });
    }
  }
});
