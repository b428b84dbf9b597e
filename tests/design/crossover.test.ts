/**
 * Crossover edges against scipy.signal (butter, bessel, sosfreqz; fixtures written by
 * tests/reference/make_fixtures.py, which records each call and scipy's version) and against
 * exact 50-digit references of the same designs.
 *
 * Overall responses are compared, never single sections: scipy puts the gain in the first section
 * and pairs poles its own way (references.md, "Digital designs").
 *
 * Tolerances. A cascade of float64 sections cannot be evaluated, nor designed, more accurately
 * than the rounding of its coefficients allows: with relative coefficient errors u, the response
 * moves by at most u * K(w), K = `sensitivity` (tests/helpers/reference.ts). For a 20 Hz edge at
 * 192 kHz K reaches ~4e9 near DC, so 1e-9 dB is not attainable there by anyone (scipy's own sections
 * differ from the exact design by up to 4e-7 dB at -160 dB). So each point is checked against
 *   - a flat 1e-9 dB / 1e-7 degrees wherever the edge is well conditioned (fc/fs >= 1e-3), and
 *   - C ulps times K everywhere: C = 8 for evaluating given sections (the kernel; measured worst
 *     1.8) and C = 64 for our own design (measured worst 22, for Bessel poles that come out of a
 *     double-precision root finder; Butterworth 1.4).
 * Group delay: relative 1e-8 (measured worst 2e-9, all cases); the project's accuracy bar is 1e-5.
 */
import { describe, expect, it } from 'vitest';
import { designEdge } from '../../src/design/crossover';
import { MAGNITUDE_FLOOR_DB } from '../../src/response/chain-response';
import { angleDiffDeg, DB_PER_NEPER, EPS, kernelAt, loadFixture, RAD2DEG, responseAt, sensitivity, sosToSections, type EdgeFixtureCase } from '../helpers/reference';

type EdgeCase = EdgeFixtureCase;

const KERNEL_ULPS = 8;
const DESIGN_ULPS = 64;
const GD_REL = 1e-8;
const WELL_DB = 1e-9;
const WELL_DEG = 1e-7;

