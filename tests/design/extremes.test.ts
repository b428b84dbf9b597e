/**
 * Edge cases: a frequency a hair under Nyquist, Q of 0.05 and 50, gains of +/-30 dB, an
 * order-8 Bessel edge at 20 Hz at 192 kHz: finite numbers or a clear validation error, never NaN.
 * Then a sweep of every band type and every edge over extremes that the plan reader accepts.
 */
import { describe, expect, it } from 'vitest';
import { largestPoleRadius } from '../../src/analysis/poles';
import { BAND_PARAMETERS, designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import { isFiniteSection, type Section } from '../../src/design/section';
import { readPlanValue } from '../../src/plan/read';
import { BAND_TYPES, BESSEL_NORMALIZATIONS, LIMITS, type Band, type BandType, type Crossover } from '../../src/plan/types';
import { MAGNITUDE_FLOOR_DB } from '../../src/response/chain-response';
import { angleDiffDeg, DB_PER_NEPER, EPS, kernelAt, loadFixture, RAD2DEG, responseAt, sensitivity } from '../helpers/reference';

/** Asserts finite coefficients and a response with no NaN: magnitude not NaN, phase finite, group
 * delay finite wherever the magnitude is above the -200 dB floor (below it NaN is the "no value"
 * sentinel that the command line writes as null, cli.md). */
function expectSane(sections: Section[], fs: number, freqs: number[], what: string): void {
  for (const s of sections) expect(isFiniteSection(s), `${what}: coefficients ${JSON.stringify(s)}`).toBe(true);
  const r = responseAt(sections, freqs, fs);
  freqs.forEach((f, i) => {
    expect(Number.isNaN(r.magnitudeDb[i]), `${what}: magnitude at ${f} Hz`).toBe(false);
    expect(Number.isFinite(r.phaseRad[i]), `${what}: phase at ${f} Hz`).toBe(true);
    expect(Number.isFinite(r.phaseUnwrappedRad[i]), `${what}: unwrapped phase at ${f} Hz`).toBe(true);
    if (r.magnitudeDb[i] >= MAGNITUDE_FLOOR_DB) expect(Number.isFinite(r.groupDelayMs[i]), `${what}: group delay at ${f} Hz`).toBe(true);
    else expect(r.groupDelayMs[i]).toBeNaN();
  });
}

const RATES = [LIMITS.sampleRateMinHz, 44100, 48000, 96000, 192000, LIMITS.sampleRateMaxHz];
const band = (type: BandType, frequency: number, extra: Partial<Band> = {}): Band => ({ id: 'x', type, frequency, enabled: true, ...extra });
const gridFor = (fs: number, f0: number) => [0, 1, 20, f0 * 0.999, f0, f0 * 1.001, fs / 4, 0.45 * fs, 0.4999 * fs, fs / 2].filter((f) => f <= fs / 2);

/** The plan reader's verdict on one band or edge at a sample rate. */
function readBand(b: Record<string, unknown>, fs: number) {
  return readPlanValue({ format: 'biquadrant.plan', version: 1, name: 't', sampleRate: fs, input: { bands: [b] }, outputs: [{ id: 'o' }] });
}
function readEdge(e: Record<string, unknown>, fs: number) {
  return readPlanValue({ format: 'biquadrant.plan', version: 1, name: 't', sampleRate: fs, input: { bands: [] }, outputs: [{ id: 'o', lowPass: e }] });
}

/** The highest frequency the reader accepts at fs (bisection on the reader itself). */
function highestAccepted(fs: number): number {
  let lo = 0.49 * fs;
  let hi = fs / 2;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (mid === lo || mid === hi) break;
    if (readBand({ id: 'x', type: 'peaking', frequency: mid, gainDb: 3, q: 1 }, fs).ok) lo = mid;
    else hi = mid;
  }
  return lo;
}
function lowestAccepted(fs: number): number {
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (mid === lo || mid === hi) break;
    if (readBand({ id: 'x', type: 'peaking', frequency: mid, gainDb: 3, q: 1 }, fs).ok) hi = mid;
    else lo = mid;
  }
  return hi;
}

