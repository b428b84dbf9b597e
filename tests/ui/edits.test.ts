// Plan edits: each result is checked by the plan reader, shares what it did not touch (the
// response cache relies on that), or is refused with a reason and leaves the plan as it was.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { qFromBandwidthOctaves } from '../../src/design/cookbook';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import * as edits from '../../src/ui/edits';
import { diagnosticMessage } from '../../src/diagnostics';

function demo(): Plan {
  const r = readPlanText(readFileSync(new URL('../../assets/two-way-monitor.bqplan', import.meta.url), 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}

function ok(r: edits.EditResult): Plan {
  if (!r.ok) throw new Error(diagnosticMessage(r.diagnostic));
  return r.plan;
}

describe('structural sharing', () => {
  it('a band edit in one output replaces that output only', () => {
    const p = demo();
    const q = ok(edits.addBand(p, 'woofer', { frequency: 120, gainDb: 2, q: 2 }));
    expect(q.input).toBe(p.input);
    expect(q.outputs[1]).toBe(p.outputs[1]);
    expect(q.outputs[0]).not.toBe(p.outputs[0]);
    expect(q.outputs[0].bands).toHaveLength(1);
  });

  it('an input-chain edit keeps every output object', () => {
    const p = demo();
    const q = ok(edits.updateBand(p, edits.INPUT, 'b2', { gainDb: -6 }));
    expect(q.input).not.toBe(p.input);
    q.outputs.forEach((o, i) => expect(o).toBe(p.outputs[i]));
    expect(q.input.bands[1].gainDb).toBe(-6);
    expect(p.input.bands[1].gainDb).toBe(-4.5); // the old plan is untouched
  });
});

describe('refusals carry the reader message and leave the plan alone', () => {
  it('a frequency at Nyquist is refused with its field path', () => {
    const p = demo();
    const r = edits.updateBand(p, edits.INPUT, 'b1', { frequency: 24000 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(diagnosticMessage(r.diagnostic)).toMatch(/^input\.bands\[0\]\.frequency: must be below Nyquist/);
  });

  it('a shelf slope past the cookbook limit is refused (reader check)', () => {
    const p = ok(edits.addBand(demo(), 'woofer', { type: 'lowShelf', frequency: 100, gainDb: 12, q: undefined, slope: 1 }));
    const id = p.outputs[0].bands[0].id;
    const r = edits.updateBand(p, 'woofer', id, { slope: 6 }); // limit for +12 dB: S <= 5.03 (cookbook: (A + 1/A)(1/S - 1) + 2 >= 0)
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.diagnostic.target).toEqual({ kind: 'field', path: 'outputs[0].bands[0].slope' });
    if (!r.ok) expect(diagnosticMessage(r.diagnostic)).toMatch(/slope: must be at most/);
  });

  it('Linkwitz-Riley edges take even orders only; setEdge moves an odd order to the nearest even one', () => {
    const p = demo();
    const q = ok(edits.setEdge(p, 'woofer', 'lowPass', { family: 'linkwitz-riley', order: 3, frequency: 2200 }));
    expect(q.outputs[0].lowPass?.order).toBe(4);
    const b = ok(edits.setEdge(p, 'woofer', 'lowPass', { family: 'bessel', order: 3, frequency: 2200 }));
    expect(b.outputs[0].lowPass).toEqual({ family: 'bessel', order: 3, frequency: 2200, normalization: 'phase' });
  });

  it('keeps at least one output and at most 16', () => {
    let p = demo();
    p = ok(edits.removeOutput(p, 'woofer'));
    expect(edits.removeOutput(p, 'tweeter').ok).toBe(false);
    for (let i = 0; i < 15; i++) p = ok(edits.addOutput(p));
    expect(p.outputs).toHaveLength(16);
    expect(edits.addOutput(p).ok).toBe(false);
  });
});

describe('sample rate', () => {
  it('refuses a rate whose Nyquist falls below a band or edge, naming them', () => {
    const p = ok(edits.addBand(demo(), 'tweeter', { frequency: 20000, gainDb: 1, q: 1 }));
    const r = edits.setSampleRate(p, 32000);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.diagnostic.code).toBe('rate-misfit');
      expect(diagnosticMessage(r.diagnostic)).toContain('Nyquist would be 16 kHz');
      if (r.diagnostic.code === 'rate-misfit') expect(r.diagnostic.values.misfits).toContainEqual({ target: { kind: 'band', chain: 'tweeter', bandId: 'b1' }, frequencyHz: 20000 });
    }
    expect(ok(edits.setSampleRate(p, 96000)).sampleRate).toBe(96000);
    expect(edits.setSampleRate(p, 1000).ok).toBe(false);
  });
});

describe('bands', () => {
  it('a bandwidth sets Q by the cookbook BW form at the band frequency and sample rate', () => {
    const p = demo();
    const q = ok(edits.setBandwidth(p, edits.INPUT, 'b2', 1 / 3));
    expect(q.input.bands[1].q).toBeCloseTo(qFromBandwidthOctaves(1 / 3, 63, 48000), 12);
  });

  it('changing type keeps frequency and gives the fields the new type uses', () => {
    const p = demo();
    const q = ok(edits.setBandType(p, edits.INPUT, 'b2', 'highShelf'));
    expect(q.input.bands[1]).toEqual({ id: 'b2', type: 'highShelf', frequency: 63, enabled: true, gainDb: -4.5, slope: 1 });
    const n = ok(edits.setBandType(q, edits.INPUT, 'b2', 'notch'));
    expect(n.input.bands[1].gainDb).toBeUndefined();
    expect(n.input.bands[1].q).toBeCloseTo(Math.SQRT1_2, 12);
  });

  it('new band ids never collide', () => {
    let p = demo();
    p = ok(edits.removeBand(p, edits.INPUT, 'b1'));
    const r = edits.addBand(p, edits.INPUT);
    expect(r.ok && r.bandId).toBe('b1');
    const r2 = edits.addBand(ok(r), edits.INPUT);
    expect(r2.ok && r2.bandId).toBe('b3');
  });
});

describe('outputs', () => {
  it('duplicate gets a fresh id and a deep copy', () => {
    const p = demo();
    const r = edits.duplicateOutput(p, 'woofer');
    const q = ok(r);
    expect(r.ok && r.outputId).toBe('woofer-copy');
    expect(q.outputs.map((o) => o.id)).toEqual(['woofer', 'woofer-copy', 'tweeter']);
    expect(q.outputs[1].lowPass).toEqual(q.outputs[0].lowPass);
    expect(q.outputs[1].lowPass).not.toBe(q.outputs[0].lowPass);
  });

  it('moves outputs and stops at the ends', () => {
    const p = demo();
    expect(ok(edits.moveOutput(p, 'tweeter', -1)).outputs.map((o) => o.id)).toEqual(['tweeter', 'woofer']);
    expect(edits.moveOutput(p, 'woofer', -1).ok).toBe(false);
  });

  it('the other side of a crossover goes to the neighbour across the edge', () => {
    let p = demo();
    p = ok(edits.setEdge(p, 'woofer', 'lowPass', { family: 'butterworth', order: 3, frequency: 1800 }));
    const r = edits.matchNeighbourEdge(p, 'woofer', 'lowPass');
    expect(r.ok && r.neighbourId).toBe('tweeter');
    expect(ok(r).outputs[1].highPass).toEqual({ family: 'butterworth', order: 3, frequency: 1800 });
    // From the tweeter's high-pass back to the woofer's low-pass.
    const back = edits.matchNeighbourEdge(ok(r), 'tweeter', 'highPass');
    expect(back.ok && back.neighbourId).toBe('woofer');
    expect(edits.matchNeighbourEdge(p, 'tweeter', 'lowPass').ok).toBe(false); // no low-pass edge there
  });
});
