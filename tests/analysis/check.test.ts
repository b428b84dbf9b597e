/**
 * Analysis: poles and zeros of designed sections against the bilinear map of the 50-digit
 * prototype poles (prototypes.json), the stability triangle, headroom, the warnings of `check`, and
 * an analysis that reuses parts of an earlier one equal to a fresh one.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzePlan } from '../../src/analysis/check';
import { diagnosticMessage, targetPath } from '../../src/diagnostics';
import { headroom } from '../../src/analysis/headroom';
import { isStable, largestPoleRadius, sectionPoles, sectionZeros, type Root } from '../../src/analysis/poles';
import { designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import { readPlanText, readPlanValue } from '../../src/plan/read';
import type { BesselNormalization, Plan } from '../../src/plan/types';
import { kernelAt, loadFixture } from '../helpers/reference';
import { readFileSync } from 'node:fs';
import * as edits from '../../src/ui/edits';

interface ProtoCase {
  family: 'butterworth' | 'bessel';
  order: number;
  normalization?: BesselNormalization;
  poles: [number, number][];
}

/** Complex helpers on [re, im]. */
const div = (a: number[], b: number[]) => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};

/** Greedy matching distance between two root sets of equal size. */
function matchDistance(got: Root[], want: number[][]): number {
  const left = [...want];
  let worst = 0;
  for (const g of got) {
    let best = 0;
    for (let i = 1; i < left.length; i++) if (Math.hypot(g.re - left[i][0], g.im - left[i][1]) < Math.hypot(g.re - left[best][0], g.im - left[best][1])) best = i;
    worst = Math.max(worst, Math.hypot(g.re - left[best][0], g.im - left[best][1]));
    left.splice(best, 1);
  }
  return worst;
}

describe('poles of designed edges = bilinear map of the prototype poles', () => {
  // Derived: with K = tan(pi fc / fs), the pre-warped bilinear transform sends an analog low-pass
  // pole p (of the 1 rad/s prototype) to z = (1 + p K) / (1 - p K), a high-pass pole (1/p) to
  // z = (1 + K/p) / (1 - K/p); zeros go to z = -1 (low-pass) and z = +1 (high-pass).
  // Tolerance 1e-10: roots of rounded quadratics, poles of a 40 Hz edge at 192 kHz lie 1e-3 apart.
  const fx = loadFixture<ProtoCase>('prototypes.json');
  for (const c of fx.cases) {
    for (const [fc0, fs] of [
      [1000, 48000],
      [40, 192000],
    ]) {
      it(`${c.family} ${c.order}${c.normalization ? ' ' + c.normalization : ''} at ${fc0} Hz / ${fs} Hz`, () => {
        const K = Math.tan((Math.PI * fc0) / fs);
        const all: number[][] = [];
        for (const [re, im] of c.poles) {
          all.push([re, im]);
          if (im !== 0) all.push([re, -im]);
        }
        for (const kind of ['lowPass', 'highPass'] as const) {
          const edge = c.family === 'butterworth' ? { family: 'butterworth' as const, order: c.order, frequency: fc0 } : { family: 'bessel' as const, order: c.order, frequency: fc0, normalization: c.normalization };
          const secs = designEdge(edge, kind, fs);
          const poles = secs.flatMap(sectionPoles);
          const want = all.map(([re, im]) => {
            const q = kind === 'lowPass' ? [re * K, im * K] : div([K, 0], [re, im]);
            return div([1 + q[0], q[1]], [1 - q[0], -q[1]]);
          });
          expect(poles.length).toBe(c.order);
          expect(matchDistance(poles, want)).toBeLessThan(1e-10);
          const zeros = secs.flatMap(sectionZeros);
          expect(zeros.length).toBe(c.order);
          for (const z of zeros) expect(Math.hypot(z.re - (kind === 'lowPass' ? -1 : 1), z.im)).toBeLessThan(1e-6);
          expect(largestPoleRadius(secs)).toBeLessThan(1);
        }
      });
    }
  }
});