describe('frequency a hair under Nyquist', () => {
  it('exactly Nyquist and above are refused with the field path', () => {
    for (const fs of RATES) {
      for (const f of [fs / 2, fs]) {
        const r = readBand({ id: 'x', type: 'peaking', frequency: f, gainDb: 3, q: 1 }, fs);
        expect(r.ok).toBe(false);
        if (!r.ok) expect(r.error.message).toMatch(/^input\.bands\[0\]\.frequency: .*Nyquist/);
      }
    }
  });

  it('the last double below Nyquist is refused clearly (its designs degenerate to 0/0), not turned into NaN', () => {
    // Found by this suite: at fs/2 (1 - 2^-53) a cookbook low-pass rounds to
    // (1 + 2z^-1 + z^-2) / (1 + 2z^-1 + z^-2) and its response at f0 was NaN; within 1e-8 fs of
    // Nyquist, edges came out with a pole radius of 1 + 1e-8 (unstable). The reader now keeps
    // frequencies 1e-6 fs away from 0 and Nyquist (src/plan/read.ts FREQUENCY_EDGE_MARGIN).
    for (const fs of RATES) {
      const f = fs / 2 - (fs / 2) * Number.EPSILON;
      const r = readBand({ id: 'x', type: 'lowPass', frequency: f, q: 0.7 }, fs);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error.message).toMatch(/^input\.bands\[0\]\.frequency: is too close to Nyquist/);
      const e = readEdge({ family: 'bessel', order: 8, frequency: f }, fs);
      expect(e.ok).toBe(false);
      if (!e.ok) expect(e.error.path).toBe('outputs[0].lowPass.frequency');
    }
  });

  for (const fs of RATES) {
    it(`${fs} Hz: every band type and edge at the highest accepted frequency and just below is finite, no NaN`, () => {
      const top = highestAccepted(fs);
      expect(top).toBeGreaterThan(fs / 2 - 2e-6 * fs); // a hair: within two millionths of fs
      for (const f of [top, fs / 2 - 1e-5 * fs, 0.499 * fs]) {
        for (const type of BAND_TYPES) {
          if (type === 'raw') continue;
          for (const extra of [{ q: 0.05, gainDb: 30 }, { q: 50, gainDb: -30 }, { slope: 1, gainDb: 30 }, { q: LIMITS.qMax, gainDb: LIMITS.gainDbAbsMax }]) {
            const b = band(type, f, extra);
            expect(readBand({ ...b }, fs).ok).toBe(true);
            const secs = designBand(b, fs);
            expectSane(secs, fs, gridFor(fs, f), `${type} ${JSON.stringify(extra)} at ${f} / ${fs}`);
            expect(largestPoleRadius(secs), `${type} ${JSON.stringify(extra)}`).toBeLessThan(1);
          }
        }
        for (const e of allEdges(f)) {
          for (const kind of ['lowPass', 'highPass'] as const) {
            const secs = designEdge(e, kind, fs);
            expectSane(secs, fs, gridFor(fs, f), `${JSON.stringify(e)} ${kind} at ${fs}`);
            expect(largestPoleRadius(secs)).toBeLessThan(1);
          }
        }
      }
    });
  }
});

function allEdges(frequency: number): Crossover[] {
  const out: Crossover[] = [];
  for (let order = 1; order <= 8; order++) {
    out.push({ family: 'butterworth', order, frequency });
    if (order % 2 === 0) out.push({ family: 'linkwitz-riley', order, frequency });
    for (const normalization of BESSEL_NORMALIZATIONS) out.push({ family: 'bessel', order, frequency, normalization });
  }
  return out;
}

describe('the lowest accepted frequency', () => {
  for (const fs of RATES) {
    it(`${fs} Hz: 0 and negative refused; every band and edge at the lowest accepted frequency is finite at 0 Hz too`, () => {
      for (const f of [0, -1]) expect(readBand({ id: 'x', type: 'peaking', frequency: f, gainDb: 3, q: 1 }, fs).ok).toBe(false);
      const low = lowestAccepted(fs);
      expect(low).toBeLessThan(0.5); // a fraction of a hertz at any rate
      for (const f of [low, 1]) {
        for (const type of BAND_TYPES) {
          if (type === 'raw') continue;
          for (const extra of [{ q: 0.05, gainDb: -30 }, { q: 50, gainDb: 30 }, { slope: 1, gainDb: -30 }]) {
            expectSane(designBand(band(type, f, extra), fs), fs, gridFor(fs, f), `${type} ${JSON.stringify(extra)} at ${f} / ${fs}`);
          }
        }
        for (const e of allEdges(f)) {
          for (const kind of ['lowPass', 'highPass'] as const) {
            const secs = designEdge(e, kind, fs);
            expectSane(secs, fs, gridFor(fs, f), `${JSON.stringify(e)} ${kind} at ${fs}`);
            expect(largestPoleRadius(secs)).toBeLessThan(1);
          }
        }
      }
    });
  }
});

