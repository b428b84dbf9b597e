/**
 * The sine peak over 0 Hz .. Nyquist and the worst-case peak (sum |h|), against
 * tests/reference/fixtures/headroom.json (tests/reference/make_headroom_fixtures.py: the cookbook in
 * Python and scipy.signal.butter sections; sine peak by scipy.signal.sosfreqz on 2^21 + 1 uniform
 * points then scipy.optimize.minimize_scalar; sum |h| from scipy.signal.sosfilt over 2^22 samples).
 * docs/references.md, "Headroom and the worst-case peak".
 */
import { describe, expect, it } from 'vitest';
import { diagnosticMessage, targetPath, type Diagnostic } from '../../src/diagnostics';

const messageOf = (d: Diagnostic | undefined): string | undefined => (d ? diagnosticMessage(d) : undefined);
import { headroom } from '../../src/analysis/headroom';
import { peakSearch } from '../../src/analysis/peak-search';
import { worstCasePeak } from '../../src/analysis/worst-case';
import { analyzePlan } from '../../src/analysis/check';
import { partialCascadePeaks, suggestOrderAndScaling } from '../../src/export/overflow';
import { readPlanValue } from '../../src/plan/read';
import type { Section } from '../../src/design/section';
import { loadFixture } from '../helpers/reference';
import { buildExportList } from '../../src/export/list';
import { DEFAULT_PROFILE } from '../../src/export/profiles';

interface Case {
  name: string;
  sampleRate: number;
  sections: number[][];
  sine: { peakDb: number; frequencyHz: number };
  l1: number | null;
}
const fixture = loadFixture<Case>('headroom.json');
const sectionsOf = (c: Case): Section[] => c.sections.map(([b0, b1, b2, a1, a2]) => ({ b0, b1, b2, a1, a2 }));

describe('sine peak over 0 Hz .. Nyquist (scipy dense grid, headroom.json)', () => {
  for (const c of fixture.cases) {
    it(c.name, () => {
      const p = peakSearch(sectionsOf(c), 1, c.sampleRate);
      // 1e-7 dB: both are maxima of the same float64 response found to ~1e-14 rad; the dB value
      // at a maximum is flat to second order, so the figures agree far below what a user reads.
      expect(Math.abs(p.peakDb - c.sine.peakDb)).toBeLessThan(1e-7);
      // Where: only meaningful for a sharp peak (a flat shelf's maximum has no single place).
      if (c.sine.peakDb > 1 && /peak/.test(c.name)) expect(Math.abs(p.frequencyHz - c.sine.frequencyHz)).toBeLessThan(1e-3 * Math.max(1, c.sine.frequencyHz / 1000));
    });
  }
  it('the narrow peak beside a shelf is +20.02 dB at 1234.5 Hz, not the shelf\'s +6 dB', () => {
    const c = fixture.cases.find((x) => x.name === 'narrow peak beside a shelf')!;
    const h = headroom(sectionsOf(c), 1, 48000);
    expect(h.peakDb).toBeGreaterThan(20);
    expect(h.frequencyHz).toBeCloseTo(1234.5, 2);
    expect(h.outsideAudioBand).toBe(false);
  });
  it('a peak at 22 kHz is found and said to lie outside 20 Hz - 20 kHz', () => {
    const c = fixture.cases.find((x) => x.name === 'peak above 20 kHz')!;
    const h = headroom(sectionsOf(c), 1, 48000);
    expect(h.peakDb).toBeCloseTo(9, 6);
    expect(h.outsideAudioBand).toBe(true);
  });
});

describe('worst-case peak: sum |h| (scipy.signal.sosfilt, headroom.json)', () => {
  for (const c of fixture.cases.filter((x) => x.l1 !== null)) {
    it(c.name, () => {
      const w = worstCasePeak(sectionsOf(c), 1);
      expect(w.complete).toBe(true);
      // 1e-7 relative: the sums differ by float rounding and by the tail left out, each block
      // after the last adding less than TAIL_FRACTION (1e-8) of the total, decaying geometrically.
      expect(Math.abs(w.l1 / c.l1! - 1)).toBeLessThan(1e-7);
      // Never below the sine peak (|H(e^jw)| <= sum |h| for every w).
      expect(w.peakDb).toBeGreaterThanOrEqual(c.sine.peakDb - 1e-9);
    });
  }
  it('the gain scales it; an unstable section has no bound', () => {
    const c = fixture.cases.find((x) => x.name === 'LR8 high-pass at 80 Hz')!;
    expect(Math.abs(worstCasePeak(sectionsOf(c), -0.5).l1 / (c.l1! / 2) - 1)).toBeLessThan(1e-7);
    expect(worstCasePeak([{ b0: 1, b1: 0, b2: 0, a1: 0, a2: -1.01 }], 1).peakDb).toBe(Infinity);
  });
});

const plan = (outputs: unknown[]) => {
  const r = readPlanValue({ format: 'biquadrant.plan', version: 2, name: 'p', sampleRate: 48000, input: { bands: [] }, outputs });
  if (!r.ok) throw r.error;
  return r.plan;
};
const narrowPlan = () =>
  plan([
    {
      id: 'a',
      bands: [
        { id: 'p', type: 'peaking', frequency: 1234.5, gainDb: 20, q: 1000 },
        { id: 's', type: 'highShelf', frequency: 5000, gainDb: 6, slope: 1 },
      ],
    },
  ]);

describe('check, overflow and --arrange suggested use the same search', () => {
  const ref = fixture.cases.find((x) => x.name === 'narrow peak beside a shelf')!.sine;
  it('check reports +20.02 dB at 1.234 kHz (scipy dense grid)', () => {
    const a = analyzePlan(narrowPlan());
    expect(Math.abs(a.outputs[0].headroom.peakDb - ref.peakDb)).toBeLessThan(1e-7);
    expect(messageOf(a.warnings.find((w) => w.code === 'headroom'))).toContain('+20.02 dB');
  });
  it('the partial-cascade peaks and the suggested scaling see the narrow peak', () => {
    const c = fixture.cases.find((x) => x.name === 'narrow peak beside a shelf')!;
    const peaks = partialCascadePeaks(sectionsOf(c), 48000);
    expect(Math.abs(peaks[1].peakDb - ref.peakDb)).toBeLessThan(1e-7);
    const s = suggestOrderAndScaling(sectionsOf(c), 48000);
    // After scaling, every node is at or below 0 dBFS by the same (oracle-checked) search.
    for (const [k] of s.sections.entries()) expect(peakSearch(s.sections.slice(0, k + 1), 1, 48000).peakDb).toBeLessThanOrEqual(1e-9);
    expect(s.alreadySafe).toBe(false);
  });
  it('export --arrange suggested keeps every internal node at or below 0 dBFS', () => {
    const r = buildExportList(narrowPlan(), DEFAULT_PROFILE, undefined, { arrangement: 'suggested' });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const secs = r.list.outputs[0].sections.map((s) => s.ideal);
    for (let k = 1; k <= secs.length; k++) expect(peakSearch(secs.slice(0, k), 1, 48000).peakDb).toBeLessThanOrEqual(1e-9);
  });
});
