/**
 * Band designs against the Audio EQ Cookbook (R. Bristow-Johnson; also a W3C Working Group Note),
 * written independently in Python in tests/reference/make_fixtures.py, and first-order sections
 * against scipy.signal.bilinear (fixtures record the calls and versions). Then the cookbook's
 * facts (references.md, "Biquad formulas").
 */
import { describe, expect, it } from 'vitest';
import { bandwidthOctavesFromQ, designBand, maxShelfSlope, qFromBandwidthOctaves } from '../../src/design/cookbook';
import type { Band, BandType } from '../../src/plan/types';
import { angleDiffDeg, DB_PER_NEPER, EPS, groupDelaySensitivity, kernelAt, loadFixture, RAD2DEG, sensitivity } from '../helpers/reference';

interface BandCase {
  type: BandType;
  frequency: number;
  sampleRate: number;
  gainDb?: number;
  q?: number;
  slope?: number;
  bandwidthOct?: number;
  call?: string;
  section: number[];
  freqs: number[];
  exact: { magnitudeDb: number[]; phaseDeg: number[]; groupDelaySamples: number[] };
}

const band = (type: BandType, frequency: number, extra: Partial<Band> = {}): Band => ({ id: 'x', type, frequency, enabled: true, ...extra });
const one = (b: Band, fs: number) => {
  const s = designBand(b, fs);
  expect(s.length).toBe(1);
  return s[0];
};

function checkBandFile(name: string, expected: number): void {
  const fx = loadFixture<BandCase>(name);
  describe(`${name} (scipy ${fx.meta.scipy}, mpmath ${fx.meta.mpmath})`, () => {
    it('holds the expected cases', () => expect(fx.cases.length).toBe(expected));
    for (const c of fx.cases) {
      const param = c.bandwidthOct !== undefined ? `BW ${c.bandwidthOct.toFixed(4)} oct` : c.slope !== undefined ? `S ${c.slope}` : c.q !== undefined ? `Q ${c.q}` : '';
      const label = `${c.type} ${c.frequency} Hz at ${c.sampleRate} Hz${c.gainDb !== undefined ? ` ${c.gainDb} dB` : ''} ${param}`;
      it(`${label}: coefficients and exact response`, () => {
        // A bandwidth is turned into Q by the core's conversion (cookbook "BW" case); the Python
        // side uses the cookbook's alpha-from-BW formula directly.
        const q = c.bandwidthOct !== undefined ? qFromBandwidthOctaves(c.bandwidthOct, c.frequency, c.sampleRate) : c.q;
        const s = one(band(c.type, c.frequency, { gainDb: c.gainDb, q, slope: c.slope }), c.sampleRate);
        // Same formulas in the same double arithmetic: a few ulps at most (measured: identical).
        [s.b0, s.b1, s.b2, s.a1, s.a2].forEach((x, i) => {
          expect(Math.abs(x - c.section[i]), `coefficient ${i}`).toBeLessThanOrEqual(8 * Number.EPSILON * Math.max(1, Math.abs(c.section[i])));
        });
        const k = kernelAt([s], c.freqs, c.sampleRate);
        c.freqs.forEach((f, i) => {
          // 1e-9 dB / 1e-7 degrees / 1e-9 relative group delay, plus the float64 evaluation bound
          // (8 ulps times the section's sensitivity, tests/helpers/reference.ts): a 31.5 Hz section
          // at 192 kHz has |D| ~ 1e-7 near DC and cannot be evaluated to 1e-9 dB by anyone.
          const w = (2 * Math.PI * f) / c.sampleRate;
          const u = 8 * EPS * sensitivity([s], w);
          const ref = c.exact.magnitudeDb[i];
          if (ref < -200) {
            // Inside a notch's null: both sides are "no signal"; the digits are rounding noise.
            expect(k.magnitudeDb[i], `magnitude at ${f}`).toBeLessThan(-150);
            return;
          }
          expect(Math.abs(k.magnitudeDb[i] - ref), `magnitude at ${f}`).toBeLessThan(1e-9 + DB_PER_NEPER * u);
          expect(angleDiffDeg(k.phaseRad[i] * RAD2DEG, c.exact.phaseDeg[i]), `phase at ${f}`).toBeLessThan(1e-7 + RAD2DEG * u);
          const g = c.exact.groupDelaySamples[i];
          const ug = 8 * EPS * groupDelaySensitivity([s], w);
          expect(Math.abs(k.groupDelaySamples[i] - g), `group delay at ${f}`).toBeLessThan(1e-9 * Math.max(1, Math.abs(g)) + ug);
        });
      });
    }
  });
}

