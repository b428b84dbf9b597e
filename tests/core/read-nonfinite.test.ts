/**
 * Bare NaN / Infinity in a plan file. They are not JSON (RFC 8259, section 6: "Numeric values
 * that cannot be represented ... such as Infinity and NaN are not permitted"), so JSON.parse
 * refuses the whole text; the plan contract (docs/plan-format.md, "Conventions") still wants the
 * refusal to name the field's path.
 */
import { describe, expect, it } from 'vitest';
import { readPlanText } from '../../src/plan/read';

const plan = (q: string, name = 'n') => `{
  "format": "biquadrant.plan", "version": 2, "name": ${JSON.stringify(name)}, "sampleRate": 48000,
  "input": { "bands": [] },
  "outputs": [ { "id": "a", "bands": [ { "id": "x", "type": "peaking", "frequency": 100, "gainDb": -3, "q": 1 },
                                      { "id": "y", "type": "peaking", "frequency": 200, "gainDb": 2, "q": ${q} } ] } ] }`;

describe('bare NaN and Infinity are refused with the field path', () => {
  for (const token of ['NaN', 'Infinity', '-Infinity']) {
    it(`${token} in outputs[0].bands[1].q`, () => {
      const r = readPlanText(plan(token));
      expect(r.ok).toBe(false);
      if (r.ok) return;
      expect(r.error.path).toBe('outputs[0].bands[1].q');
      expect(r.error.message).toContain(token);
    });
  }
  it('the words inside strings are not tokens: a name "NaN Infinity" reads, other broken JSON stays "not valid JSON"', () => {
    expect(readPlanText(plan('1', 'NaN Infinity -Infinity "quoted" \\ NaN')).ok).toBe(true);
    const r = readPlanText(plan('1', 'NaN').replace('"sampleRate": 48000,', '"sampleRate": 48000'));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.path).toBe('');
      expect(r.error.message).toMatch(/not valid JSON/);
    }
  });
});
