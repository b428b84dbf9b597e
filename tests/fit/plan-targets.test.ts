/**
 * Targets and fitted/locked bands in the plan file (docs/plan-format.md, "Target" and "Band"):
 * read, written back unchanged, refused with their field paths, and refused in older versions.
 * Target shapes against facts of the trade (Audio EQ Cookbook shelf midpoint, Linkwitz-Riley
 * -6.02 dB at its crossover frequency) and the definitions of the contract.
 */
import { describe, expect, it } from 'vitest';
import { targetShapeDb } from '../../src/fit/target';
import { readPlanText, readPlanValue } from '../../src/plan/read';
import { planToJson, writePlanText } from '../../src/plan/write';
import { output } from './helpers';

function planWith(extra: Record<string, unknown>, version = 3): Record<string, unknown> {
  return {
    format: 'biquadrant.plan',
    version,
    name: 't',
    sampleRate: 48000,
    input: { bands: [] },
    outputs: [output('woofer', { lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 } }), output('tweeter')],
    ...extra,
  };
}

const TARGETS = [
  { scope: 'output', outputId: 'woofer', parts: [{ kind: 'crossover' }, { kind: 'tilt', dbPerOctave: -0.5, pivotHz: 1000 }], alignment: 'median', levelDb: 2.5, fromHz: 40, toHz: 4000, toleranceDb: 1.5 },
  { scope: 'system', parts: [{ kind: 'points', points: [[20, 6], [200, 0], [20000, -3]] }, { kind: 'lowShelf', frequency: 80, gainDb: 4 }], alignment: 'mean', toleranceDb: 1 },
];

function refusal(plan: Record<string, unknown>): string {
  const r = readPlanValue(plan);
  if (r.ok) throw new Error('accepted');
  return r.error.message;
}

describe('targets in the plan', () => {
  it('read and written back exactly, in the contract key order, with fitted and locked bands', () => {
    const plan = planWith({ targets: TARGETS });
    (plan.outputs as Record<string, unknown>[])[0].bands = [{ id: 'fit1', type: 'peaking', frequency: 60, gainDb: -3, q: 4, enabled: true, fitted: true, locked: true }];
    const r = readPlanValue(plan);
    if (!r.ok) throw r.error;
    const json = planToJson(r.plan);
    expect(json.targets).toEqual(TARGETS);
    expect((json.outputs as { bands: unknown[] }[])[0].bands[0]).toEqual({ id: 'fit1', type: 'peaking', frequency: 60, gainDb: -3, q: 4, enabled: true, fitted: true, locked: true });
    const again = readPlanText(writePlanText(r.plan));
    expect(again.ok && writePlanText(again.plan)).toBe(writePlanText(r.plan));
  });

  it('defaults: flat parts, mean alignment, tolerance 1 dB; a plan without targets writes none', () => {
    const r = readPlanValue(planWith({ targets: [{ scope: 'system' }] }));
    if (!r.ok) throw r.error;
    expect(r.plan.targets).toEqual([{ scope: 'system', parts: [], alignment: 'mean', toleranceDb: 1 }]);
    const bare = readPlanValue(planWith({}));
    expect(bare.ok && 'targets' in planToJson(bare.plan)).toBe(false);
  });

  it.each([
    [{ targets: [{ scope: 'output', outputId: 'mid' }] }, 'targets[0].outputId: "mid" names no output'],
    [{ targets: [{ scope: 'system' }, { scope: 'system' }] }, 'targets[1]: a second target of the system'],
    [{ targets: [{ scope: 'system', parts: [{ kind: 'crossover' }] }] }, 'targets[0].parts[0].kind: "crossover"'],
    [{ targets: [{ scope: 'system', outputId: 'woofer' }] }, 'targets[0].outputId: applies to a target of an output only'],
    [{ targets: [{ scope: 'system', parts: [{ kind: 'points', points: [[100, 0], [100, 1]] }] }] }, 'targets[0].parts[0].points[1][0]: 100 Hz does not increase'],
    [{ targets: [{ scope: 'system', parts: [{ kind: 'tilt', dbPerOctave: 30, pivotHz: 1000 }] }] }, 'targets[0].parts[0].dbPerOctave: must be within +/-24'],
    [{ targets: [{ scope: 'system', parts: [{ kind: 'tilt', dbPerOctave: 1, pivotHz: 30000 }] }] }, 'targets[0].parts[0].pivotHz: must be below Nyquist'],
    [{ targets: [{ scope: 'system', fromHz: 500, toHz: 100 }] }, 'targets[0].toHz: must be above fromHz'],
    [{ targets: [{ scope: 'system', toleranceDb: 0 }] }, 'targets[0].toleranceDb: must be from 0.1 to 24'],
    [{ targets: [{ scope: 'system', levelDb: '3' }] }, 'targets[0].levelDb: must be a number'],
    [{ targets: [{ scope: 'system', colour: 'red' }] }, 'targets[0].colour: is not a field'],
  ])('refuses %j with its field path', (extra, message) => {
    expect(refusal(planWith(extra))).toContain(message);
  });

  it('refuses fitted bands and targets in a version 2 file at their paths', () => {
    expect(refusal(planWith({ targets: [] }, 2))).toMatch(/^targets: is not a field of plan version 2 \(.*targets.* came with version 3\)/);
    const plan = planWith({}, 2);
    (plan.input as { bands: unknown[] }).bands = [{ id: 'a', type: 'peaking', frequency: 60, gainDb: -3, q: 4, fitted: true }];
    expect(refusal(plan)).toMatch(/^input\.bands\[0\]\.fitted: is not a field of plan version 2/);
    const locked = planWith({}, 2);
    (locked.outputs as Record<string, unknown>[])[1].bands = [{ id: 'a', type: 'peaking', frequency: 60, gainDb: -3, q: 4, locked: false }];
    expect(refusal(locked)).toMatch(/^outputs\[1\]\.bands\[0\]\.locked: is not a field of plan version 2/);
  });
});

