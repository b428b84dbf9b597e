/**
 * The plan's design-method fields (docs/plan-format.md, "Design method"): a band's `design` and
 * the plan's `defaultDesign`, optional fields of version 3, read with field paths, written only
 * when set, refused in older versions and on band types without a matched design.
 */
import { describe, expect, it } from 'vitest';
import { readPlanText } from '../../src/plan/read';
import { writePlanText } from '../../src/plan/write';
import { designPlan } from '../../src/design/chain';
import { designMatched } from '../../src/design/matched';

const plan = (extra: Record<string, unknown> = {}, band: Record<string, unknown> = {}, version = 3) =>
  JSON.stringify({
    format: 'biquadrant.plan',
    version,
    name: 'design methods (invented)',
    sampleRate: 48000,
    input: { bands: [] },
    outputs: [{ id: 'tw', name: 'Tweeter', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [{ id: 'b1', type: 'peaking', frequency: 16000, gainDb: 6, q: 2, ...band }] }],
    ...extra,
  });

const error = (text: string) => {
  const r = readPlanText(text);
  if (r.ok) throw new Error('expected a refusal');
  return r.error.message;
};

describe('design methods in the plan', () => {
  it('reads, designs and writes back a band design and a plan default', () => {
    const r = readPlanText(plan({ defaultDesign: 'matched' }, { design: 'bilinear' }));
    if (!r.ok) throw new Error(r.error.message);
    expect(r.plan.defaultDesign).toBe('matched');
    expect(r.plan.outputs[0].bands[0].design).toBe('bilinear');
    const again = readPlanText(writePlanText(r.plan));
    if (!again.ok) throw new Error(again.error.message);
    expect(again.plan).toEqual(r.plan);
  });

  it('a plan default of "matched" designs the band matched; absent fields are not written', () => {
    const r = readPlanText(plan({ defaultDesign: 'matched' }));
    if (!r.ok) throw new Error(r.error.message);
    const [s] = designPlan(r.plan)[0].sections;
    expect(s.a2).toBe(designMatched(r.plan.outputs[0].bands[0], 48000).a2);
    const plain = readPlanText(plan());
    if (!plain.ok) throw new Error(plain.error.message);
    expect(writePlanText(plain.plan)).not.toMatch(/"design"|"defaultDesign"/);
  });

  it('refuses bad values with their field paths', () => {
    expect(error(plan({}, { design: 'impulse' }))).toMatch(/^outputs\[0\]\.bands\[0\]\.design: must be one of "bilinear", "matched"/);
    expect(error(plan({ defaultDesign: 3 }))).toMatch(/^defaultDesign: must be one of/);
    expect(error(plan({}, { type: 'allPass', gainDb: undefined, design: 'matched' }))).toMatch(/^outputs\[0\]\.bands\[0\]\.design: "matched" applies to peaking, shelf/);
  });

  it('refuses the fields in a version 2 file, at their paths', () => {
    expect(error(plan({}, { design: 'matched' }, 2))).toMatch(/^outputs\[0\]\.bands\[0\]\.design: is not a field of plan version 2 .*version 3/);
    expect(error(plan({ defaultDesign: 'matched' }, {}, 2))).toMatch(/^defaultDesign: is not a field of plan version 2/);
  });
});
