/**
 * planCramping keeps each band's and edge's figure with the object and the inputs it depends on
 * (sample rate, default design method), so `check` on every edit recomputes only what the edit
 * replaced. The kept figures must always equal a fresh computation on the same grid.
 */
import { describe, expect, it } from 'vitest';
import { crampingGrid, planCramping } from '../../src/analysis/cramping';
import type { Band, Plan } from '../../src/plan/types';

const peak = (id: string, frequency: number, gainDb: number): Band => ({ id, type: 'peaking', frequency, gainDb, q: 2, enabled: true });

function plan(sampleRate: number, bands: Band[], defaultDesign?: 'bilinear' | 'matched'): Plan {
  return {
    format: 'biquadrant.plan',
    version: 3,
    name: 'Cramping figures (invented)',
    sampleRate,
    input: { bands: [] },
    outputs: [{ id: 'main', name: 'Main', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: { family: 'butterworth', order: 2, frequency: 80 }, lowPass: null, bands }],
    ...(defaultDesign ? { defaultDesign } : {}),
  } as Plan;
}

/** The figures computed afresh: an explicit grid bypasses the kept ones. */
const fresh = (p: Plan) => planCramping(p, crampingGrid(p.sampleRate));

describe('planCramping keeps figures per object and recomputes what changed', () => {
  const bands = [peak('a', 15000, 6), peak('b', 1000, -3)];

  it('a second call on the same plan gives the same figures as a fresh computation', () => {
    const p = plan(48000, bands);
    expect(planCramping(p)).toEqual(fresh(p));
    expect(planCramping(p)).toEqual(fresh(p));
  });

  it('the same band objects at another sample rate give that rate figures, not the kept ones', () => {
    const at48 = planCramping(plan(48000, bands));
    const p96 = plan(96000, bands);
    const at96 = planCramping(p96);
    expect(at96).toEqual(fresh(p96));
    // A 15 kHz peak departs from its analog shape far more at 48 kHz than at 96 kHz (bilinear warping).
    expect(Math.abs(at48[1].deviationDb)).toBeGreaterThan(Math.abs(at96[1].deviationDb) + 0.5);
  });

  it('a changed default design method is seen by bands that name none', () => {
    const bilinear = planCramping(plan(48000, bands));
    const pm = plan(48000, bands, 'matched');
    const matched = planCramping(pm);
    expect(matched).toEqual(fresh(pm));
    expect(matched[1].method).toBe('matched');
    expect(Math.abs(matched[1].deviationDb)).toBeLessThan(Math.abs(bilinear[1].deviationDb));
  });

  it('an edited band (a new object) gets its own figure while the others are kept', () => {
    const p = plan(48000, bands);
    planCramping(p);
    const edited = plan(48000, [peak('a', 15000, 12), bands[1]]);
    expect(planCramping(edited)).toEqual(fresh(edited));
    expect(planCramping(edited)[1].deviationDb).not.toBeCloseTo(planCramping(p)[1].deviationDb, 3);
  });
});