function checkFile(name: string, expectedCases: number): void {
  const fx = loadFixture<EdgeCase>(name);
  describe(`${name} (scipy ${fx.meta.scipy}, numpy ${fx.meta.numpy}, mpmath ${fx.meta.mpmath})`, () => {
    it('holds the expected cases', () => {
      expect(fx.cases.length).toBe(expectedCases);
    });
    for (const c of fx.cases) {
      const label = `${c.call}`;
      const ours = designEdge({ family: c.family, order: c.order, frequency: c.frequency, normalization: c.normalization }, c.kind, c.sampleRate);
      const scipySections = sosToSections(c.sos);
      const wellConditioned = c.frequency / c.sampleRate >= 1e-3;
      const omega = c.freqs.map((f) => (2 * Math.PI * f) / c.sampleRate);

      it(`${label}: as many sections as scipy`, () => {
        // Source: handbook structure: ceil(N/2) sections for order N; an LR edge of order 2n is two
        // Butterworth n cascades, 2 ceil(n/2) sections; scipy's sos has the same number of rows.
        expect(ours.length).toBe(c.sos.length);
      });

      it(`${label}: our kernel on scipy's sections = their 50-digit value`, () => {
        const r = responseAt(scipySections, c.freqs, c.sampleRate);
        const k = kernelAt(scipySections, c.freqs, c.sampleRate);
        c.freqs.forEach((f, i) => {
          const u = KERNEL_ULPS * EPS * sensitivity(scipySections, omega[i]);
          expect(Math.abs(r.magnitudeDb[i] - c.sosExact.magnitudeDb[i]), `magnitude at ${f} Hz`).toBeLessThanOrEqual(DB_PER_NEPER * u + 1e-13);
          expect(angleDiffDeg(r.phaseRad[i] * RAD2DEG, c.sosExact.phaseDeg[i]), `phase at ${f} Hz`).toBeLessThanOrEqual(RAD2DEG * u + 1e-12);
          const gd = k.groupDelaySamples[i];
          const ref = c.sosExact.groupDelaySamples[i];
          expect(Math.abs(gd - ref), `group delay at ${f} Hz`).toBeLessThanOrEqual(GD_REL * Math.abs(ref) + 1e-12);
        });
      });

      it(`${label}: our design = the exact design (mag, phase, group delay)`, () => {
        const r = responseAt(ours, c.freqs, c.sampleRate);
        const k = kernelAt(ours, c.freqs, c.sampleRate);
        c.freqs.forEach((f, i) => {
          const u = DESIGN_ULPS * EPS * sensitivity(ours, omega[i]);
          const dm = Math.abs(r.magnitudeDb[i] - c.design.magnitudeDb[i]);
          const dp = angleDiffDeg(r.phaseRad[i] * RAD2DEG, c.design.phaseDeg[i]);
          expect(dm, `magnitude at ${f} Hz`).toBeLessThanOrEqual(DB_PER_NEPER * u + 1e-12);
          expect(dp, `phase at ${f} Hz`).toBeLessThanOrEqual(RAD2DEG * u + 1e-12);
          if (wellConditioned) {
            expect(dm, `magnitude at ${f} Hz`).toBeLessThanOrEqual(WELL_DB);
            expect(dp, `phase at ${f} Hz`).toBeLessThanOrEqual(WELL_DEG);
          }
          // The kernel's group delay has no floor; the response layer blanks it below -200 dB (cli.md).
          const gd = k.groupDelaySamples[i];
          const ref = c.design.groupDelaySamples[i];
          expect(Math.abs(gd - ref), `group delay at ${f} Hz`).toBeLessThanOrEqual(GD_REL * Math.abs(ref) + 1e-12);
          if (r.magnitudeDb[i] < MAGNITUDE_FLOOR_DB) expect(r.groupDelayMs[i]).toBeNaN();
          else expect(Math.abs((r.groupDelayMs[i] * c.sampleRate) / 1000 - gd)).toBeLessThanOrEqual(1e-12 * Math.abs(gd) + 1e-15);
        });
      });

      it(`${label}: our design = scipy's sosfreqz`, () => {
        const r = responseAt(ours, c.freqs, c.sampleRate);
        c.freqs.forEach((f, i) => {
          // Both sides carry their own rounding: the bound is the sum of the two.
          const u = DESIGN_ULPS * EPS * (sensitivity(ours, omega[i]) + sensitivity(scipySections, omega[i]));
          const dm = Math.abs(r.magnitudeDb[i] - c.sosfreqz.magnitudeDb[i]);
          const dp = angleDiffDeg(r.phaseRad[i] * RAD2DEG, c.sosfreqz.phaseDeg[i]);
          expect(dm, `magnitude at ${f} Hz`).toBeLessThanOrEqual(DB_PER_NEPER * u + 1e-12);
          expect(dp, `phase at ${f} Hz`).toBeLessThanOrEqual(RAD2DEG * u + 1e-12);
          if (wellConditioned) {
            expect(dm, `magnitude at ${f} Hz`).toBeLessThanOrEqual(WELL_DB);
            expect(dp, `phase at ${f} Hz`).toBeLessThanOrEqual(WELL_DEG);
          }
        });
      });

      if (c.scipyGroupDelay) {
        const sgd = c.scipyGroupDelay;
        it(`${label}: group delay = scipy.signal.group_delay (mid-band designs)`, () => {
          // scipy.signal.group_delay is accurate to ~1e-6 relative for these mid-band sections
          // (references.md: it loses ~1e-3 only near DC for low-frequency sections, excluded here).
          const k = kernelAt(ours, c.freqs, c.sampleRate);
          c.freqs.forEach((f, i) => {
            const gd = k.groupDelaySamples[i];
            expect(Math.abs(gd - sgd.groupDelaySamples[i]), `at ${f} Hz`).toBeLessThanOrEqual(1e-6 * Math.abs(sgd.groupDelaySamples[i]) + 1e-9);
          });
        });
      }
    }
  });
}

checkFile('butterworth.json', 64);
checkFile('bessel.json', 96);
checkFile('linkwitz-riley.json', 16);