describe('Q of 0.05 and 50, gain of +/-30 dB', () => {
  it('every band type at every rate: finite, stable, no NaN; peaking reaches its gain at f0', () => {
    for (const fs of RATES) {
      for (const f0 of [10, 100, 1000, 0.3 * fs]) {
        for (const q of [0.05, 50]) {
          for (const g of [-30, 30]) {
            for (const type of BAND_TYPES) {
              if (type === 'raw') continue;
              const secs = designBand(band(type, f0, { q, gainDb: g }), fs);
              expectSane(secs, fs, gridFor(fs, f0), `${type} q ${q} g ${g} at ${f0} / ${fs}`);
              expect(largestPoleRadius(secs)).toBeLessThan(1);
            }
            // Cookbook: the peaking EQ has exactly its gain at f0 (1e-9 dB plus the float64
            // evaluation bound: a Q 50 band at 10 Hz / 384 kHz has |D| ~ 1e-6 at f0).
            const ps = designBand(band('peaking', f0, { q, gainDb: g }), fs);
            const p = kernelAt(ps, [f0], fs);
            const u = 8 * EPS * sensitivity(ps, (2 * Math.PI * f0) / fs);
            expect(Math.abs(p.magnitudeDb[0] - g)).toBeLessThan(1e-9 + DB_PER_NEPER * u);
          }
        }
      }
    }
  });
  it('Q beyond the limits and gains beyond +/-60 dB are refused with the field path', () => {
    const bad: [Record<string, unknown>, string][] = [
      [{ q: 0 }, 'q: must be from 0.01 to 1000'],
      [{ q: -1 }, 'q: must be from 0.01 to 1000'],
      // 5e-324 (the smallest double) made alpha Infinity and every coefficient NaN.
      [{ q: 5e-324 }, 'q: must be from 0.01 to 1000'],
      [{ q: LIMITS.qMax * 2 }, 'q: must be from 0.01 to 1000'],
      [{ gainDb: 61 }, 'gainDb: must be within'],
      [{ gainDb: -61 }, 'gainDb: must be within'],
      [{ slope: 0 }, 'slope: must be at least 0.01'],
      [{ slope: 5e-324 }, 'slope: must be at least 0.01'],
    ];
    for (const [extra, msg] of bad) {
      const r = readBand({ id: 'x', type: 'peaking', frequency: 1000, gainDb: 3, q: 1, ...extra }, 48000);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error.message).toContain(`input.bands[0].${msg}`);
    }
  });
  it('a shelf slope past the cookbook limit is refused (no real alpha), at the limit it designs', () => {
    const r = readBand({ id: 'x', type: 'lowShelf', frequency: 100, gainDb: 12, slope: 6 }, 48000);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.path).toBe('input.bands[0].slope');
  });
});

describe('order-8 Bessel edge at 20 Hz at 192 kHz, every normalization, low and high', () => {
  interface EdgeCase {
    family: string;
    order: number;
    kind: 'lowPass' | 'highPass';
    frequency: number;
    sampleRate: number;
    normalization?: 'phase' | 'delay' | 'magnitude';
    freqs: number[];
    design: { magnitudeDb: number[]; phaseDeg: number[]; groupDelaySamples: number[] };
  }
  const fx = loadFixture<EdgeCase>('bessel.json');
  for (const normalization of BESSEL_NORMALIZATIONS) {
    for (const kind of ['lowPass', 'highPass'] as const) {
      it(`${normalization} ${kind}: finite, stable, no NaN down to 0 Hz and up to Nyquist`, () => {
        const secs = designEdge({ family: 'bessel', order: 8, frequency: 20, normalization }, kind, 192000);
        expect(secs.length).toBe(4);
        expectSane(secs, 192000, [0, 0.01, 1, 2, 10, 19.99, 20, 20.01, 40, 200, 2000, 20000, 95000, 96000], 'bessel 8');
        const r = largestPoleRadius(secs);
        expect(r).toBeLessThan(1);
        // The slowest pole sits near 1 - 2 pi |p| 20 / 192000 (|p| up to 7 for "delay"): > 0.99.
        expect(r).toBeGreaterThan(0.99);
      });
    }
  }
  it('a 20 Hz edge scales the 40 Hz fixture by the frequency ratio (pre-warping is exact at any fc)', () => {
    // The bilinear design at fc evaluated at f depends only on tan(pi f/fs)/tan(pi fc/fs); so the
    // 20 Hz edge at f with tan(pi f/fs) = tan(pi fx/fs) tan(pi 20/fs)/tan(pi 40/fs) matches the
    // 40 Hz fixture (exact 50-digit design) at fx. Tolerance from the conditioning (cf. edges test):
    // 1e-6 dB, 1e-5 degrees.
    const fs = 192000;
    for (const c of fx.cases.filter((x) => x.order === 8 && x.frequency === 40 && x.sampleRate === fs)) {
      const secs = designEdge({ family: 'bessel', order: 8, frequency: 20, normalization: c.normalization }, c.kind, fs);
      const t = (f: number) => Math.tan((Math.PI * f) / fs);
      const mapped = c.freqs.map((f) => (Math.atan((t(f) * t(20)) / t(40)) * fs) / Math.PI);
      const k = kernelAt(secs, mapped, fs);
      mapped.forEach((f, i) => {
        expect(Math.abs(k.magnitudeDb[i] - c.design.magnitudeDb[i]), `${c.normalization} ${c.kind} at ${f}`).toBeLessThan(1e-6);
        expect(angleDiffDeg(k.phaseRad[i] * RAD2DEG, c.design.phaseDeg[i])).toBeLessThan(1e-5);
      });
    }
  });
});

