/**
 * A newly enabled edge starts as the other side of its crossover: the tweeter's new high-pass at
 * the woofer's low-pass frequency (same family and order), so a two-way starts matched. A
 * crossover whose two sides differ is the mistake this prevents (the sum dips or peaks there).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { diagnosticMessage } from '../../src/diagnostics';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import * as edits from '../../src/ui/edits';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
function plan(name: string): Plan {
  const r = readPlanText(readFileSync(ASSETS + name, 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}

describe('newEdge', () => {
  it("a tweeter's new high-pass takes the woofer's low-pass edge, not 80 Hz", () => {
    const p = plan('two-way-monitor.bqplan');
    const woofer = p.outputs[0];
    expect(woofer.lowPass).not.toBeNull();
    const e = edits.newEdge(p, p.outputs[1].id, 'highPass');
    expect(e).toEqual(woofer.lowPass);
    // And matching it back is then a no-op on the woofer.
    const off = edits.setEdge(p, p.outputs[1].id, 'highPass', null);
    if (!off.ok) throw new Error(diagnosticMessage(off.diagnostic));
    const on = edits.setEdge(off.plan, p.outputs[1].id, 'highPass', edits.newEdge(off.plan, p.outputs[1].id, 'highPass'));
    if (!on.ok) throw new Error(diagnosticMessage(on.diagnostic));
    const m = edits.matchNeighbourEdge(on.plan, p.outputs[1].id, 'highPass');
    if (!m.ok) throw new Error(diagnosticMessage(m.diagnostic));
    expect(m.plan.outputs[0].lowPass).toEqual(woofer.lowPass);
  });

  it("a mid's new low-pass takes the next output's high-pass edge in a three-way", () => {
    const p = plan('three-way-hall.bqplan');
    const mid = p.outputs.findIndex((o) => o.id === 'mid');
    const next = p.outputs[mid + 1];
    expect(next.highPass).not.toBeNull();
    expect(edits.newEdge(p, 'mid', 'lowPass')).toEqual(next.highPass);
  });

  it('without any neighbour edge: Linkwitz-Riley 4th order at 80 Hz or 2 kHz', () => {
    const p = edits.freshPlan();
    expect(edits.newEdge(p, p.outputs[0].id, 'highPass')).toEqual({ family: 'linkwitz-riley', order: 4, frequency: 80 });
    expect(edits.newEdge(p, p.outputs[0].id, 'lowPass')).toEqual({ family: 'linkwitz-riley', order: 4, frequency: 2000 });
  });
});
