/**
 * The complex core: the WebAssembly and JavaScript kernels give the same bits, prepared grids are
 * reused only for the same frequencies, deep stop bands keep their value through a sum, and a
 * response multiplied in adds its group delay and slope.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import { packSections, type Section } from '../../src/design/section';
import {
  allocateComplexResponse,
  cascadeComplex,
  cascadeComplexJs,
  normalizedOmega,
  presentMagnitudePhase,
  useWasmKernel,
  wasmKernel,
  type ComplexResponse,
} from '../../src/response/kernel';
import { chainComplexResponse, logFrequencies, multiplyComplexInto, sumComplex } from '../../src/response/chain-response';

const FS = 96000;
afterAll(() => useWasmKernel(true));

function mixedSections(): Section[] {
  const s: Section[] = [];
  s.push(...designEdge({ family: 'bessel', order: 8, frequency: 20, normalization: 'magnitude' }, 'highPass', FS));
  s.push(...designEdge({ family: 'linkwitz-riley', order: 8, frequency: 2500 }, 'lowPass', FS));
  for (const type of ['peaking', 'lowShelf', 'highShelf', 'notch', 'allPass', 'bandPass', 'lowPass1', 'allPass1', 'highPass1'] as const) {
    s.push(...designBand({ id: type, type, frequency: 700, gainDb: 9, q: 3, enabled: true }, FS));
  }
  return s;
}

const FIELDS = ['re', 'im', 'log2Scale', 'groupDelaySamples', 'logSlope'] as const;

function both(sections: readonly Section[], omega: Float64Array): [ComplexResponse, ComplexResponse] {
  useWasmKernel(true);
  expect(wasmKernel()).not.toBeNull();
  expect(omega.length).toBeGreaterThanOrEqual(32); // the WebAssembly path runs from 32 points
  const packed = packSections(sections);
  const js = allocateComplexResponse(omega.length);
  const wa = allocateComplexResponse(omega.length);
  cascadeComplexJs(packed, sections.length, omega, js);
  cascadeComplex(packed, sections.length, omega, wa);
  return [js, wa];
}

function expectSameBits(a: ComplexResponse, b: ComplexResponse, what: string): void {
  for (const f of FIELDS) for (let i = 0; i < a.re.length; i++) expect(Object.is(a[f][i], b[f][i]), `${what}: ${f}[${i}] ${a[f][i]} vs ${b[f][i]}`).toBe(true);
}

describe('WebAssembly and JavaScript kernels give the same bits', () => {
  it('on ascending grids of odd and even length (the SIMD lane padding)', () => {
    const secs = mixedSections();
    for (const n of [33, 64, 1001]) {
      const [js, wa] = both(secs, normalizedOmega(logFrequencies(n, 5, 47000), FS));
      expectSameBits(js, wa, `${n} points`);
    }
  });
  it('on an unordered grid with 0 Hz, Nyquist, negative and aliased frequencies (exact zeros: H = 0, group delay NaN)', () => {
    const secs = mixedSections();
    const f = [48000, 0, -300, 700, 96000 + 1000, 47999.99, 0.001, 12000, 24000, 23999, 24001, -47000, 5, 150000];
    while (f.length < 41) f.push(37 * f.length * f.length);
    const [js, wa] = both(secs, normalizedOmega(f, FS));
    expectSameBits(js, wa, 'unordered');
    // The first-order high-pass is exactly 0 at 0 Hz (b0 + b1 = 0): H = 0 and no group delay.
    expect(js.re[1] === 0 && js.im[1] === 0).toBe(true);
    expect(Number.isNaN(js.groupDelaySamples[1])).toBe(true);
  });
  it('on cascades deep enough to need a power-of-two scale (400 sections, far below 1e-308)', () => {
    const one = designEdge({ family: 'linkwitz-riley', order: 8, frequency: 200 }, 'lowPass', 48000);
    const many: Section[] = [];
    for (let i = 0; i < 100; i++) many.push(...one);
    const omega = normalizedOmega(logFrequencies(40, 50, 20000), 48000);
    const [js, wa] = both(many, omega);
    expectSameBits(js, wa, 'deep');
    expect(js.log2Scale[39]).toBeLessThan(-1000);
    // 20 kHz: 100 x LR8 at 200 Hz; each LR8 is about -320 dB there (48 dB/octave x 6.6 octaves),
    // so the whole is far beyond the double range, yet the presented magnitude is finite.
    const db = new Float64Array(40);
    presentMagnitudePhase(js, db, new Float64Array(40));
    expect(db[39]).toBeLessThan(-20000);
    expect(Number.isFinite(db[39])).toBe(true);
  });
});

describe('prepared grids', () => {
  it('a grid changed in place is prepared again (the cache compares values, not the array)', () => {
    const secs = mixedSections();
    const packed = packSections(secs);
    const omega = normalizedOmega(logFrequencies(64, 20, 20000), FS);
    const out = allocateComplexResponse(64);
    const ref = allocateComplexResponse(64);
    cascadeComplex(packed, secs.length, omega, out);
    for (let i = 0; i < 64; i++) omega[i] *= 1.5;
    cascadeComplex(packed, secs.length, omega, out);
    cascadeComplexJs(packed, secs.length, omega, ref);
    expectSameBits(ref, out, 'after the change');
  });
  it('many grids in turn (more than are kept) all give the JavaScript kernel\'s bits', () => {
    const secs = mixedSections();
    const packed = packSections(secs);
    for (let round = 0; round < 2; round++) {
      for (let g = 0; g < 7; g++) {
        const omega = normalizedOmega(logFrequencies(40 + g, 10 + g, 40000), FS);
        const out = allocateComplexResponse(omega.length);
        const ref = allocateComplexResponse(omega.length);
        cascadeComplex(packed, secs.length, omega, out);
        cascadeComplexJs(packed, secs.length, omega, ref);
        expectSameBits(ref, out, `grid ${g}`);
      }
    }
  });
  it('more sections than the constants had room for move the grids without mixing them up', () => {
    const secs = mixedSections();
    const omega = normalizedOmega(logFrequencies(50, 20, 20000), FS);
    for (const count of [2, secs.length, 300]) {
      const many: Section[] = [];
      while (many.length < count) many.push(...secs);
      const [js, wa] = both(many.slice(0, count), omega);
      expectSameBits(js, wa, `${count} sections`);
    }
  });
});

describe('sums and products on the complex core', () => {
  it('two equal outputs 5000 dB down sum to 6.02 dB more (20 log10 2), not to nothing', () => {
    // 10^(-5000/20) is far below the smallest double: a sum through dB and phase gets 0.
    const lp = designEdge({ family: 'butterworth', order: 8, frequency: 100 }, 'lowPass', 48000);
    const deep: Section[] = [];
    for (let i = 0; i < 12; i++) deep.push(...lp);
    const omega = normalizedOmega(logFrequencies(48, 10000, 20000), 48000);
    const n = omega.length;
    const a = allocateComplexResponse(n);
    chainComplexResponse(packSections(deep), deep.length, 1, 0, omega, a);
    const s = allocateComplexResponse(n);
    sumComplex([{ complex: a }, { complex: a }], n, s);
    const da = new Float64Array(n);
    const ds = new Float64Array(n);
    presentMagnitudePhase(a, da, new Float64Array(n));
    presentMagnitudePhase(s, ds, new Float64Array(n));
    expect(da[n - 1]).toBeLessThan(-5000);
    for (let i = 0; i < n; i++) {
      expect(Math.abs(ds[i] - da[i] - 20 * Math.log10(2)), `at point ${i}`).toBeLessThan(1e-9);
      expect(Math.abs(s.groupDelaySamples[i] - a.groupDelaySamples[i])).toBeLessThan(1e-9 * Math.abs(a.groupDelaySamples[i]));
    }
  });
  it('a chain times another equals the two chains as one cascade (values, group delays and slopes add)', () => {
    const secs = mixedSections();
    const first = secs.slice(0, 6);
    const second = secs.slice(6);
    const omega = normalizedOmega(logFrequencies(200, 10, 40000), FS);
    const n = omega.length;
    const a = allocateComplexResponse(n);
    const b = allocateComplexResponse(n);
    const whole = allocateComplexResponse(n);
    chainComplexResponse(packSections(first), first.length, -0.5, 12.25, omega, a);
    chainComplexResponse(packSections(second), second.length, 2, 3.5, omega, b);
    chainComplexResponse(packSections(secs), secs.length, -1, 15.75, omega, whole);
    multiplyComplexInto(a, b);
    for (let i = 0; i < n; i++) {
      if (whole.re[i] === 0 && whole.im[i] === 0) continue;
      const mag = Math.hypot(whole.re[i], whole.im[i]);
      // Rounding of two cascades against one: 1e-9 of |H| (the 20 Hz Bessel high-pass at 96 kHz
      // is ill-conditioned near DC, see kernel-wasm.test.ts).
      expect(Math.abs(a.re[i] - whole.re[i]), `re at ${i}`).toBeLessThan(1e-9 * mag);
      expect(Math.abs(a.im[i] - whole.im[i]), `im at ${i}`).toBeLessThan(1e-9 * mag);
      expect(Math.abs(a.groupDelaySamples[i] - whole.groupDelaySamples[i])).toBeLessThan(1e-9 * Math.max(1, Math.abs(whole.groupDelaySamples[i])));
      expect(Math.abs(a.logSlope[i] - whole.logSlope[i])).toBeLessThan(1e-9 * Math.max(1, Math.abs(whole.logSlope[i])));
    }
  });
});
