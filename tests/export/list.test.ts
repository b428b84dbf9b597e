/**
 * The export list's refusals and rules: the section budget (which output, by how many, nothing
 * dropped), the board's sample rate (redesign, or refusal with the field path), the delay limit,
 * the gain folded into the first section, the budget the screen shows (`budgetUse`), and a gain the
 * number format cannot hold.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { diagnostic, diagnosticMessage, targetPath } from '../../src/diagnostics';
import { describe, expect, it } from 'vitest';
import { designPlan } from '../../src/design/chain';
import { budgetUse, buildExportList } from '../../src/export/list';
import { BUILT_IN_PROFILES, copyProfile, effectiveOrder, findBuiltInProfile } from '../../src/export/profiles';
import { readPlanText } from '../../src/plan/read';
import type { BoardProfile, Plan } from '../../src/plan/types';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
function demo(name = 'two-way-monitor.bqplan'): Plan {
  const r = readPlanText(readFileSync(ASSETS + name, 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}
const float = (): BoardProfile => copyProfile(BUILT_IN_PROFILES[0].profile);

describe('section budget', () => {
  it('refuses each output over budget, saying which and by how many', () => {
    const plan = demo();
    // woofer: 2 input + 2 (LR4) + 8 peaking = 12 sections; tweeter: 2 + 2 = 4.
    for (let i = 0; i < 8; i++) plan.outputs[0].bands.push({ id: `p${i}`, type: 'peaking', frequency: 100 + 50 * i, gainDb: -1, q: 2, enabled: true });
    const p = float();
    p.sectionBudget = 10;
    const r = buildExportList(plan, p);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.problems).toEqual([diagnostic('export-budget', 'error', { kind: 'output', outputId: 'woofer' }, { outputId: 'woofer', exportName: 'woofer', sections: 12, budget: 10 })]);
    expect(diagnosticMessage(r.problems[0])).toBe('output "woofer" needs 12 sections, 2 more than the board\'s 10: remove or merge 2 band(s) or crossover section(s)');
    p.sectionBudget = 3;
    const both = buildExportList(plan, p);
    expect(both.ok).toBe(false);
    if (!both.ok) expect(both.problems.map((x) => [targetPath(x.target), diagnosticMessage(x).match(/(\d+) more/)![1]])).toEqual([['woofer', '9'], ['tweeter', '1']]);
  });

  it('exports every section when the output fits exactly (nothing dropped)', () => {
    const plan = demo();
    const p = float();
    p.sectionBudget = 4;
    const r = buildExportList(plan, p);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.list.outputs.map((o) => o.sections.length)).toEqual([4, 4]);
  });

  it('disabled bands take no section; a folded gain on an empty output takes one', () => {
    const plan = demo();
    plan.input.bands = [];
    plan.outputs[1].highPass = null;
    plan.outputs[1].gainDb = -6;
    plan.outputs[0].bands.push({ id: 'off', type: 'peaking', frequency: 100, gainDb: 3, q: 1, enabled: false });
    const p = float();
    p.gain = 'first-section';
    p.sectionBudget = 2;
    const r = buildExportList(plan, p);
    if (!r.ok) throw new Error(diagnosticMessage(r.problems[0]));
    expect(r.list.outputs[0].sections.length).toBe(2);
    const t = r.list.outputs[1];
    expect(t.sections).toHaveLength(1);
    expect(t.sections[0].from).toBe('tweeter/gain');
    expect(t.sections[0].ideal.b0).toBe(Math.pow(10, -6 / 20));
    expect(t.gain.written).toBeNull();
  });
});

describe('gain handling', () => {
  it('folds the gain (polarity included) into b0 b1 b2 of the first section only', () => {
    const plan = demo();
    plan.outputs[0].gainDb = -3;
    plan.outputs[0].invert = true;
    const p = float();
    p.gain = 'first-section';
    const r = buildExportList(plan, p);
    if (!r.ok) throw new Error();
    const d = designPlan(plan)[0];
    const g = -Math.pow(10, -3 / 20);
    const [s1, s2] = r.list.outputs[0].sections;
    expect(s1.ideal).toEqual({ b0: d.sections[0].b0 * g, b1: d.sections[0].b1 * g, b2: d.sections[0].b2 * g, a1: d.sections[0].a1, a2: d.sections[0].a2 });
    expect(s2.ideal.b0).toBe(d.sections[1].b0);
  });
});

describe('sample rate of the board', () => {
  it('redesigns at the profile rate: the same sections as the plan designed at that rate', () => {
    const plan = demo();
    const p = float();
    p.sampleRate = 44100;
    const r = buildExportList(plan, p);
    if (!r.ok) throw new Error(diagnosticMessage(r.problems[0]));
    expect(r.list.redesigned).toBe(true);
    expect(r.list.sampleRate).toBe(44100);
    const at441 = designPlan({ ...plan, sampleRate: 44100 });
    r.list.outputs.forEach((o, i) => expect(o.sections.map((s) => s.ideal)).toEqual(at441[i].sections.map(({ from: _f, ...s }) => s)));
    expect(diagnosticMessage(r.list.notes[0])).toMatch(/redesigned at the board's 44100 Hz \(the plan is at 48000 Hz\)/);
  });

  it('refuses a band at or above the new Nyquist with its field path', () => {
    const plan = demo();
    plan.outputs[1].bands.push({ id: 'air', type: 'highShelf', frequency: 22500, gainDb: 2, q: 0.7, enabled: true });
    const p = float();
    p.sampleRate = 44100;
    const r = buildExportList(plan, p);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problems[0].code).toBe('export-rate');
      expect(targetPath(r.problems[0].target)).toBe('outputs[1].bands[0].frequency');
      expect(diagnosticMessage(r.problems[0])).toMatch(/board runs at 44100 Hz.*outputs\[1\]\.bands\[0\]\.frequency: must be below Nyquist \(22050 Hz/);
    }
  });

  it('warns that raw bands keep their coefficients at another rate', () => {
    const plan = demo();
    plan.input.bands.push({ id: 'r', type: 'raw', frequency: 1000, enabled: true, coefficients: { b0: 1, b1: 0, b2: 0, a0: 1, a1: 0, a2: 0 } });
    const p = float();
    p.sampleRate = 96000;
    const r = buildExportList(plan, p);
    if (!r.ok) throw new Error();
    expect(r.list.notes.map(diagnosticMessage).join('\n')).toMatch(/raw bands keep their coefficients.*input\/r/);
  });
});

describe('suggested arrangement', () => {
  it('keeps every internal peak at or below 0 dBFS and, with a separate gain, the output response', async () => {
    const { partialCascadePeaks, OVERFLOW_TOLERANCE_DB } = await import('../../src/export/overflow');
    const { compareOutput } = await import('../../src/export/quantized');
    const { logFrequencies } = await import('../../src/response/chain-response');
    const plan = demo();
    plan.outputs[0].bands.push({ id: 'boost', type: 'peaking', frequency: 120, gainDb: 8, q: 3, enabled: true });
    plan.outputs[0].bands.push({ id: 'cut', type: 'peaking', frequency: 400, gainDb: -10, q: 1, enabled: true });
    const p = float();
    const plain = buildExportList(plan, p);
    const arranged = buildExportList(plan, p, undefined, { arrangement: 'suggested' });
    if (!plain.ok || !arranged.ok) throw new Error();
    const before = partialCascadePeaks(plain.list.outputs[0].sections.map((s) => s.ideal), 48000);
    expect(Math.max(...before.map((x) => x.peakDb))).toBeGreaterThan(1);
    const after = partialCascadePeaks(arranged.list.outputs[0].sections.map((s) => s.ideal), 48000);
    for (const x of after) expect(x.peakDb).toBeLessThanOrEqual(OVERFLOW_TOLERANCE_DB);
    // Same sections (by origin), another order; the overall response is unchanged.
    expect(arranged.list.outputs[0].sections.map((s) => s.from).sort()).toEqual(plain.list.outputs[0].sections.map((s) => s.from).sort());
    const f = logFrequencies(50, 20, 20000);
    const a = compareOutput(plain.list.outputs[0], f, 48000);
    const b = compareOutput(arranged.list.outputs[0], f, 48000);
    for (let i = 0; i < f.length; i++) expect(b.quantized.magnitudeDb[i]).toBeCloseTo(a.quantized.magnitudeDb[i], 9);
  });
});

describe('delay', () => {
  it('rounds to whole samples at the board rate and refuses a delay over the board limit', () => {
    const plan = demo();
    plan.outputs[1].delayMs = 1.01; // 48.48 samples at 48 kHz
    const p = float();
    const r = buildExportList(plan, p);
    if (!r.ok) throw new Error();
    expect(r.list.outputs[1].delay).toEqual({ ms: 1.01, samples: 48, text: '48' });
    p.maxDelaySamples = 40;
    const refused = buildExportList(plan, p);
    expect(refused.ok).toBe(false);
    if (!refused.ok) expect(refused.problems[0]).toMatchObject({ code: 'export-delay', target: { kind: 'field', path: 'outputs[1].delayMs' } });
  });
});

describe('profiles', () => {
  it('finds built-ins by key or name, never returning the shared object', () => {
    const a = findBuiltInProfile('Q5.23 in 32-bit words')!;
    expect(a).toEqual(findBuiltInProfile('q5.23'));
    a.sectionBudget = 1;
    expect(findBuiltInProfile('q5.23')!.sectionBudget).toBe(16);
    expect(findBuiltInProfile('nope')).toBeNull();
  });
  it('puts a written a0 before a1 unless the order places it', () => {
    const p = float();
    p.writeA0 = true;
    expect(effectiveOrder(p)).toEqual(['b0', 'b1', 'b2', 'a0', 'a1', 'a2']);
    p.order = ['a1', 'a2', 'b0', 'b1', 'b2'];
    expect(effectiveOrder(p)).toEqual(['a0', 'a1', 'a2', 'b0', 'b1', 'b2']);
    p.order = ['b0', 'b1', 'b2', 'a1', 'a2', 'a0'];
    expect(effectiveOrder(p)).toEqual(['b0', 'b1', 'b2', 'a1', 'a2', 'a0']);
  });
});

/**
 * The section budget on screen counts as the export does: an output whose count equals the
 * budget exports, one more section is refused, and a folded gain on an output without sections
 * costs one unity section (docs/plan-format.md, export step 4).
 */
