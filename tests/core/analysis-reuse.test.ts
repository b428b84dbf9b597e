/**
 * analyzePlan reuses an output's analysis while that output, the input chain and the sample rate
 * are the same objects (plans are immutable; edits replace what they touch). Whatever it reuses,
 * the result must equal an analysis from scratch (a structurally equal copy of the plan shares
 * no objects, so nothing is reused there) after each kind of edit.
 */
import { diagnosticMessage } from '../../src/diagnostics';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyzePlan } from '../../src/analysis/check';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import * as edits from '../../src/ui/edits';

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
