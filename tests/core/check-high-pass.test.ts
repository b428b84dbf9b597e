/**
 * The "high-frequency output with no high-pass" warning of `check` (README, the command table:
 * `check` prints the warnings). A high-pass band of the
 * output's own chain (the cookbook 2nd-order or the 1st-order high-pass) is a high-pass too; a
 * disabled one is not, and neither is a high-pass in the shared input chain alone (a tweeter
 * high-passed by a band must not be flagged "danger").
 */
import { describe, expect, it } from 'vitest';
import { analyzePlan } from '../../src/analysis/check';
import { targetPath } from '../../src/diagnostics';
import { readPlanValue } from '../../src/plan/read';

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
