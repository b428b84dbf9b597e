/**
 * Analog prototypes of bands and edges against scipy.signal.freqs / freqs_zpk on the same
 * s-domain designs, written independently in tests/reference/make_analog_fixtures.py (the
 * fixture records each call). Tolerances: the two evaluate the same rational function in double
 * precision, so they agree to rounding (1e-9 dB, 1e-7 degrees); the group delay is mpmath.diff
 * at 30 digits (1e-9 relative).
 */
import { describe, expect, it } from 'vitest';
import { analogComplex, analogMagnitudeDb, bandPrototype, bilinearLowFrequencyDelayRatio, edgeAnalogPrototype } from '../../src/design/analog';
import { designEdge } from '../../src/design/crossover';
import { responseAt } from '../helpers/reference';
import type { Band, Crossover, EdgeKind } from '../../src/plan/types';
import { angleDiffDeg, loadFixture } from '../helpers/reference';

interface AnalogCase {
  kind: string;
  band?: Band;
  edge?: Crossover;
  edgeKind?: EdgeKind;
  frequencies: number[];
  magnitudeDb: number[];
  phaseDeg: number[];
  groupDelayMs?: number[];
  call: string;
}

const cases = loadFixture<AnalogCase>('analog.json').cases.filter((c) => c.kind === 'band' || c.kind === 'edge');

describe('analog prototypes (scipy.signal.freqs)', () => {
  it('covers every band type but raw and every edge family', () => {
    const types = new Set(cases.filter((c) => c.band).map((c) => c.band!.type));
    expect(types.size).toBe(11);
    expect(new Set(cases.filter((c) => c.edge).map((c) => c.edge!.family)).size).toBe(3);
  });
  for (const c of cases) {
    const name = c.band ? `${c.band.type} ${c.band.frequency} Hz` : `${c.edge!.family} ${c.edge!.order} ${c.edgeKind} ${c.edge!.frequency} Hz`;
    it(`${name}: ${c.call}`, () => {
      const proto = c.band ? bandPrototype(c.band) : edgeAnalogPrototype(c.edge!, c.edgeKind!);
      expect(proto).not.toBeNull();
      const h = analogComplex([proto!], c.frequencies);
      const db = analogMagnitudeDb(h);
      c.frequencies.forEach((f, i) => {
        if (c.magnitudeDb[i] < -300) {
          expect(db[i]).toBeLessThan(-250);
          return;
        }
        expect(Math.abs(db[i] - c.magnitudeDb[i]), `${f} Hz`).toBeLessThan(1e-9);
        expect(angleDiffDeg((Math.atan2(h.im[i], h.re[i]) * 180) / Math.PI, c.phaseDeg[i]), `${f} Hz`).toBeLessThan(1e-7);
        if (c.groupDelayMs) {
          const ms = h.groupDelayS[i] * 1000;
          expect(Math.abs(ms - c.groupDelayMs[i]), `${f} Hz`).toBeLessThanOrEqual(1e-9 * Math.abs(c.groupDelayMs[i]) + 1e-15);
        }
      });
    });
  }

  it('raw bands have no analog prototype', () => {
    expect(bandPrototype({ id: 'r', type: 'raw', frequency: 1000, enabled: true, coefficients: { b0: 1, b1: 0, b2: 0, a0: 1, a1: 0, a2: 0 } })).toBeNull();
  });

  it('a pure delay adds its time to the group delay and turns the phase by -2 pi f D', () => {
    const proto = bandPrototype({ id: 'p', type: 'peaking', frequency: 1000, gainDb: 6, q: 1, enabled: true })!;
    const a = analogComplex([proto], [500, 3000]);
    const b = analogComplex([proto], [500, 3000], 1, 0.001);
    for (let i = 0; i < 2; i++) {
      expect(b.groupDelayS[i] - a.groupDelayS[i]).toBeCloseTo(0.001, 15);
      expect(Math.hypot(b.re[i], b.im[i])).toBeCloseTo(Math.hypot(a.re[i], a.im[i]), 12);
    }
  });
});

interface DelayCase {
  kind: string;
  order: number;
  frequency: number;
  sampleRate: number;
  delayAt1HzS: number;
  promisedS: number;
  ratio: number;
}

describe('the Bessel "delay" normalization after the bilinear transform (scipy.signal.bessel, 50-digit group delay)', () => {
  const cases = loadFixture<DelayCase>('analog.json').cases.filter((c) => c.kind === 'besselDelay');
  it('holds 2.2 kHz and 16 kHz at 48 kHz', () => expect(cases.map((c) => c.frequency)).toEqual(expect.arrayContaining([2200, 16000])));
  for (const c of cases) {
    it(`order ${c.order} at ${c.frequency} Hz, ${c.sampleRate} Hz: the low-frequency delay is ${(100 * (1 - c.ratio)).toFixed(1)} % short`, () => {
      expect(bilinearLowFrequencyDelayRatio(c.frequency, c.sampleRate)).toBeCloseTo(c.ratio, 6);
      const r = responseAt(designEdge({ family: 'bessel', order: c.order, frequency: c.frequency, normalization: 'delay' }, 'lowPass', c.sampleRate), [1], c.sampleRate);
      expect(r.groupDelayMs[0] / 1000 / c.delayAt1HzS).toBeCloseTo(1, 8);
    });
  }
  it('0.7 % short at 2.2 kHz and 40 % short at 16 kHz, at 48 kHz', () => {
    expect(1 - bilinearLowFrequencyDelayRatio(2200, 48000)).toBeCloseTo(0.007, 3);
    expect(1 - bilinearLowFrequencyDelayRatio(16000, 48000)).toBeCloseTo(0.4, 1);
  });
});
