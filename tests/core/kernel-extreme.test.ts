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
import { describe, expect, it } from 'vitest';
import { packSections, type Section } from '../../src/design/section';
import { allocateKernelOutput, cascadeResponse, cascadeResponseJs, normalizedOmega } from '../../src/response/kernel';
import { angleDiffDeg, loadFixture } from '../helpers/reference';

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
