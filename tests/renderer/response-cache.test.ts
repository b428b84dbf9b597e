// The plot cache recomputes only what an edit changed (the drag goal of npm run bench:ui), and what it returns is
// the core's designedResponse for the same plan.
import { describe, expect, it } from 'vitest';
import { designPlan } from '../../src/design/chain';
import { designedResponse, logFrequencies } from '../../src/response/chain-response';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import * as edits from '../../src/ui/edits';
import { diagnosticMessage } from '../../src/diagnostics';
import { ResponseCache } from '../../renderer/src/lib/response-cache';
import hallText from '../../assets/three-way-hall.bqplan?raw';

function hall(): Plan {
  const r = readPlanText(hallText);
  if (!r.ok) throw r.error;
  return r.plan;
}

function ok(r: edits.EditResult): Plan {
  if (!r.ok) throw new Error(diagnosticMessage(r.diagnostic));
  return r.plan;
}

describe('ResponseCache', () => {
  const grid = logFrequencies(600, 20, 20000);

  it('matches the core response exactly', () => {
    const plan = hall();
    const frame = new ResponseCache().frame(plan, grid, []);
    const core = designedResponse(designPlan(plan), grid, plan.sampleRate);
    frame.outputs.forEach((o, i) => {
      expect(Array.from(o.response.magnitudeDb)).toEqual(Array.from(core.outputs[i].response.magnitudeDb));
      expect(Array.from(o.response.groupDelayMs)).toEqual(Array.from(core.outputs[i].response.groupDelayMs));
    });
    expect(Array.from(frame.sum.phaseRad)).toEqual(Array.from(core.sum.phaseRad));
  });

  it('a band edit in one output recomputes that output and the sum only', () => {
    const cache = new ResponseCache();
    let plan = hall();
    cache.frame(plan, grid, []);
    const s0 = { ...cache.stats };
    plan = ok(edits.updateBand(plan, 'sub', 'b1', { frequency: 700 }));
    cache.frame(plan, grid, []);
    expect(cache.stats.outputsComputed - s0.outputsComputed).toBe(1);
    expect(cache.stats.sumsComputed - s0.sumsComputed).toBe(1);
    expect(cache.stats.inputComputed).toBe(s0.inputComputed);
  });

  it('an input-chain edit recomputes every output; the same plan recomputes nothing', () => {
    const cache = new ResponseCache();
    let plan = hall();
    cache.frame(plan, grid, []);
    const s0 = { ...cache.stats };
    cache.frame(plan, grid, []);
    expect(cache.stats).toEqual(s0);
    plan = ok(edits.updateBand(plan, edits.INPUT, 'b1', { gainDb: -5 }));
    cache.frame(plan, grid, []);
    expect(cache.stats.outputsComputed - s0.outputsComputed).toBe(plan.outputs.length);
    expect(cache.stats.inputComputed - s0.inputComputed).toBe(1);
  });

  it('mute and solo change the sum, not the outputs', () => {
    const cache = new ResponseCache();
    let plan = hall();
    const a = cache.frame(plan, grid, []);
    const soloed = cache.frame(plan, grid, ['mid']);
    expect(soloed.summed).toEqual(['mid']);
    // A sum of one output is that output (to rounding: the sum goes through re/im and back).
    const diff = Math.max(...Array.from(soloed.sum.magnitudeDb, (v, i) => Math.abs(v - a.outputs[2].response.magnitudeDb[i])));
    expect(diff).toBeLessThan(1e-9);
    plan = ok(edits.updateOutput(plan, 'sub', { mute: true }));
    const muted = cache.frame(plan, grid, []);
    expect(muted.summed).toEqual(['low', 'mid', 'high']);
    const core = designedResponse(designPlan(plan), grid, plan.sampleRate);
    expect(Array.from(muted.sum.magnitudeDb)).toEqual(Array.from(core.sum.magnitudeDb));
  });

  it('a new grid (zoom, resize) recomputes everything', () => {
    const cache = new ResponseCache();
    const plan = hall();
    cache.frame(plan, grid, []);
    const s0 = { ...cache.stats };
    cache.frame(plan, logFrequencies(600, 100, 1000), []);
    expect(cache.stats.outputsComputed - s0.outputsComputed).toBe(plan.outputs.length);
  });
});