describe('stability', () => {
  it('a second-order section is stable iff |a2| < 1 and |a1| < 1 + a2 (the stability triangle)', () => {
    fc.assert(
      fc.property(fc.double({ min: -3, max: 3, noNaN: true }), fc.double({ min: -2, max: 2, noNaN: true }), (a1, a2) => {
        const margin = Math.min(Math.abs(Math.abs(a2) - 1), Math.abs(Math.abs(a1) - (1 + a2)));
        fc.pre(margin > 1e-9 && a2 !== 0);
        const triangle = Math.abs(a2) < 1 && Math.abs(a1) < 1 + a2;
        expect(isStable({ b0: 1, b1: 0, b2: 0, a1, a2 })).toBe(triangle);
      }),
      { numRuns: 2000, seed: 3 },
    );
  });
  it('notch zeros lie on the unit circle at +/- w0; peaking poles at radius sqrt(a2)', () => {
    const [n] = designBand({ id: 'n', type: 'notch', frequency: 1000, q: 3, enabled: true }, 48000);
    const w0 = (2 * Math.PI * 1000) / 48000;
    const zs = sectionZeros(n);
    for (const z of zs) {
      expect(Math.hypot(z.re, z.im)).toBeCloseTo(1, 12);
      expect(Math.abs(Math.atan2(Math.abs(z.im), z.re) - w0)).toBeLessThan(1e-12);
    }
    const [p] = designBand({ id: 'p', type: 'peaking', frequency: 1000, q: 3, gainDb: 6, enabled: true }, 48000);
    for (const z of sectionPoles(p)) expect(Math.hypot(z.re, z.im)).toBeCloseTo(Math.sqrt(p.a2), 14);
  });
});

describe('headroom (largest gain over 0 Hz .. Nyquist; docs/references.md, "Headroom and the worst-case peak")', () => {
  it('a peaking boost: its gain at its frequency, output gain added, polarity ignored', () => {
    for (const fs of [44100, 48000, 96000]) {
      for (const f0 of [37, 1000, 9000]) {
        for (const g of [1, 6, 15]) {
          const secs = designBand({ id: 'p', type: 'peaking', frequency: f0, q: 2, gainDb: g, enabled: true }, fs);
          for (const gain of [1, -1, Math.pow(10, -2 / 20)]) {
            const h = headroom(secs, gain, fs);
            // The cookbook peak is exactly at f0 (1e-9 dB after the search; 1e-5 relative in f).
            expect(Math.abs(h.peakDb - (g + 20 * Math.log10(Math.abs(gain))))).toBeLessThan(1e-9);
            expect(Math.abs(h.frequencyHz / f0 - 1)).toBeLessThan(1e-5);
          }
        }
      }
    }
  });
  it('a low shelf peaks at 0 Hz with its full gain (cookbook: H(1) = A^2), said to lie outside 20 Hz - 20 kHz', () => {
    const secs = designBand({ id: 's', type: 'lowShelf', frequency: 200, slope: 1, gainDb: 6, enabled: true }, 48000);
    const h = headroom(secs, 1, 48000);
    expect(h.frequencyHz).toBeLessThan(20);
    expect(h.outsideAudioBand).toBe(true);
    expect(Math.abs(h.peakDb - 6)).toBeLessThan(1e-9);
  });
  it('a plain LR4 crossover output never boosts (headroom <= 0 dB)', () => {
    for (const kind of ['lowPass', 'highPass'] as const) {
      expect(headroom(designEdge({ family: 'linkwitz-riley', order: 4, frequency: 2000 }, kind, 48000), 1, 48000).peakDb).toBeLessThanOrEqual(1e-9);
    }
  });
});

describe('warnings of check', () => {
  const plan = (outputs: unknown[], input: unknown[] = []): Plan => {
    const r = readPlanValue({ format: 'biquadrant.plan', version: 2, name: 'w', sampleRate: 48000, input: { bands: input }, outputs });
    if (!r.ok) throw new Error(r.error.message);
    return r.plan;
  };
  const codes = (p: Plan) => analyzePlan(p).warnings.map((w) => `${w.severity}:${w.code}:${targetPath(w.target)}`);
  it('a clean LR4 two-way has none', () => {
    const lr = { family: 'linkwitz-riley', order: 4, frequency: 2000 };
    expect(codes(plan([{ id: 'woofer', lowPass: lr }, { id: 'tweeter', highPass: lr }]))).toEqual([]);
  });
  it('an unstable raw band is a danger; a boost over 6 dB is a danger, up to 6 dB a warning', () => {
    const p = plan([
      { id: 'a', bands: [{ id: 'r', type: 'raw', coefficients: { b0: 1, b1: 0, b2: 0, a1: 0, a2: 1.2 } }] },
      { id: 'b', bands: [{ id: 'p', type: 'peaking', frequency: 100, gainDb: 9, q: 1 }] },
      { id: 'c', bands: [{ id: 'p', type: 'peaking', frequency: 100, gainDb: 3, q: 1 }] },
    ]);
    const c = codes(p);
    expect(c).toContain('danger:unstable:a');
    expect(c).toContain('danger:headroom:b');
    expect(c).toContain('warning:headroom:c');
  });
  it('frequencies above 0.9 Nyquist are flagged, input and outputs; a top way without a high-pass is a danger', () => {
    const p = plan(
      [
        { id: 'low', lowPass: { family: 'butterworth', order: 2, frequency: 22000 } },
        { id: 'top', bands: [{ id: 'x', type: 'notch', frequency: 23000, q: 2 }] },
      ],
      [{ id: 'i', type: 'peaking', frequency: 21700, gainDb: -3, q: 1 }],
    );
    const c = codes(p);
    expect(c).toContain('warning:near-nyquist:input/i');
    expect(c).toContain('warning:near-nyquist:low');
    expect(c).toContain('warning:near-nyquist:top/x');
    expect(c).toContain('danger:no-high-pass:top');
  });
});