checkBandFile('cookbook.json', 104);
checkBandFile('first-order.json', 36);

const RATES = [44100, 48000, 96000, 192000];
const logGrid = (from: number, to: number, n: number) => Array.from({ length: n }, (_, i) => from * Math.pow(to / from, i / (n - 1)));

describe('cookbook facts', () => {
  it('a peaking boost and the cut of the same |gain| and Q cancel exactly (product = 1 on the unit circle)', () => {
    // Cookbook: A -> 1/A swaps the numerator and the denominator of the peaking section.
    for (const fs of RATES) {
      for (const f0 of [20, 63, 1000, 8000, 0.45 * fs]) {
        for (const q of [0.05, 0.7, 4, 50]) {
          for (const g of [0.5, 6, 12, 30]) {
            const up = one(band('peaking', f0, { gainDb: g, q }), fs);
            const dn = one(band('peaking', f0, { gainDb: -g, q }), fs);
            const freqs = logGrid(10, 0.499 * fs, 40);
            const k = kernelAt([up, dn], freqs, fs);
            freqs.forEach((f, i) => {
              // Rounding only: 1e-9 dB and 1e-7 degrees plus the float64 evaluation bound (a Q 50
              // band at 20 Hz / 44.1 kHz has |D| ~ 1e-5 near f0).
              const u = 8 * EPS * sensitivity([up, dn], (2 * Math.PI * f) / fs);
              expect(Math.abs(k.magnitudeDb[i]), `${fs} ${f0} ${q} ${g} at ${f}`).toBeLessThan(1e-9 + DB_PER_NEPER * u);
              expect(angleDiffDeg(k.phaseRad[i] * RAD2DEG, 0)).toBeLessThan(1e-7 + RAD2DEG * u);
            });
          }
        }
      }
    }
  });

  /** Frequencies below and above f0 where the magnitude crosses `level` dB (bisection on log f). */
  function crossings(s: ReturnType<typeof one>, f0: number, fs: number, level: number): [number, number] {
    const mag = (f: number) => kernelAt([s], [f], fs).magnitudeDb[0];
    const find = (lo: number, hi: number) => {
      const sLo = Math.sign(mag(lo) - level);
      for (let i = 0; i < 200; i++) {
        const m = Math.sqrt(lo * hi);
        if (Math.sign(mag(m) - level) === sLo) lo = m;
        else hi = m;
      }
      return Math.sqrt(lo * hi);
    };
    return [find(f0 / 1e4, f0), find(f0, 0.4999999 * fs)];
  }

  it('peaking: the half-gain (in dB) points lie at the Q bandwidth in the pre-warped frequency (exact)', () => {
    // Cookbook: for the peaking EQ, BW is between the midpoint (dBgain/2) frequencies, and in the
    // analog prototype 1/Q = 2 sinh(ln2/2 BW). The bilinear transform maps f to tan(pi f/fs), so in
    // that variable the relation is exact: log2(tan(pi f2/fs) / tan(pi f1/fs)) = 2 asinh(1/2Q) / ln2,
    // and the points are geometrically centred on tan(pi f0/fs). Tolerance 1e-9 (bisection + rounding).
    for (const fs of RATES) {
      for (const f0 of [100, 1000, 10000]) {
        for (const q of [0.3, 1.41, 6]) {
          for (const g of [-12, 6, 30]) {
            const s = one(band('peaking', f0, { gainDb: g, q }), fs);
            const [f1, f2] = crossings(s, f0, fs, g / 2);
            const t = (f: number) => Math.tan((Math.PI * f) / fs);
            const bwWarped = Math.log2(t(f2) / t(f1));
            expect(Math.abs(bwWarped - (2 * Math.asinh(1 / (2 * q))) / Math.LN2)).toBeLessThan(1e-9);
            expect(Math.abs(t(f1) * t(f2) - t(f0) ** 2) / t(f0) ** 2).toBeLessThan(1e-9);
          }
        }
      }
    }
  });

  it('peaking: measured half-gain bandwidth matches the BW <-> Q conversion (cookbook w0/sin w0 form)', () => {
    // The cookbook's digital correction w0/sin(w0) compensates the warping to first order only: it
    // is close for f0 well below Nyquist. Measured deviation: 2e-5 oct at 100 Hz / 48 kHz,
    // 2.3e-4 oct at 1 kHz / 48 kHz, 5e-3 oct at 10 kHz / 48 kHz, and it grows with the bandwidth.
    // Checked for f0 <= fs/40 at 0.2% of the bandwidth (measured worst 0.15%, 2 octaves at fs/40).
    for (const fs of RATES) {
      for (const f0 of [50, 200, fs / 40]) {
        for (const bw of [1 / 6, 1 / 3, 1, 2]) {
          const q = qFromBandwidthOctaves(bw, f0, fs);
          expect(Math.abs(bandwidthOctavesFromQ(q, f0, fs) - bw)).toBeLessThan(1e-12); // inverse pair
          for (const g of [-9, 12]) {
            const [f1, f2] = crossings(one(band('peaking', f0, { gainDb: g, q }), fs), f0, fs, g / 2);
            expect(Math.abs(Math.log2(f2 / f1) - bw), `${f0} Hz ${bw} oct ${g} dB`).toBeLessThan(2e-3 * bw);
          }
        }
      }
    }
  });

  it("a shelf's f0 is where the gain is half the dB gain (every Q and S)", () => {
    // Derived: the analog cookbook shelf has |H(j w0)| = sqrt(A) = 10^(gain/40) for any alpha, and
    // the pre-warped bilinear transform keeps w0 in place. Tolerance 1e-9 dB.
    for (const fs of RATES) {
      for (const f0 of [30, 300, 3000, 15000]) {
        for (const g of [-30, -6, 3, 12, 30]) {
          for (const shape of [{ q: 0.5 }, { q: 2 }, { slope: 0.3 }, { slope: 1 }]) {
            for (const type of ['lowShelf', 'highShelf'] as const) {
              const s = one(band(type, f0, { gainDb: g, ...shape }), fs);
              const u = 8 * EPS * sensitivity([s], (2 * Math.PI * f0) / fs);
              expect(Math.abs(kernelAt([s], [f0], fs).magnitudeDb[0] - g / 2), `${type} ${f0} Hz ${g} dB at ${fs}`).toBeLessThan(1e-9 + DB_PER_NEPER * u);
            }
          }
        }
      }
    }
  });

  it('shelves reach their gain: low shelf 0 dB at Nyquist and G at DC; high shelf the other way', () => {
    for (const g of [-12, 6]) {
      const lo = one(band('lowShelf', 500, { gainDb: g, slope: 1 }), 48000);
      const hi = one(band('highShelf', 500, { gainDb: g, slope: 1 }), 48000);
      const k = kernelAt([lo], [0, 24000], 48000);
      expect(Math.abs(k.magnitudeDb[0] - g)).toBeLessThan(1e-9);
      expect(Math.abs(k.magnitudeDb[1])).toBeLessThan(1e-9);
      const h = kernelAt([hi], [0, 24000], 48000);
      expect(Math.abs(h.magnitudeDb[0])).toBeLessThan(1e-9);
      expect(Math.abs(h.magnitudeDb[1] - g)).toBeLessThan(1e-9);
    }
  });

  it('S = 1 shelves are monotonic; a steeper S overshoots (cookbook: S = 1 is the steepest monotonic shelf)', () => {
    const freqs = logGrid(5, 23900, 2000);
    const monotonic = (db: Float64Array, dir: number) => {
      let worst = 0;
      for (let i = 1; i < db.length; i++) worst = Math.max(worst, -dir * (db[i] - db[i - 1]));
      return worst; // largest step against the expected direction
    };
    for (const g of [-24, -6, 6, 24]) {
      for (const f0 of [100, 1000, 5000]) {
        // Low shelf with positive gain falls with frequency (dir -1); a high shelf rises.
        for (const [type, sign] of [['lowShelf', -1], ['highShelf', 1]] as const) {
          const dir = sign * Math.sign(g);
          const m = kernelAt([one(band(type, f0, { gainDb: g, slope: 1 }), 48000)], freqs, 48000).magnitudeDb;
          expect(monotonic(m, dir), `${type} ${g} dB ${f0} Hz S=1`).toBeLessThan(1e-9);
          const steep = Math.min(2, maxShelfSlope(g));
          const m2 = kernelAt([one(band(type, f0, { gainDb: g, slope: steep }), 48000)], freqs, 48000).magnitudeDb;
          expect(monotonic(m2, dir), `${type} ${g} dB ${f0} Hz S=${steep}`).toBeGreaterThan(1e-4);
        }
      }
    }
  });

  it('a shelf with both q and slope uses q (plan-format.md: "q wins if both"); no q and no slope is S = 1', () => {
    for (const type of ['lowShelf', 'highShelf'] as const) {
      const both = one(band(type, 300, { gainDb: 6, q: 2.5, slope: 0.4 }), 48000);
      const qOnly = one(band(type, 300, { gainDb: 6, q: 2.5 }), 48000);
      expect(both).toEqual(qOnly);
      expect(one(band(type, 300, { gainDb: 6 }), 48000)).toEqual(one(band(type, 300, { gainDb: 6, slope: 1 }), 48000));
      expect(both).not.toEqual(one(band(type, 300, { gainDb: 6, slope: 0.4 }), 48000));
    }
  });

  it('maxShelfSlope is the limit where the cookbook alpha stays real', () => {
    for (const g of [1, 6, 12, 30]) {
      const A = Math.pow(10, g / 40);
      const S = maxShelfSlope(g);
      expect(Math.abs((A + 1 / A) * (1 / S - 1) + 2)).toBeLessThan(1e-12);
    }
    expect(maxShelfSlope(0)).toBe(Infinity);
  });

  it('pass types: -3.01 dB at f0 for Q = 1/sqrt 2 (low/high-pass), 0 dB peak (bandPass), null (notch), 0 dB (allPass)', () => {
    // Cookbook: the 2nd-order low/high-pass has |H(w0)| = Q; bandPass peaks at 0 dB at w0; the
    // notch has a zero on the unit circle at w0; the all-pass has unit magnitude and -180 deg at w0.
    for (const fs of RATES) {
      for (const f0 of [40, 1000, 12000]) {
        for (const q of [0.5, Math.SQRT1_2, 3]) {
          const at = (type: BandType, f = f0) => kernelAt([one(band(type, f0, { q }), fs)], [f], fs);
          expect(Math.abs(at('lowPass').magnitudeDb[0] - 20 * Math.log10(q))).toBeLessThan(1e-9);
          expect(Math.abs(at('highPass').magnitudeDb[0] - 20 * Math.log10(q))).toBeLessThan(1e-9);
          expect(Math.abs(at('bandPass').magnitudeDb[0])).toBeLessThan(1e-9);
          expect(at('notch').magnitudeDb[0]).toBeLessThan(-200);
          const ap = kernelAt([one(band('allPass', f0, { q }), fs)], logGrid(10, 0.49 * fs, 50), fs);
          ap.magnitudeDb.forEach((m) => expect(Math.abs(m)).toBeLessThan(1e-9));
          expect(angleDiffDeg(at('allPass').phaseRad[0] * RAD2DEG, 180)).toBeLessThan(1e-7);
        }
      }
    }
  });
});

