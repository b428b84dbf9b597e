/**
 * The predicted acoustic response (src/measure/acoustic.ts) against an independent computation:
 * tests/reference/make_acoustic_fixtures.py builds two analytic drivers (scipy.signal.freqs),
 * stores them as measurements, and predicts each output and the sum with scipy.signal.sosfreqz
 * chains, numpy.interp on ln f and a central-difference group delay. Plus facts of the trade:
 * the speed of sound (docs/references.md, "Measured responses"), no value outside a
 * measurement's range, and a pure time of flight adding exactly its delay.
 */
import { describe, expect, it } from 'vitest';
import { acousticOffsetMs, interpolateMeasurement, predictAcoustic, speedOfSoundMps } from '../../src/measure/acoustic';
import { readPlanValue } from '../../src/plan/read';
import type { Measurement, Plan } from '../../src/plan/types';
import { MAGNITUDE_FLOOR_DB } from '../../src/response/chain-response';
import { angleDiffDeg, loadFixture } from '../helpers/reference';

interface Point {
  magnitudeDb: number;
  phaseDeg: number;
  groupDelayMs?: number;
}
interface Case {
  kind: 'grid' | 'between' | 'outside';
  frequencyHz: number;
  outputs: Record<string, Point | null>;
  sum: Point | null;
}
const fixture = loadFixture<Case>('acoustic.json') as ReturnType<typeof loadFixture<Case>> & { plan: unknown };
const read = readPlanValue(fixture.plan);
if (!read.ok) throw read.error;
const plan: Plan = read.plan;
const freqs = fixture.cases.map((c) => c.frequencyHz);
const prediction = predictAcoustic(plan, freqs);
const RAD = 180 / Math.PI;

describe('speed of sound and acoustic offsets', () => {
  it('c = 331.3 sqrt(1 + T/273.15): 343.2 m/s at 20 C, 331.3 at 0 C (docs/references.md, ideal-gas approximation)', () => {
    expect(speedOfSoundMps(0)).toBe(331.3);
    expect(speedOfSoundMps(20)).toBeCloseTo(343.21, 2); // 343.2 m/s at 20 C: the usual figure of the trade
    expect(speedOfSoundMps()).toBe(speedOfSoundMps(20)); // the default is 20 C
    expect(speedOfSoundMps(25)).toBeCloseTo(fixture.meta.speedOfSoundMps as number, 12);
  });
  it('343.2 mm at 20 C is 1 ms; ms offsets pass through; none is 0', () => {
    expect(acousticOffsetMs({ value: speedOfSoundMps(20), unit: 'mm' }, 20)).toBeCloseTo(1, 14);
    expect(acousticOffsetMs({ value: -0.25, unit: 'ms' }, 35)).toBe(-0.25);
    expect(acousticOffsetMs(undefined, 20)).toBe(0);
  });
});

describe('predicted acoustic response against scipy/numpy (make_acoustic_fixtures.py)', () => {
  it('the plan sums the two measured outputs and lists the unmeasured one', () => {
    expect(prediction.outputs.map((o) => o.id)).toEqual(['woofer', 'tweeter']);
    expect(prediction.summed).toEqual(['woofer', 'tweeter']);
    expect(prediction.unmeasured).toEqual(['spare']);
    expect(prediction.speedOfSoundMps).toBeCloseTo(fixture.meta.speedOfSoundMps as number, 12);
  });

  fixture.cases.forEach((c, i) => {
    it(`${c.kind} ${c.frequencyHz.toPrecision(6)} Hz: every output and the sum`, () => {
      for (const out of prediction.outputs) {
        const want = c.outputs[out.id];
        const r = out.response;
        if (want === null) {
          // Outside the measured range: no number at all, never an extrapolated one.
          expect(r.magnitudeDb[i]).toBeNaN();
          expect(r.phaseRad[i]).toBeNaN();
          expect(r.groupDelayMs[i]).toBeNaN();
          continue;
        }
        // Both sides are double-precision evaluations of the same definitions; the chains differ
        // in method (our kernel around z = +/-1, scipy's polynomial evaluation), which near DC
        // costs scipy about 1e-11 relative for a 2.2 kHz LR4 high-pass at 20 Hz: 1e-7 dB and
        // 1e-6 degrees leave margin. Parts below -150 dB (a tweeter's LR4 high-pass at 20 Hz)
        // are checked at 1e-4 dB: the cancellation there is scipy's, not ours.
        const deep = want.magnitudeDb < -150;
        expect(Math.abs(r.magnitudeDb[i] - want.magnitudeDb)).toBeLessThan(deep ? 1e-4 : 1e-7);
        expect(angleDiffDeg(r.phaseRad[i] * RAD, want.phaseDeg)).toBeLessThan(deep ? 1e-3 : 1e-6);
        if (want.groupDelayMs !== undefined && want.magnitudeDb < MAGNITUDE_FLOOR_DB) {
          // Below the floor group delay carries no information and is not reported (chain-response.ts).
          expect(r.groupDelayMs[i]).toBeNaN();
        } else if (want.groupDelayMs !== undefined) {
          // Central difference with step h = 3e-5 f on the prediction: truncation ~(h/f)^2 = 1e-9
          // relative; rounding is scipy's phase error (~1e-12 rad for the low-frequency
          // sections near 30 Hz) over 4 pi h: up to ~1e-7 ms at 36 Hz, far less above.
          expect(Math.abs(r.groupDelayMs[i] - want.groupDelayMs)).toBeLessThan(deep ? 1e-3 : 2e-7);
        }
      }
      const s = prediction.sum!;
      if (c.sum === null) {
        expect(s.magnitudeDb[i]).toBeNaN();
        expect(s.groupDelayMs[i]).toBeNaN();
        return;
      }
      expect(Math.abs(s.magnitudeDb[i] - c.sum.magnitudeDb)).toBeLessThan(1e-7);
      expect(angleDiffDeg(s.phaseRad[i] * RAD, c.sum.phaseDeg)).toBeLessThan(1e-6);
      if (c.sum.groupDelayMs !== undefined) expect(Math.abs(s.groupDelayMs[i] - c.sum.groupDelayMs)).toBeLessThan(2e-7);
    });
  });

  it('the cases cover grid points, points between them and points outside', () => {
    const kinds = new Set(fixture.cases.map((c) => c.kind));
    expect([...kinds].sort()).toEqual(['between', 'grid', 'outside']);
    expect(fixture.cases.filter((c) => c.sum !== null && c.sum.groupDelayMs !== undefined).length).toBeGreaterThanOrEqual(8);
  });
});

