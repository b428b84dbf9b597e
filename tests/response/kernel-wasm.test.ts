/**
 * The WebAssembly kernel against the JavaScript one (same expressions, different evaluation
 * order: they agree to rounding), and the committed bytes against a fresh assembly of kernel.wat.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import { packSections, type Section } from '../../src/design/section';
import { allocateKernelOutput, cascadeResponse, cascadeResponseJs, normalizedOmega, wasmKernel } from '../../src/response/kernel';
import { logFrequencies } from '../../src/response/chain-response';
// @ts-expect-error: a plain .mjs build script without types
import { assemble } from '../../scripts/build-wasm.mjs';

const FS = 96000;

function mixedSections(): Section[] {
  const s: Section[] = [];
  s.push(...designEdge({ family: 'bessel', order: 8, frequency: 20, normalization: 'magnitude' }, 'highPass', FS));
  s.push(...designEdge({ family: 'linkwitz-riley', order: 8, frequency: 2500 }, 'lowPass', FS));
  for (const type of ['peaking', 'lowShelf', 'highShelf', 'notch', 'allPass', 'bandPass', 'lowPass1', 'allPass1'] as const) {
    s.push(...designBand({ id: type, type, frequency: 700, gainDb: 9, q: 3, enabled: true }, FS));
  }
  return s;
}

describe('WebAssembly response kernel', () => {
  it('is available in Node (WebAssembly SIMD)', () => {
    expect(wasmKernel()).not.toBeNull();
  });

  it('matches the JavaScript kernel on every point, odd point counts included', () => {
    const sections = mixedSections();
    const packed = packSections(sections);
    for (const n of [33, 64, 1001]) {
      const omega = normalizedOmega(logFrequencies(n, 5, 47000), FS);
      const js = allocateKernelOutput(n);
      const wa = allocateKernelOutput(n);
      cascadeResponseJs(packed, sections.length, omega, js);
      cascadeResponse(packed, sections.length, omega, wa);
      for (let i = 0; i < n; i++) {
        // Tolerance: both evaluate the same sums in double precision in a different order. The
        // direct form 1 + a1 z^-1 + a2 z^-2 cancels near a pole close to z = 1 (the 20 Hz
        // high-pass at 96 kHz has |D| near 1e-6 there), so rounding of 1e-16 becomes about 1e-10
        // relative in either kernel; the deep stop band (below -300 dB) loses more, in both alike.
        const deep = js.magnitudeDb[i] < -300;
        expect(Math.abs(wa.magnitudeDb[i] - js.magnitudeDb[i])).toBeLessThan(deep ? 1e-6 : 1e-8);
        expect(Math.abs(wa.phaseRad[i] - js.phaseRad[i])).toBeLessThan(deep ? 1e-5 : 1e-8);
        expect(Math.abs(wa.groupDelaySamples[i] - js.groupDelaySamples[i])).toBeLessThan(1e-9 * Math.max(1, Math.abs(js.groupDelaySamples[i])));
        expect(Math.abs(wa.logSlope[i] - js.logSlope[i])).toBeLessThan(1e-8 * Math.max(1, Math.abs(js.logSlope[i])));
      }
    }
  });

  it('rescales instead of underflowing: 400 cascaded 8th-order high-pass sections stay finite', () => {
    const one = designEdge({ family: 'butterworth', order: 8, frequency: 10000 }, 'highPass', FS);
    const sections: Section[] = [];
    for (let i = 0; i < 100; i++) sections.push(...one);
    const omega = normalizedOmega(logFrequencies(64, 20, 200), FS);
    const out = allocateKernelOutput(64);
    cascadeResponse(packSections(sections), sections.length, omega, out);
    // Butterworth high-pass, 8th order: 160 dB per decade below fc, times 100 cascades, at 20 Hz
    // (2.7 decades below 10 kHz): far below the double range (1e-308 is -6160 dB) yet finite.
    expect(out.magnitudeDb[0]).toBeLessThan(-20000);
    expect(Number.isFinite(out.magnitudeDb[0])).toBe(true);
  });

  it('has committed bytes that match kernel.wat', async () => {
    const fresh: string = await assemble();
    expect(readFileSync(new URL('../../src/response/kernel-wasm-bytes.ts', import.meta.url), 'utf8')).toBe(fresh);
  });
});
