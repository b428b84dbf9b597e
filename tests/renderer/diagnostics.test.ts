// The core's diagnostics in the user's words: a reader refusal beside its field names the field,
// not its path in the file; an analysis warning names the output and the band's number in its
// chain; a sample-rate refusal numbers its bands as the band list does. The command line words
// the same diagnostics with ids and paths (src/diagnostics.ts); nothing parses a sentence back.
import { describe, expect, it } from 'vitest';
import demoText from '../../assets/two-way-monitor.bqplan?raw';
import { analyzePlan } from '../../src/analysis/check';
import { diagnosticMessage } from '../../src/diagnostics';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import * as edits from '../../src/ui/edits';
import { designInput, designOutput } from '../../src/design/chain';
import { diagnosticSelection, diagnosticText, fieldName, fieldText, sectionSource } from '../../renderer/src/lib/diagnostics';

function demo(): Plan {
  const r = readPlanText(demoText);
  if (!r.ok) throw r.error;
  return r.plan;
}

describe('field refusals', () => {
  it('fieldName keeps the last name of the reader path', () => {
    expect(fieldName('outputs[0].bands[11].coefficients.a0')).toBe('a0');
    expect(fieldName('input.bands[2].slope')).toBe('slope');
    expect(fieldName('outputs[1]')).toBe('outputs');
  });

  it('a real refusal of the plan reader carries its field path as data, shown by the field name', () => {
    const p = demo();
    const r = edits.updateBand(p, 'input', p.input.bands[0].id, { type: 'raw', coefficients: { b0: 1, b1: 0, b2: 0, a0: 0, a1: 0, a2: 0 } });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.diagnostic.target).toEqual({ kind: 'field', path: 'input.bands[0].coefficients.a0' });
    expect(diagnosticMessage(r.diagnostic)).toBe('input.bands[0].coefficients.a0: must not be 0');
    expect(fieldText(p, r.diagnostic)).toBe('a0: must not be 0');
  });
});

describe('warnings of check', () => {
  it('name the output instead of its id', () => {
    const p = demo();
    const tweeter = p.outputs.find((o) => o.id === 'tweeter')!;
    const plan: Plan = { ...p, outputs: p.outputs.map((o) => (o === tweeter ? { ...o, name: 'Dome', highPass: null } : o)) };
    const w = analyzePlan(plan).warnings.find((x) => x.code === 'no-high-pass')!;
    expect(w.target).toEqual({ kind: 'output', outputId: 'tweeter' });
    expect(diagnosticMessage(w)).toMatch(/^output tweeter /);
    expect(diagnosticText(plan, w)).toMatch(/^Dome looks like a high-frequency way/);
    expect(diagnosticSelection(w)).toEqual(['tweeter', null]);
  });

  it('name the chain and the band number of a band near Nyquist', () => {
    const p = demo();
    const bands = [...p.input.bands, { id: 'b9', type: 'peaking' as const, frequency: 23000, gainDb: 1, q: 1, enabled: true }];
    const plan: Plan = { ...p, input: { bands } };
    const w = analyzePlan(plan).warnings.find((x) => x.code === 'near-nyquist')!;
    expect(diagnosticMessage(w)).toMatch(/^band b9 /);
    expect(diagnosticText(plan, w)).toMatch(new RegExp(`^Input chain, band ${bands.length} at 23 kHz`));
    expect(diagnosticSelection(w)).toEqual(['input', 'b9']);
  });

  it('name the edge close to Nyquist, which the command line words by its output only', () => {
    const p = demo();
    const plan: Plan = { ...p, outputs: p.outputs.map((o) => (o.id === 'woofer' ? { ...o, lowPass: { family: 'linkwitz-riley', order: 4, frequency: 23000 } } : o)) };
    const w = analyzePlan(plan).warnings.find((x) => x.code === 'near-nyquist')!;
    expect(diagnosticMessage(w)).toBe('output woofer: an edge at 23 kHz is close to Nyquist (24 kHz)');
    expect(diagnosticText(plan, w)).toBe('Woofer low-pass edge at 23 kHz is close to Nyquist (24 kHz)');
  });
});

describe('sample-rate refusal', () => {
  it('numbers the bands as the band list does, and names outputs', () => {
    const p = demo();
    const tweeter = p.outputs.find((o) => o.id === 'tweeter')!;
    const plan: Plan = {
      ...p,
      input: { bands: [...p.input.bands, { id: 'b7', type: 'peaking', frequency: 21000, gainDb: 1, q: 1, enabled: true }] },
      outputs: p.outputs.map((o) => (o === tweeter ? { ...o, bands: [{ id: 'x1', type: 'notch', frequency: 1000, q: 2, enabled: true }, { id: 'b1', type: 'peaking', frequency: 20000, gainDb: 1, q: 1, enabled: true }] } : o)),
    };
    const r = edits.setSampleRate(plan, 32000);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(diagnosticMessage(r.diagnostic)).toContain('input chain band b7 at 21 kHz');
    const text = diagnosticText(plan, r.diagnostic);
    expect(text).toContain(`input chain band ${plan.input.bands.length} at 21 kHz`);
    expect(text).toContain('Tweeter band 2 at 20 kHz');
    expect(text).not.toMatch(/band b\d/);
  });
});

describe('sectionSource', () => {
  it('names every designed section of the demo by band number or edge', () => {
    const plan = demo();
    expect(designInput(plan).map((s) => sectionSource(plan, s.from))).toEqual(plan.input.bands.map((_, i) => `input band ${i + 1}`));
    const tweeter = plan.outputs.find((o) => o.id === 'tweeter')!;
    const own = designOutput(plan, tweeter).sections.filter((s) => !s.from.startsWith('input/'));
    expect(own.length).toBeGreaterThan(0);
    expect(new Set(own.map((s) => sectionSource(plan, s.from)))).toEqual(new Set(['high-pass edge']));
  });

  it('numbers an output band by its place in the chain and leaves unknown sources alone', () => {
    const p = demo();
    const plan: Plan = { ...p, outputs: p.outputs.map((o, i) => (i === 0 ? { ...o, bands: [{ id: 'x7', type: 'notch', frequency: 500, q: 4, enabled: true }] } : o)) };
    expect(sectionSource(plan, `${plan.outputs[0].id}/x7`)).toBe('band 1');
    expect(sectionSource(plan, `${plan.outputs[0].id}/lowPass`)).toBe('low-pass edge');
    expect(sectionSource(plan, 'nowhere/b1')).toBe('nowhere/b1');
  });
});