describe('interpolation and group delay of a measurement, by construction', () => {
  const m = (extra: Partial<Measurement> = {}): Measurement => ({
    id: 'm',
    name: 'm',
    source: { fileName: '', kind: 'generated' },
    frequencyHz: [100, 200, 400, 800],
    magnitudeDb: [0, 6, 6, 0],
    phaseDeg: [0, -90, -180, -270],
    phaseEstimated: false,
    delayMs: 0,
    notes: [],
    ...extra,
  });

  it('linear in ln f: the geometric middle of two points gets the mean of their values', () => {
    const r = interpolateMeasurement(m(), [Math.sqrt(100 * 200), Math.sqrt(400 * 800)]);
    expect(r.magnitudeDb[0]).toBeCloseTo(3, 12);
    expect(r.magnitudeDb[1]).toBeCloseTo(3, 12);
    expect(r.phaseRad[0] * RAD).toBeCloseTo(-45, 10);
  });

  it('at the ends inclusive, outside NaN (never extrapolated), for unsorted queries too', () => {
    const r = interpolateMeasurement(m(), [800, 99.999, 100, 800.001, 1e-9]);
    expect(Array.from(r.magnitudeDb).map((x) => (Number.isNaN(x) ? null : x))).toEqual([0, null, 0, null, null]);
  });

  it('phase falling 90 degrees per octave: group delay (90/360) / (f ln 2) inside a segment (a constant slope in ln f)', () => {
    // phase = -(pi/2) log2 f + const, d phase / d w = -(pi/2) / (ln 2 * 2 pi f) -> tau = 1 / (4 f ln 2)
    for (const f of [141, 250, 333, 700]) {
      const r = interpolateMeasurement(m(), [f]);
      expect(r.groupDelayMs[0]).toBeCloseTo((1000 / (4 * f * Math.LN2)), 10);
    }
  });

  it('a measurement delay adds exactly that delay and -w t of phase; a wrapped phase is unwrapped first', () => {
    const wrapped = m({ phaseDeg: [0, -90, -180, 90], delayMs: 1.5 }); // -270 stored wrapped as +90
    const r = interpolateMeasurement(wrapped, [300, 600]);
    const ref = interpolateMeasurement(m(), [300, 600]);
    for (let i = 0; i < 2; i++) {
      expect(r.groupDelayMs[i] - ref.groupDelayMs[i]).toBeCloseTo(1.5, 12);
      expect(r.phaseRad[i] - ref.phaseRad[i]).toBeCloseTo(-2 * Math.PI * [300, 600][i] * 1.5e-3, 9);
    }
  });

  it('without phase: magnitude only, phase and group delay NaN', () => {
    const r = interpolateMeasurement(m({ phaseDeg: null }), [300]);
    expect(r.magnitudeDb[0]).toBeCloseTo(6, 12);
    expect(r.phaseRad[0]).toBeNaN();
    expect(r.groupDelayMs[0]).toBeNaN();
  });
});