describe('sweep of every band type over extremes the reader accepts', () => {
  it('no NaN in coefficients or response; every accepted band designs to finite sections', () => {
    let designed = 0;
    for (const fs of [LIMITS.sampleRateMinHz, 48000, LIMITS.sampleRateMaxHz]) {
      const fList = [lowestAccepted(fs), 0.01, 1, 20, 1000, fs / 4, 0.45 * fs, highestAccepted(fs)];
      for (const f of fList) {
        for (const type of BAND_TYPES) {
          if (type === 'raw') continue;
          // Only the parameters a type uses are varied (BAND_PARAMETERS); the others stay unset.
          const uses = BAND_PARAMETERS[type];
          for (const q of uses.q ? [undefined, LIMITS.qMin, 0.05, 0.7071, 50, LIMITS.qMax] : [undefined]) {
            for (const g of uses.gain ? [undefined, -LIMITS.gainDbAbsMax, -30, 0, 30, LIMITS.gainDbAbsMax] : [undefined]) {
              for (const slope of uses.slope ? [undefined, 0.01, 1] : [undefined]) {
                const b: Record<string, unknown> = { id: 'x', type, frequency: f };
                if (q !== undefined) b.q = q;
                if (g !== undefined) b.gainDb = g;
                if (slope !== undefined) b.slope = slope;
                const r = readBand(b, fs);
                if (!r.ok) {
                  // Only slopes past the cookbook limit, or 0.01 Hz below the 1e-6 fs floor, are refused here.
                  expect(['input.bands[0].slope', 'input.bands[0].frequency']).toContain(r.error.path);
                  if (r.error.path.endsWith('frequency')) expect(f).toBeLessThan(1e-6 * fs);
                  continue;
                }
                const band0 = r.plan.input.bands[0];
                expectSane(designBand(band0, fs), fs, gridFor(fs, f), `${JSON.stringify(b)} at ${fs}`);
                designed++;
              }
            }
          }
        }
      }
    }
    expect(designed).toBeGreaterThan(1500);
  });
  it('raw sections: finite after a0 normalization; a0 = 0 or a coefficient beyond +/-1000 after dividing by a0 is refused', () => {
    const ok = readBand({ id: 'r', type: 'raw', coefficients: { b0: 2, b1: 0.5, b2: 0.1, a0: 2, a1: -0.4, a2: 0.2 } }, 48000);
    expect(ok.ok).toBe(true);
    if (ok.ok) {
      const [s] = designBand(ok.plan.input.bands[0], 48000);
      expect(s).toEqual({ b0: 1, b1: 0.25, b2: 0.05, a1: -0.2, a2: 0.1 });
    }
    const zero = readBand({ id: 'r', type: 'raw', coefficients: { b0: 1, b1: 0, b2: 0, a0: 0, a1: 0, a2: 0 } }, 48000);
    expect(zero.ok).toBe(false);
    if (!zero.ok) expect(zero.error.message).toBe('input.bands[0].coefficients.a0: must not be 0');
    const tiny = readBand({ id: 'r', type: 'raw', coefficients: { b0: 1e300, b1: 0, b2: 0, a0: 1e-300, a1: 0, a2: 0 } }, 48000);
    expect(tiny.ok).toBe(false);
    if (!tiny.ok) expect(tiny.error.path).toBe('input.bands[0].coefficients.b0');
  });
});