/**
 * The "high-frequency output with no high-pass" warning of `check` (README, the command table:
 * `check` prints the warnings). A high-pass band of the
 * output's own chain (the cookbook 2nd-order or the 1st-order high-pass) is a high-pass too; a
 * disabled one is not, and neither is a high-pass in the shared input chain alone (a tweeter
 * high-passed by a band must not be flagged "danger").
 */
function warnedNoHighPass(tweeterBands: unknown[], inputBands: unknown[] = []): boolean {
  const r = readPlanValue({
    format: 'biquadrant.plan',
    version: 2,
    name: 'hp',
    sampleRate: 48000,
    input: { bands: inputBands },
    outputs: [
      { id: 'woofer', lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 } },
      { id: 'tweeter', bands: tweeterBands },
    ],
  });
  if (!r.ok) throw new Error(r.error.message);
  return analyzePlan(r.plan).warnings.some((w) => w.code === 'no-high-pass' && targetPath(w.target) === 'tweeter');
}

describe('no-high-pass warning', () => {
  it('is given for a tweeter with no high-pass at all', () => {
    expect(warnedNoHighPass([{ id: 'p', type: 'peaking', frequency: 5000, gainDb: -2, q: 1 }])).toBe(true);
  });
  it('is not given when the tweeter has its own high-pass band (2nd or 1st order)', () => {
    expect(warnedNoHighPass([{ id: 'hp', type: 'highPass', frequency: 2000, q: 0.7071 }])).toBe(false);
    expect(warnedNoHighPass([{ id: 'hp', type: 'highPass1', frequency: 2000 }])).toBe(false);
  });
  it('is still given when that band is disabled, or the only high-pass is the shared input chain', () => {
    expect(warnedNoHighPass([{ id: 'hp', type: 'highPass', frequency: 2000, q: 0.7071, enabled: false }])).toBe(true);
    expect(warnedNoHighPass([], [{ id: 'sub', type: 'highPass', frequency: 25, q: 0.7071 }])).toBe(true);
  });
});

/**
 * analyzePlan reuses an output's analysis while that output, the input chain and the sample rate
 * are the same objects (plans are immutable; edits replace what they touch). Whatever it reuses,
 * the result must equal an analysis from scratch (a structurally equal copy of the plan shares
 * no objects, so nothing is reused there) after each kind of edit.
 */
function plan(): Plan {
  const r = readPlanText(readFileSync(new URL('../../assets/three-way-hall.bqplan', import.meta.url), 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}

function applied(r: edits.EditResult): Plan {
  if (!r.ok) throw new Error(diagnosticMessage(r.diagnostic));
  return r.plan;
}

const fresh = (p: Plan) => analyzePlan(structuredClone(p));

describe('analyzePlan after edits', () => {
  it('matches a fresh analysis after a band edit, an input-chain edit and a sample-rate change', () => {
    const p0 = plan();
    analyzePlan(p0);
    const out = p0.outputs[1];
    // A 6 dB peaking boost in the middle of that output's passband (90 - 800 Hz).
    const p1 = applied(edits.addBand(p0, out.id, { type: 'peaking', frequency: 300, gainDb: 6, q: 1 }));
    expect(analyzePlan(p1)).toEqual(fresh(p1));
    expect(analyzePlan(p1).outputs[1].headroom.peakDb).not.toBeCloseTo(analyzePlan(p0).outputs[1].headroom.peakDb, 3);
    const inBand = p1.input.bands[0];
    const p2 = applied(edits.updateBand(p1, edits.INPUT, inBand.id, { gainDb: (inBand.gainDb ?? 0) + 5 }));
    expect(analyzePlan(p2)).toEqual(fresh(p2));
    const p3 = applied(edits.validated({ ...p2, sampleRate: 96000 }));
    expect(analyzePlan(p3)).toEqual(fresh(p3));
  });
});