describe('predicted sum: facts of the trade', () => {
  /** A flat driver (0 dB, 0 degrees) measured from 10 Hz to 24 kHz. */
  const flat = (id: string, delayMs = 0): Measurement => ({
    id,
    name: id,
    source: { fileName: '', kind: 'generated' },
    frequencyHz: [10, 24000],
    magnitudeDb: [0, 0],
    phaseDeg: [0, 0],
    phaseEstimated: false,
    delayMs,
    notes: [],
  });
  const lr4Plan = (extra: (p: Plan) => void): Plan => {
    const r = readPlanValue({
      format: 'biquadrant.plan',
      version: 3,
      name: 'lr4',
      sampleRate: 48000,
      input: { bands: [] },
      outputs: [
        { id: 'lo', lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 }, driverMeasurementId: 'a' },
        { id: 'hi', highPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 }, driverMeasurementId: 'b' },
      ],
      measurements: [flat('a'), flat('b')],
    });
    if (!r.ok) throw r.error;
    extra(r.plan);
    return r.plan;
  };
  const F = [200, 1000, 2000, 4000, 10000];

  it('flat drivers behind an LR4 pair sum to 0 dB (an all-pass: Lipshitz and Vanderkooy, JAES 34(11), 1986)', () => {
    const p = predictAcoustic(lr4Plan(() => {}), F);
    for (let i = 0; i < F.length; i++) expect(Math.abs(p.sum!.magnitudeDb[i])).toBeLessThan(1e-9);
  });

  it('an offset of half a wavelength at fc (in mm at 20 C) cancels the LR4 sum there; the same as a time in ms', () => {
    const c = speedOfSoundMps(20);
    const halfWaveMm = (c / 2000 / 2) * 1000; // lambda / 2 at 2 kHz
    const mm = predictAcoustic(lr4Plan((pl) => (pl.outputs[1].acousticOffset = { value: halfWaveMm, unit: 'mm' })), F);
    const ms = predictAcoustic(lr4Plan((pl) => (pl.outputs[1].acousticOffset = { value: 0.25, unit: 'ms' })), F);
    expect(mm.sum!.magnitudeDb[2]).toBeLessThan(-200); // in phase before, now 180 degrees apart at equal level
    for (let i = 0; i < F.length; i++) expect(mm.sum!.magnitudeDb[i]).toBeCloseTo(ms.sum!.magnitudeDb[i], 6);
    // and the offset's time shows in that output's group delay
    const base = predictAcoustic(lr4Plan(() => {}), F);
    expect(ms.outputs[1].response.groupDelayMs[0] - base.outputs[1].response.groupDelayMs[0]).toBeCloseTo(0.25, 12);
    expect(ms.outputs[1].offsetMs).toBe(0.25);
  });

  it('the air temperature changes what a mm offset means', () => {
    const at = (t: number) => predictAcoustic(lr4Plan((pl) => { pl.airTemperatureC = t; pl.outputs[1].acousticOffset = { value: 100, unit: 'mm' }; }), F);
    expect(at(0).outputs[1].offsetMs).toBeCloseTo(100 / 331.3, 12);
    expect(at(40).outputs[1].offsetMs).toBeLessThan(at(0).outputs[1].offsetMs);
  });

  it('a muted output is predicted but left out of the sum; without measurements there is no sum', () => {
    const p = predictAcoustic(lr4Plan((pl) => (pl.outputs[1].mute = true)), F);
    expect(p.summed).toEqual(['lo']);
    expect(p.outputs[1].mute).toBe(true);
    expect(p.sum!.magnitudeDb[0]).toBeCloseTo(p.outputs[0].response.magnitudeDb[0], 12);
    const none = predictAcoustic(lr4Plan((pl) => { delete pl.outputs[0].driverMeasurementId; delete pl.outputs[1].driverMeasurementId; }), F);
    expect(none.sum).toBeNull();
    expect(none.unmeasured).toEqual(['lo', 'hi']);
  });

  it('a driver without phase gives a magnitude but no phase, and the sum has no value', () => {
    const p = predictAcoustic(lr4Plan((pl) => (pl.measurements![1] = { ...pl.measurements![1], phaseDeg: null })), F);
    expect(p.outputs[1].hasPhase).toBe(false);
    expect(p.outputs[1].response.magnitudeDb[2]).toBeCloseTo(-6.0206, 3); // LR4 at fc: -6.02 dB
    expect(p.outputs[1].response.phaseRad[2]).toBeNaN();
    expect(p.sum!.magnitudeDb[2]).toBeNaN();
  });

  it('a transform (smoothing, say) is applied to the measurement, not to the plan', () => {
    const pl = lr4Plan(() => {});
    const p = predictAcoustic(pl, F, { measurement: (m) => ({ ...m, magnitudeDb: m.magnitudeDb.map((x) => x + 3) }) });
    const base = predictAcoustic(pl, F);
    expect(p.outputs[0].response.magnitudeDb[0] - base.outputs[0].response.magnitudeDb[0]).toBeCloseTo(3, 12);
    expect(pl.measurements![0].magnitudeDb).toEqual([0, 0]);
  });
});