describe('budgetUse', () => {
  it('is what the export refuses: at the budget it exports, one below it is refused naming the export name', () => {
    const plan = demo('three-way-hall.bqplan');
    const base = copyProfile(BUILT_IN_PROFILES[0].profile);
    for (const [i, u] of budgetUse(plan, base).entries()) {
      const fits = buildExportList(plan, { ...base, sectionBudget: u.used }, plan.outputs[i].id);
      expect(fits.ok).toBe(true);
      if (fits.ok) expect(fits.list.outputs[0].sections.length).toBe(u.used);
      if (u.used > 1) {
        const over = buildExportList(plan, { ...base, sectionBudget: u.used - 1 }, plan.outputs[i].id);
        expect(over.ok).toBe(false);
        if (!over.ok) expect(diagnosticMessage(over.problems[0])).toContain(`output "${u.exportName}" needs ${u.used} sections, 1 more than the board's ${u.used - 1}`);
      }
    }
  });

  it('a folded gain on an output without sections costs one section', () => {
    const plan = demo('three-way-hall.bqplan');
    plan.input.bands = [];
    plan.outputs[0] = { ...plan.outputs[0], highPass: null, lowPass: null, bands: [] };
    const profile = { ...copyProfile(BUILT_IN_PROFILES[0].profile), gain: 'first-section' as const };
    expect(budgetUse(plan, profile)[0].used).toBe(1);
    expect(budgetUse(plan, { ...profile, gain: 'separate' })[0].used).toBe(0);
  });
});

