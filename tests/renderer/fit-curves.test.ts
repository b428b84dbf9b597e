/**
 * The Response view's target and fit-proposal curves (renderer/src/lib/fit-curves.ts): the target
 * at its level within its range and NaN outside, its tolerance either side, and the proposal's
 * predicted level as the response kernel gives it (the measurement times the chains, the bands a
 * fit replaces taken out of a system measurement).
 */
import { describe, expect, it } from 'vitest';
import { designPlan } from '../../src/design/chain';
import { fitPlan, withTarget } from '../../src/fit/plan-fit';
import { flatTarget } from '../../src/fit/target';
import { designedResponse, logFrequencies } from '../../src/response/chain-response';
import { proposalCurve, targetCurves } from '../../renderer/src/lib/fit-curves';
import { roomCase, systemPlan } from '../fit/helpers';

describe('fit curves', () => {
  const grid = logFrequencies(300, 20, 380);

  it('the target is NaN outside its range, at its level inside, with the tolerance either side', () => {
    const plan = withTarget(systemPlan(roomCase), { kind: 'system' }, { ...flatTarget('system'), fromHz: 30, toHz: 300, levelDb: -2, toleranceDb: 1.5 });
    const t = targetCurves(plan, { kind: 'system' }, grid);
    if (!t) throw new Error('no target');
    grid.forEach((f, i) => {
      if (f < 30 || f > 300) expect(Number.isNaN(t.target[i])).toBe(true);
      else {
        expect(t.target[i]).toBe(-2);
        expect(t.high[i] - t.target[i]).toBeCloseTo(1.5, 12);
        expect(t.target[i] - t.low[i]).toBeCloseTo(1.5, 12);
      }
    });
    expect(targetCurves(systemPlan(roomCase), { kind: 'system' }, grid)).toBeNull();
  });

  it("a system proposal is the measurement with the new input bands in place of the replaced ones, as the kernel evaluates them", () => {
    const base = systemPlan(roomCase);
    base.input.bands = [{ id: 'old', type: 'peaking', frequency: 64, gainDb: -4, q: 6, enabled: true, fitted: true }];
    const fit = fitPlan(base, { kind: 'system' }, { ...flatTarget('system'), fromHz: 30, toHz: 300 }, { bands: 5 });
    const curve = proposalCurve(base, fit.plan, { kind: 'system' }, grid);
    if (!curve) throw new Error('no curve');
    const chainDb = (p: typeof base) => designedResponse(designPlan(p), grid, p.sampleRate).outputs[0].response.magnitudeDb;
    const before = chainDb(base);
    const after = chainDb(fit.plan);
    const f = roomCase.frequencyHz;
    grid.forEach((x, i) => {
      if (x < f[0] || x > f[f.length - 1]) return;
      // The measurement interpolated linearly in ln f, as the prediction does.
      let k = 0;
      while (f[k + 1] < x) k++;
      const t = Math.log(x / f[k]) / Math.log(f[k + 1] / f[k]);
      const m = roomCase.magnitudeDb[k] + t * (roomCase.magnitudeDb[k + 1] - roomCase.magnitudeDb[k]);
      expect(curve[i]).toBeCloseTo(m - before[i] + after[i], 9);
    });
  });
});
