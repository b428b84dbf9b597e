/**
 * Smoothing against its definition (docs/measurements.md, "Smoothing") computed independently in
 * tests/reference/make_measure_fixtures.py (the interpolant integrated numerically by
 * scipy.integrate.quad, not in closed form), plus exact properties of the definition.
 */
import { describe, expect, it } from 'vitest';
import { parseSmoothing, smoothColumns, smoothingWidthOctaves, smoothMeasurement, type Smoothing } from '../../src/measure/smooth';
import type { MeasuredResponse } from '../../src/measure/types';
import { angleDiffDeg, loadFixture } from '../helpers/reference';

interface SmoothingCase {
  grid: string;
  frequencyHz: number[];
  magnitudeDb: number[];
  phaseDeg: number[];
  smoothed: { setting: number | 'variable'; magnitudeDb: number[]; phaseDeg: number[] }[];
}

const fixture = loadFixture<SmoothingCase>('measure-smoothing.json');
const setting = (s: number | 'variable'): Smoothing => (s === 'variable' ? { kind: 'variable' } : { kind: 'octave', n: s });

describe('against the definition integrated by scipy.integrate.quad (make_measure_fixtures.py)', () => {
  for (const c of fixture.cases) {
    for (const ref of c.smoothed) {
      it(`${c.grid}, ${ref.setting === 'variable' ? 'variable' : `1/${ref.setting} octave`}`, () => {
        const r = smoothColumns(c.frequencyHz, c.magnitudeDb, c.phaseDeg, setting(ref.setting));
        // quad at epsrel 1e-11 against a closed form: they agree to about 1e-13 (dB and degrees);
        // 1e-9 leaves room for the reference's integration error and nothing else.
        let worstDb = 0;
        let worstDeg = 0;
        for (let i = 0; i < c.frequencyHz.length; i++) {
          worstDb = Math.max(worstDb, Math.abs(r.magnitudeDb[i] - ref.magnitudeDb[i]));
          worstDeg = Math.max(worstDeg, angleDiffDeg(r.phaseDeg![i], ref.phaseDeg[i]));
          // The smoothed phase stays unwrapped next to the input (within half a turn of it).
          expect(Math.abs(r.phaseDeg![i] - c.phaseDeg[i])).toBeLessThan(180);
        }
        expect(worstDb).toBeLessThan(1e-9);
        expect(worstDeg).toBeLessThan(1e-9);
        // And the smoothing did something (the fixture is not flat): guards a no-op passing.
        const changed = c.magnitudeDb.some((m, i) => Math.abs(m - r.magnitudeDb[i]) > 0.01);
        expect(changed).toBe(true);
      });
    }
  }
});

describe('exact properties of the definition', () => {
  const freqs = Array.from({ length: 300 }, (_, i) => 20 * Math.pow(1000, i / 299));

  it('smoothing a constant returns it exactly (every setting, magnitude and phase)', () => {
    for (const level of [0, -3.7, 94.123456789, -120.5]) {
      for (const ph of [0, -45.25, 1234.5]) {
        const mag = freqs.map(() => level);
        const phase = freqs.map(() => ph);
        for (const s of [{ kind: 'octave', n: 48 }, { kind: 'octave', n: 3 }, { kind: 'octave', n: 1 }, { kind: 'variable' }] as Smoothing[]) {
          const r = smoothColumns(freqs, mag, phase, s);
          expect(r.magnitudeDb.every((m) => m === level)).toBe(true);
          expect(r.phaseDeg!.every((p) => p === ph)).toBe(true);
        }
      }
    }
  });

  it('a level linear in log f: the mean of |H|^2 over a centred interval, by the closed form of the definition', () => {
    // L = k log2 f: |H|^2 = 2^(k u / 10 ... ); the mean over u +- w/2 of exp(c k u) is
    // exp(c k u) sinh(c k w / 2) / (c k w / 2), c = ln 10 / 10: a textbook integral.
    const k = -24; // dB per octave
    const mag = freqs.map((f) => k * Math.log2(f / 1000));
    const w = 1 / 3;
    const r = smoothColumns(freqs, mag, null, { kind: 'octave', n: 3 });
    const x = ((Math.LN10 / 10) * k * w) / 2;
    const liftDb = 10 * Math.log10(Math.sinh(x) / x);
    for (let i = 0; i < freqs.length; i++) {
      const u = Math.log2(freqs[i]);
      if (u - Math.log2(freqs[0]) < w / 2 || Math.log2(freqs[freqs.length - 1]) - u < w / 2) continue; // ends narrowed
      expect(r.magnitudeDb[i]).toBeCloseTo(mag[i] + liftDb, 9);
    }
    expect(r.phaseDeg).toBeNull();
  });

  it('the first and last points keep their values (the interval narrows symmetrically at the ends)', () => {
    const mag = freqs.map((f, i) => Math.sin(i / 7) * 5);
    const r = smoothColumns(freqs, mag, null, { kind: 'octave', n: 1 });
    expect(r.magnitudeDb[0]).toBe(mag[0]);
    expect(r.magnitudeDb[freqs.length - 1]).toBe(mag[freqs.length - 1]);
    expect(r.magnitudeDb[1]).not.toBe(mag[1]);
  });

  it('none returns copies of the data; smoothMeasurement keeps the rest of the measurement', () => {
    const m: MeasuredResponse = { name: 'm', frequencyHz: [100, 200, 400], magnitudeDb: [0, 6, 0], phaseDeg: null, phaseEstimated: false, delayMs: 1.5, notes: ['n'] };
    const none = smoothMeasurement(m, { kind: 'none' });
    expect(none.magnitudeDb).toEqual(m.magnitudeDb);
    expect(none.magnitudeDb).not.toBe(m.magnitudeDb);
    const s = smoothMeasurement(m, { kind: 'octave', n: 1 });
    expect(s.magnitudeDb[1]).toBeLessThan(6);
    expect(s.delayMs).toBe(1.5);
    expect(s.notes).toEqual(['n']);
    expect(m.magnitudeDb).toEqual([0, 6, 0]); // input untouched
  });
});

describe('settings', () => {
  it('variable: 1/48 octave up to 100 Hz, 1/3 from 10 kHz, 1/12 at 1 kHz (log-linear between)', () => {
    const v: Smoothing = { kind: 'variable' };
    expect(smoothingWidthOctaves(v, 20)).toBe(1 / 48);
    expect(smoothingWidthOctaves(v, 100)).toBe(1 / 48);
    expect(smoothingWidthOctaves(v, 1000)).toBeCloseTo(1 / 12, 14);
    expect(smoothingWidthOctaves(v, 10000)).toBe(1 / 3);
    expect(smoothingWidthOctaves(v, 20000)).toBe(1 / 3);
  });

  it('parseSmoothing reads 1/N, N, var and none and refuses the rest', () => {
    expect(parseSmoothing('1/6')).toEqual({ kind: 'octave', n: 6 });
    expect(parseSmoothing('48')).toEqual({ kind: 'octave', n: 48 });
    expect(parseSmoothing('var')).toEqual({ kind: 'variable' });
    expect(parseSmoothing('none')).toEqual({ kind: 'none' });
    for (const bad of ['1/0', '1/', 'third', '-3', '1/-3', '']) expect(parseSmoothing(bad)).toBeNull();
  });
});
