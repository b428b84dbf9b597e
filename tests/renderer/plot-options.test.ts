// What the user chose to see on the plots: legend switches, the snapshot, and the phase pair,
// which must stop drawing once an output of the pair is removed.
import { diagnosticMessage } from '../../src/diagnostics';
import { describe, expect, it } from 'vitest';
import { PlotOptions } from '../../renderer/src/state/plot-options.svelte';
import { freshPlan } from '../../src/ui/edits';
import * as edits from '../../src/ui/edits';

describe('PlotOptions', () => {
  it('a legend switch hides a curve and shows it again, leaving the others', () => {
    const o = new PlotOptions();
    o.toggle('out:a');
    o.toggle('sum');
    expect([...o.hidden].sort()).toEqual(['out:a', 'sum']);
    o.toggle('out:a');
    expect(o.isHidden('out:a')).toBe(false);
    expect(o.isHidden('sum')).toBe(true);
  });

  it('keeps the snapshot plan as it was (the same object) until cleared', () => {
    const o = new PlotOptions();
    const p = freshPlan();
    o.takeSnapshot(p);
    expect(o.snapshot?.plan).toBe(p);
    o.clearSnapshot();
    expect(o.snapshot).toBeNull();
  });

  it('draws a phase difference only for two different outputs that exist', () => {
    const o = new PlotOptions();
    const added = edits.addOutput(freshPlan());
    if (!added.ok) throw new Error(diagnosticMessage(added.diagnostic));
    const p = added.plan;
    const [a, b] = p.outputs.map((x) => x.id);
    o.phasePair = [a, ''];
    expect(o.phasePairIn(p)).toBeNull();
    o.phasePair = [a, a];
    expect(o.phasePairIn(p)).toBeNull();
    o.phasePair = [a, b];
    expect(o.phasePairIn(p)).toEqual([a, b]);
    const removed = edits.removeOutput(p, b);
    if (!removed.ok) throw new Error(diagnosticMessage(removed.diagnostic));
    expect(o.phasePairIn(removed.plan)).toBeNull();
  });
});
