/**
 * Partial-cascade peaks and the suggested order and scaling.
 * Facts used (Audio EQ Cookbook, peaking EQ): the gain at f0 is exactly gainDb, it is the peak of
 * a boost, and the cut of the same Q is the exact inverse of the boost (H_cut = 1 / H_boost), so a
 * boost then the matching cut is flat.
 */
import { describe, expect, it } from 'vitest';
import { designBand } from '../../src/design/cookbook';
import type { Section } from '../../src/design/section';
import { OVERFLOW_TOLERANCE_DB, partialCascadePeaks, suggestOrderAndScaling } from '../../src/export/overflow';
import { poleRadius } from '../../src/analysis/poles';
import { allocateKernelOutput, cascadeResponse, normalizedOmega } from '../../src/response/kernel';
import { packSections } from '../../src/design/section';
import { logFrequencies } from '../../src/response/chain-response';

const FS = 48000;
const peaking = (f: number, g: number, q: number): Section => designBand({ id: 'x', type: 'peaking', frequency: f, gainDb: g, q, enabled: true }, FS)[0];

function magnitudeDb(sections: Section[], freqs: Float64Array): Float64Array {
  const k = allocateKernelOutput(freqs.length);
  cascadeResponse(packSections(sections), sections.length, normalizedOmega(freqs, FS), k);
  return k.magnitudeDb;
}

describe('partial cascade peaks', () => {
  it('a +12 dB boost then the matching cut: +12 dB at 1 kHz after section 1, flat after both', () => {
    const peaks = partialCascadePeaks([peaking(1000, 12, 2), peaking(1000, -12, 2)], FS);
    expect(peaks[0].through).toBe(1);
    expect(peaks[0].peakDb).toBeCloseTo(12, 6);
    expect(peaks[0].frequencyHz).toBeCloseTo(1000, 0);
    expect(Math.abs(peaks[1].peakDb)).toBeLessThan(1e-9);
  });
});

describe('suggested order and scaling', () => {
  it('puts the poles nearest the unit circle last; the cut first removes the internal overflow', () => {
    const boost = peaking(1000, 12, 2);
    const cut = peaking(1000, -12, 2);
    expect(poleRadius(boost)).toBeGreaterThan(poleRadius(cut));
    const s = suggestOrderAndScaling([boost, cut], FS);
    expect(s.alreadySafe).toBe(false);
    expect(s.order).toEqual([1, 0]);
    for (const p of s.peaks) expect(p.peakDb).toBeLessThanOrEqual(OVERFLOW_TOLERANCE_DB);
    expect(s.levelChangeDb).toBeCloseTo(0, 9);
    expect(s.method).toMatch(/L-infinity.*Jackson/);
  });

  it('scales a lone boost down to 0 dBFS and says how much level the output lost', () => {
    const s = suggestOrderAndScaling([peaking(2000, 6, 1)], FS);
    expect(s.scales[0]).toBeCloseTo(Math.pow(10, -6 / 20), 7);
    expect(s.peaks[0].peakDb).toBeCloseTo(0, 6);
    expect(s.levelChangeDb).toBeCloseTo(-6, 6);
  });

  it('changes the whole response by the stated level only (order does not matter to an exact cascade)', () => {
    const sections = [peaking(80, 9, 4), peaking(3000, -4, 1), peaking(300, 5, 0.7), peaking(9000, 3, 2)];
    const s = suggestOrderAndScaling(sections, FS);
    for (const p of s.peaks) expect(p.peakDb).toBeLessThanOrEqual(OVERFLOW_TOLERANCE_DB);
    const sorted = s.order.map((i) => poleRadius(sections[i]));
    expect([...sorted].sort((a, b) => a - b)).toEqual(sorted);
    const f = logFrequencies(64, 20, 20000);
    const before = magnitudeDb(sections, f);
    const after = magnitudeDb(s.sections, f);
    for (let i = 0; i < f.length; i++) expect(after[i] - before[i]).toBeCloseTo(s.levelChangeDb, 9);
  });

  it('states the scaled peaks that a search of the scaled sections finds (each <= 0 dB)', () => {
    // Scaling b0 b1 b2 by S multiplies the partial response by S at every frequency, so the
    // stated peaks may be derived; here they are measured again on the sections themselves.
    const sections = [peaking(80, 9, 4), peaking(3000, -4, 1), peaking(300, 5, 0.7), peaking(9000, 3, 2)];
    const s = suggestOrderAndScaling(sections, FS);
    const measured = partialCascadePeaks(s.sections, FS);
    expect(s.peaks.map((p) => p.through)).toEqual(measured.map((p) => p.through));
    s.peaks.forEach((p, k) => {
      expect(p.peakDb).toBeCloseTo(measured[k].peakDb, 9);
      expect(p.frequencyHz).toBeCloseTo(measured[k].frequencyHz, 3);
    });
    expect(Math.max(...measured.map((p) => p.peakDb))).toBeLessThanOrEqual(OVERFLOW_TOLERANCE_DB);
  });

  it('says a cascade with no internal peak above 0 dBFS is already safe', () => {
    const s = suggestOrderAndScaling([peaking(100, -3, 1), peaking(1000, -6, 1)], FS);
    expect(s.alreadySafe).toBe(true);
    expect(s.scales).toEqual([1, 1]);
  });
});