describe('target shapes', () => {
  const ctx = { sampleRateHz: 48000 };
  it('tilt: dB per octave about the pivot (0 at the pivot, the slope one octave up, twice two octaves down)', () => {
    const y = targetShapeDb([{ kind: 'tilt', dbPerOctave: -1.5, pivotHz: 1000 }], [1000, 2000, 250], ctx);
    expect(Array.from(y)).toEqual([0, -1.5, 3]);
  });

  it('points: straight on log f between points (the geometric mean takes the mean), constant beyond the ends', () => {
    const y = targetShapeDb([{ kind: 'points', points: [[100, 0], [400, -6]] }], [50, 100, 200, 400, 800], ctx);
    expect(y[0]).toBe(0);
    expect(y[2]).toBeCloseTo(-3, 12);
    expect(y[4]).toBe(-6);
  });

  it('low shelf: half its gain at its frequency (Audio EQ Cookbook: f0 is the shelf midpoint), full gain far below', () => {
    const y = targetShapeDb([{ kind: 'lowShelf', frequency: 100, gainDb: 6 }], [100, 5], ctx);
    expect(y[0]).toBeCloseTo(3, 2);
    expect(y[1]).toBeCloseTo(6, 2);
  });

  it("crossover: the output's own edges, Linkwitz-Riley 4 at -6.02 dB at its frequency (Lipshitz and Vanderkooy)", () => {
    const y = targetShapeDb([{ kind: 'crossover' }], [2000, 100], { sampleRateHz: 48000, output: output('w', { lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 } }) });
    expect(y[0]).toBeCloseTo(-6.0206, 3);
    expect(Math.abs(y[1])).toBeLessThan(1e-3);
  });

  it('parts add in dB; no parts is flat', () => {
    const f = [60, 600, 6000];
    const a = targetShapeDb([{ kind: 'tilt', dbPerOctave: 1, pivotHz: 600 }], f, ctx);
    const b = targetShapeDb([{ kind: 'highShelf', frequency: 3000, gainDb: -4 }], f, ctx);
    const both = targetShapeDb([{ kind: 'tilt', dbPerOctave: 1, pivotHz: 600 }, { kind: 'highShelf', frequency: 3000, gainDb: -4 }], f, ctx);
    both.forEach((x, i) => expect(x).toBeCloseTo(a[i] + b[i], 12));
    expect(Array.from(targetShapeDb([], f, ctx))).toEqual([0, 0, 0]);
  });
});
