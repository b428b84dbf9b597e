/**
 * Shelves at the ends of the range (the fitter's `shelves` option): a response that is a
 * cookbook low shelf and high shelf (Audio EQ Cookbook, S = 1) inverted is fitted flat by the two
 * shelves, to within 0.1 dB RMS per octave.
 */
import { describe, expect, it } from 'vitest';
import { designBand } from '../../src/design/cookbook';
import { addSectionDb, gridTrig } from '../../src/fit/bands';
import { fitPlan } from '../../src/fit/plan-fit';
import { flatTarget } from '../../src/fit/target';
import { driverPlan } from './helpers';

describe('shelves at the range ends', () => {
  it('find an inverted low and high shelf back with two bands', () => {
    const frequencyHz = Array.from({ length: 479 }, (_, k) => 20 * Math.pow(2, k / 48));
    const db = new Float64Array(frequencyHz.length);
    const trig = gridTrig(frequencyHz, 48000);
    for (const b of [
      { type: 'lowShelf' as const, frequency: 60, gainDb: 4 },
      { type: 'highShelf' as const, frequency: 6000, gainDb: -3 },
    ]) {
      for (const s of designBand({ id: 'x', ...b, q: Math.SQRT1_2, enabled: true }, 48000)) addSectionDb(s, trig, db, -1);
    }
    const plan = driverPlan({ name: 'shelves', sampleRate: 48000, frequencyHz, magnitudeDb: Array.from(db) });
    const fit = fitPlan(plan, { kind: 'output', outputId: 'main' }, { ...flatTarget('output', 'main'), toleranceDb: 0.1 }, { bands: 2, shelves: true });
    const types = fit.result.bands.map((b) => b.type).sort();
    expect(types).toEqual(['highShelf', 'lowShelf']);
    expect(fit.result.after.rmsDb).toBeLessThan(0.1);
    const low = fit.result.bands.find((b) => b.type === 'lowShelf');
    expect(Math.abs((low?.gainDb ?? 0) - 4)).toBeLessThan(0.1);
  });
});