describe('first-order sections (references.md: k = tan(pi f / fs); low-pass b0 = b1 = k/(1+k), a1 = (k-1)/(k+1))', () => {
  it('low-pass coefficients are the published formula', () => {
    for (const fs of RATES) {
      for (const f of [20, 1000, 15000]) {
        const k = Math.tan((Math.PI * f) / fs);
        const s = one(band('lowPass1', f), fs);
        expect(s.b0).toBeCloseTo(k / (1 + k), 15);
        expect(s.b1).toBeCloseTo(k / (1 + k), 15);
        expect(s.a1).toBeCloseTo((k - 1) / (k + 1), 15);
        expect(s.b2).toBe(0);
        expect(s.a2).toBe(0);
      }
    }
  });
  it('-3.01 dB at f (low and high), -45 / +45 degrees; all-pass flat with -90 degrees at f', () => {
    for (const fs of RATES) {
      for (const f of [20, 1000, 15000]) {
        const lp = kernelAt([one(band('lowPass1', f), fs)], [f], fs);
        const hp = kernelAt([one(band('highPass1', f), fs)], [f], fs);
        expect(Math.abs(lp.magnitudeDb[0] + 10 * Math.log10(2))).toBeLessThan(1e-9);
        expect(Math.abs(hp.magnitudeDb[0] + 10 * Math.log10(2))).toBeLessThan(1e-9);
        expect(angleDiffDeg(lp.phaseRad[0] * RAD2DEG, -45)).toBeLessThan(1e-7);
        expect(angleDiffDeg(hp.phaseRad[0] * RAD2DEG, 45)).toBeLessThan(1e-7);
        const ap = kernelAt([one(band('allPass1', f), fs)], [f / 10, f, Math.min(f * 10, 0.49 * fs)], fs);
        ap.magnitudeDb.forEach((m) => expect(Math.abs(m)).toBeLessThan(1e-9));
        expect(angleDiffDeg(ap.phaseRad[1] * RAD2DEG, -90)).toBeLessThan(1e-7);
      }
    }
  });
});
