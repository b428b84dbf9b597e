/**
 * Minimum phase from magnitude against analog minimum-phase systems whose exact phase is known:
 * the Audio EQ Cookbook's analog prototypes and Butterworth / Linkwitz-Riley crossover cascades,
 * evaluated by scipy.signal.freqs (tests/reference/make_measure_fixtures.py), on 1/48-octave
 * magnitude-only data from 20 Hz to 20 kHz.
 */
import { describe, expect, it } from 'vitest';
import { minimumPhaseDeg, withMinimumPhase } from '../../src/measure/minphase';
import type { MeasuredResponse } from '../../src/measure/types';
import { angleDiffDeg, loadFixture } from '../helpers/reference';

interface MinPhaseCase {
  system: string;
  magnitudeDb: number[];
  checkEvery: number;
  phaseDeg: number[];
}

const loaded = loadFixture<MinPhaseCase>('measure-minphase.json');
// The 1/48-octave grid from 20 Hz to 20 kHz is written once, in the fixture's meta.
const grid = loaded.meta.frequencyHz as number[];
const fixture = { cases: loaded.cases.map((c) => ({ ...c, frequencyHz: grid })) };

describe('minimum phase against the exact phase of analog minimum-phase systems (scipy.signal.freqs)', () => {
  for (const c of fixture.cases) {
    it(`${c.system}: within 1 degree from 20 Hz to 20 kHz`, () => {
      const ph = minimumPhaseDeg(c.frequencyHz, c.magnitudeDb);
      let worst = 0;
      c.phaseDeg.forEach((ref, i) => {
        worst = Math.max(worst, angleDiffDeg(ph[i * c.checkEvery], ref));
      });
      // The tolerance. Measured worst cases: 0.64 degree for the cascade at 20 Hz (the
      // Butterworth high-pass still bending there), 0.32 for the shelf near 20 kHz; the rest
      // below 0.12 (linear interpolation of 1/48-octave data across the Q 4 peak).
      expect(worst).toBeLessThan(1);
    });
  }

  it('is unwrapped and continuous (no 360-degree steps between neighbours)', () => {
    const c = fixture.cases.find((x) => x.system.startsWith('Butterworth 4'))!;
    const ph = minimumPhaseDeg(c.frequencyHz, c.magnitudeDb);
    for (let i = 1; i < ph.length; i++) expect(Math.abs(ph[i] - ph[i - 1])).toBeLessThan(20);
    // Fourth-order high-pass far below, eighth-order low-pass above: +360 .. -720 overall, and
    // between 30 Hz and 12 kHz the phase passes through the peaking section's near-zero region.
    expect(ph[0]).toBeGreaterThan(180);
    expect(ph[ph.length - 1]).toBeLessThan(-360);
  });

  it('a flat magnitude has zero phase; a constant gain changes nothing', () => {
    const f = Array.from({ length: 200 }, (_, i) => 20 * Math.pow(1000, i / 199));
    const flat = minimumPhaseDeg(f, f.map(() => -7.5));
    expect(Math.max(...flat.map(Math.abs))).toBeLessThan(1e-9);
    const c = fixture.cases[0];
    const a = minimumPhaseDeg(c.frequencyHz, c.magnitudeDb);
    const b = minimumPhaseDeg(
      c.frequencyHz,
      c.magnitudeDb.map((m) => m + 12),
    );
    for (let i = 0; i < a.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-9);
  });
});

describe('withMinimumPhase', () => {
  it('strips excess phase: a measured phase with 0.3 ms of excess delay becomes the minimum phase', () => {
    const c = fixture.cases.find((x) => x.system.startsWith('Linkwitz-Riley 4 low-pass'))!;
    const f = c.frequencyHz.filter((_, i) => i % c.checkEvery === 0);
    const mag = c.magnitudeDb.filter((_, i) => i % c.checkEvery === 0);
    // The measured phase: the exact minimum phase plus a pure delay of 0.3 ms (an all-pass).
    const measured: MeasuredResponse = {
      name: 'driver',
      frequencyHz: f,
      magnitudeDb: mag,
      phaseDeg: c.phaseDeg.map((p, i) => p - 360 * f[i] * 0.0003),
      phaseEstimated: false,
      delayMs: 1.25,
      notes: ['invented'],
    };
    const m = withMinimumPhase(measured);
    expect(m.phaseEstimated).toBe(true);
    expect(m.delayMs).toBe(1.25);
    expect(m.magnitudeDb).toEqual(mag);
    let worst = 0;
    f.forEach((_, i) => (worst = Math.max(worst, angleDiffDeg(m.phaseDeg![i], c.phaseDeg[i]))));
    // 1/12-octave data here (every 4th point): interpolation across it costs a little more.
    expect(worst).toBeLessThan(1);
    // The input is not changed.
    expect(measured.phaseEstimated).toBe(false);
  });

  it('refuses fewer than 2 points', () => {
    expect(() => minimumPhaseDeg([100], [0])).toThrow(/at least 2/);
  });
});