/**
 * A unity gain in Q1.31 saturates (Q1.31 holds -1 .. 1 - 2^-31, a fact of two's-complement
 * fixed point), even when the coefficients are halved, because the separate gain is not a
 * coefficient and is never pre-scaled. The export then says plainly what the board must do: the
 * value to write and the power of two to multiply by after the cascade; the written value times
 * that factor gives the gain back within one LSB of the format.
 */
describe('a gain the number format cannot hold', () => {
  const plan = demo();
  const q131 = BUILT_IN_PROFILES.find((b) => b.key === 'q1.31-negated')!.profile;

  it.each([
    ['as built in', q131],
    ['with halved coefficients', { ...copyProfile(q131), coefficientScale: 0.5 }],
  ])('Q1.31 %s: unity gain is flagged and the note says write 0.5, multiply by 2 after the cascade', (_n, profile) => {
    const l = buildExportList(plan, profile);
    if (!l.ok) throw new Error(diagnosticMessage(l.problems[0]));
    expect(l.list.outputs[0].gain.written?.saturation).toBe('high');
    const note = l.list.notes.map(diagnosticMessage).find((n) => n.startsWith('output "woofer": its gain 1 does not fit Q1.31'));
    expect(note).toBeDefined();
    expect(note).toMatch(/write 0\.5 \(1073741824\) and have the board multiply by 2 \(shift left by 1 bit\) after the cascade/);
    // 0.5 in Q1.31 is 2^30 = 1073741824; times 2 is unity exactly.
    expect((1073741824 / 2 ** 31) * 2).toBe(1);
  });

  it('+6 dB (gain 1.995) needs a factor of 2 as well; a gain inside the range gets no note', () => {
    const p = structuredClone(plan);
    p.outputs[0].gainDb = 6;
    p.outputs[1].gainDb = -6;
    const l = buildExportList(p, q131);
    if (!l.ok) throw new Error(diagnosticMessage(l.problems[0]));
    expect(l.list.notes.map(diagnosticMessage).some((n) => /"woofer": its gain 1\.99\d+ does not fit Q1\.31; write 0\.99\d+ .* multiply by 2 /.test(n))).toBe(true);
    expect(l.list.notes.map(diagnosticMessage).some((n) => n.includes('"tweeter": its gain'))).toBe(false);
  });
});
