// @vitest-environment jsdom
// Component tests of the editors: unit parsing in the fields, refusal of bad input in place (the
// plan keeps its last valid value), undo and redo, keyboard nudges. Expected values come from
// the Audio EQ Cookbook (bandwidth to Q) and the nudge steps (1/24 octave, 0.1 dB, 5 %).
import { flushSync, mount, unmount } from 'svelte';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import demoText from '../../assets/two-way-monitor.bqplan?raw';
import { diagnostic } from '../../src/diagnostics';
import { qFromBandwidthOctaves } from '../../src/design/cookbook';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import { parseFrequency } from '../../src/ui/units';
import { addBand, INPUT } from '../../src/ui/edits';
import ChainEditor from '../../renderer/src/components/ChainEditor.svelte';
import NumberField from '../../renderer/src/components/NumberField.svelte';
import OutputList from '../../renderer/src/components/OutputList.svelte';
import { documentState as doc } from '../../renderer/src/state/document.svelte';
import { viewState as view } from '../../renderer/src/state/view.svelte';

function demo(): Plan {
  const r = readPlanText(demoText);
  if (!r.ok) throw r.error;
  return r.plan;
}

let target: HTMLElement;
let app: Record<string, unknown> | null = null;

beforeEach(() => {
  target = document.createElement('div');
  document.body.appendChild(target);
  doc.load(demo(), null);
  view.select(INPUT, null);
});

afterEach(() => {
  if (app) unmount(app);
  app = null;
  target.remove();
});

/** Types into a field and presses Enter, as a user would. */
function type(input: HTMLInputElement, text: string, key = 'Enter'): void {
  input.focus();
  input.value = text;
  input.dispatchEvent(new Event('input', { bubbles: true }));
  input.dispatchEvent(new KeyboardEvent('keydown', { key, bubbles: true }));
  flushSync();
}

function field(testid: string): HTMLInputElement {
  const el = target.querySelector<HTMLInputElement>(`[data-testid="${testid}"]`);
  if (!el) throw new Error(`no field ${testid}`);
  return el;
}

function errorOf(testid: string): string | null {
  return target.querySelector(`[data-testid="${testid}-error"]`)?.textContent ?? null;
}

describe('NumberField', () => {
  it('reads units, commits the value, and shows it formatted', () => {
    const commit = vi.fn(() => null);
    let value = 1000;
    app = mount(NumberField, {
      target,
      props: { label: 'Frequency', testid: 'f', value, display: (v: number) => `${v} Hz`, parse: (t: string) => parseFrequency(t, 24000), commit },
    });
    flushSync();
    expect(field('f').value).toBe('1000 Hz');
    type(field('f'), '2k2');
    expect(commit).toHaveBeenCalledWith(2200);
    expect(errorOf('f')).toBeNull();
    value = 2200;
  });

  it('refuses bad text in place with the reason; Escape puts the value back', () => {
    const commit = vi.fn(() => null);
    app = mount(NumberField, {
      target,
      props: { label: 'Frequency', testid: 'f', value: 1000, display: (v: number) => `${v} Hz`, parse: (t: string) => parseFrequency(t, 24000), commit },
    });
    type(field('f'), 'loud');
    expect(commit).not.toHaveBeenCalled();
    expect(errorOf('f')).toMatch(/not a frequency/);
    expect(field('f').value).toBe('loud'); // kept for correction
    expect(field('f').getAttribute('aria-invalid')).toBe('true');
    type(field('f'), '30k');
    expect(errorOf('f')).toMatch(/below Nyquist \(24 kHz\)/);
    field('f').dispatchEvent(new KeyboardEvent('keydown', { key: 'Escape', bubbles: true }));
    flushSync();
    expect(field('f').value).toBe('1000 Hz');
    expect(errorOf('f')).toBeNull();
  });

  it('shows a refusal from the plan check (commit returns a reason)', () => {
    app = mount(NumberField, {
      target,
      props: { label: 'Q', testid: 'q', value: 1, display: String, parse: (t: string) => ({ ok: true, value: Number(t) }), commit: () => 'slope: must be at most 5.03' },
    });
    type(field('q'), '7');
    expect(errorOf('q')).toBe('slope: must be at most 5.03');
  });

  it('never shows NaN', () => {
    app = mount(NumberField, { target, props: { label: 'x', testid: 'x', value: NaN, display: (v: number) => `${v}`, parse: parseFrequency, commit: () => null } });
    flushSync();
    expect(field('x').value).not.toMatch(/NaN/);
  });
});

describe('band editor (ChainEditor on the demo plan)', () => {
  beforeEach(() => {
    view.select(INPUT, 'b2'); // the 63 Hz peaking cut of the demo's input chain
    app = mount(ChainEditor, { target });
    flushSync();
  });

  it('shows the selected band with units', () => {
    expect(field('band-frequency').value).toBe('63 Hz');
    expect(field('band-gain').value).toBe('-4.5 dB');
    expect(field('band-q').value).toBe('4');
  });

  it('typing "2k2", "-3 dB" and "1/3 oct" edits the plan in plan units', () => {
    type(field('band-frequency'), '2k2');
    expect(doc.plan.input.bands[1].frequency).toBe(2200);
    type(field('band-gain'), '-3 dB');
    expect(doc.plan.input.bands[1].gainDb).toBe(-3);
    type(field('band-q'), '1/3 oct');
    // Audio EQ Cookbook BW form at the band's own frequency and the plan's sample rate.
    expect(doc.plan.input.bands[1].q).toBeCloseTo(qFromBandwidthOctaves(1 / 3, 2200, 48000), 12);
    expect(field('band-frequency').value).toBe('2.2 kHz');
  });

  it('the bandwidth field sets Q too', () => {
    type(field('band-bandwidth'), '1');
    expect(doc.plan.input.bands[1].q).toBeCloseTo(qFromBandwidthOctaves(1, 63, 48000), 12);
  });

  it('refuses bad entries in place and keeps the last valid plan', () => {
    const before = doc.plan;
    type(field('band-frequency'), '30k');
    expect(errorOf('band-frequency')).toMatch(/Nyquist/);
    type(field('band-gain'), '+70 dB');
    expect(errorOf('band-gain')).toMatch(/60 dB/);
    type(field('band-q'), '0');
    expect(errorOf('band-q')).toMatch(/above 0/);
    type(field('band-q'), 'abc');
    expect(errorOf('band-q')).toMatch(/not a Q/);
    expect(doc.plan).toBe(before);
    expect(doc.canUndo).toBe(false);
    expect(target.textContent).not.toMatch(/NaN/);
  });

  it('undo and redo walk the edits back and forth', () => {
    const p0 = doc.plan;
    type(field('band-gain'), '-6');
    const p1 = doc.plan;
    type(field('band-frequency'), '80');
    expect(doc.plan.input.bands[1]).toMatchObject({ frequency: 80, gainDb: -6 });
    expect(doc.undo()).toBe(true);
    expect(doc.plan).toBe(p1);
    expect(doc.undo()).toBe(true);
    expect(doc.plan).toBe(p0);
    expect(doc.dirty).toBe(false); // back to the loaded plan
    flushSync();
    expect(field('band-gain').value).toBe('-4.5 dB');
    expect(doc.redo()).toBe(true);
    expect(doc.redo()).toBe(true);
    expect(doc.plan.input.bands[1]).toMatchObject({ frequency: 80, gainDb: -6 });
    expect(doc.redo()).toBe(false);
    expect(doc.dirty).toBe(true);
  });

  it('changing the type shows the fields of the new type', () => {
    const select = target.querySelector<HTMLSelectElement>('[data-testid="band-type"]')!;
    select.value = 'notch';
    select.dispatchEvent(new Event('change', { bubbles: true }));
    flushSync();
    expect(doc.plan.input.bands[1].type).toBe('notch');
    expect(target.querySelector('[data-testid="band-gain"]')).toBeNull();
    expect(field('band-q')).toBeTruthy();
  });

  it('adds and removes bands', () => {
    target.querySelector<HTMLButtonElement>('[data-testid="band-add"]')!.click();
    flushSync();
    expect(doc.plan.input.bands).toHaveLength(3);
    expect(target.querySelectorAll('[data-testid="band-row"]')).toHaveLength(3);
    target.querySelector<HTMLButtonElement>('[data-testid="band-remove"]')!.click();
    flushSync();
    expect(doc.plan.input.bands.map((b) => b.id)).toEqual(['b1', 'b2']);
  });
});

describe('edge editor', () => {
  it('sets an edge frequency and gives the neighbour the other side', () => {
    view.select('woofer', null);
    app = mount(ChainEditor, { target });
    flushSync();
    type(field('edge-lowPass-frequency'), '1.8k');
    expect(doc.plan.outputs[0].lowPass?.frequency).toBe(1800);
    expect(doc.plan.outputs[1].highPass?.frequency).toBe(2200);
    target.querySelector<HTMLButtonElement>('[data-testid="edge-lowPass-match"]')!.click();
    flushSync();
    expect(doc.plan.outputs[1].highPass).toEqual({ family: 'linkwitz-riley', order: 4, frequency: 1800 });
    doc.undo();
    expect(doc.plan.outputs[1].highPass?.frequency).toBe(2200);
  });
});

describe('outputs list', () => {
  it('mute, invert, gain and delay edit the plan; a distance becomes a delay', () => {
    app = mount(OutputList, { target });
    flushSync();
    const rows = target.querySelectorAll<HTMLElement>('[data-testid="output-row"]');
    expect(rows).toHaveLength(2);
    rows[1].querySelector<HTMLButtonElement>('button[title^="Invert"]')!.click();
    rows[0].querySelector<HTMLButtonElement>('button[title^="Mute"]')!.click();
    flushSync();
    expect(doc.plan.outputs[1].invert).toBe(true);
    expect(doc.plan.outputs[0].mute).toBe(true);
    const delay = rows[1].querySelector<HTMLInputElement>('[data-testid="output-delay"]')!;
    type(delay, '34.3 cm'); // 343 m/s
    expect(doc.plan.outputs[1].delayMs).toBeCloseTo(1, 12);
    const gain = rows[1].querySelector<HTMLInputElement>('[data-testid="output-gain"]')!;
    type(gain, '-2.5 dB');
    expect(doc.plan.outputs[1].gainDb).toBe(-2.5);
    type(gain, '-200');
    expect(doc.plan.outputs[1].gainDb).toBe(-2.5);
    expect(target.textContent).toMatch(/within ±60 dB/);
  });

  it('adds, duplicates, moves and removes outputs', () => {
    app = mount(OutputList, { target });
    view.select('woofer', null);
    flushSync();
    target.querySelector<HTMLButtonElement>('[data-testid="output-add"]')!.click();
    flushSync();
    expect(doc.plan.outputs.map((o) => o.id)).toEqual(['woofer', 'tweeter', 'output-3']);
    target.querySelector<HTMLButtonElement>('button[aria-label="Move up"]')!.click();
    flushSync();
    expect(doc.plan.outputs.map((o) => o.id)).toEqual(['woofer', 'output-3', 'tweeter']);
    target.querySelector<HTMLButtonElement>('button[aria-label="Remove output"]')!.click();
    flushSync();
    expect(doc.plan.outputs.map((o) => o.id)).toEqual(['woofer', 'tweeter']);
  });
});

describe('document history', () => {
  it('a drag is one undo step however many frames it has', () => {
    const p0 = doc.plan;
    doc.beginGesture();
    for (let i = 1; i <= 30; i++) doc.apply({ ok: true, plan: { ...doc.plan, name: `step ${i}` } });
    doc.endGesture();
    expect(doc.plan.name).toBe('step 30');
    doc.undo();
    expect(doc.plan).toBe(p0);
  });

  it('nudges with one coalescing key within a short time are one step', () => {
    const p0 = doc.plan;
    doc.apply({ ok: true, plan: { ...doc.plan, name: 'a' } }, { coalesce: 'k' });
    doc.apply({ ok: true, plan: { ...doc.plan, name: 'b' } }, { coalesce: 'k' });
    doc.apply({ ok: true, plan: { ...doc.plan, name: 'c' } }, { coalesce: 'other' });
    doc.undo();
    expect(doc.plan.name).toBe('b');
    doc.undo();
    expect(doc.plan).toBe(p0);
  });

  it('a refused edit changes nothing and returns the refusal', () => {
    const p0 = doc.plan;
    const refusal = diagnostic('edit-refused', 'error', { kind: 'plan' }, { reason: 'no' });
    expect(doc.apply({ ok: false, diagnostic: refusal })).toBe(refusal);
    expect(doc.plan).toBe(p0);
    expect(doc.canUndo).toBe(false);
  });
});

describe('refusals stay with their band', () => {
  it('a refused entry does not carry over when another band is selected', () => {
    view.select(INPUT, 'b2');
    app = mount(ChainEditor, { target });
    flushSync();
    type(field('band-gain'), 'loud');
    expect(errorOf('band-gain')).toMatch(/not a gain/);
    // Another peaking band: same fields, so only the keyed editor starts it clean.
    doc.apply(addBand(doc.plan, INPUT, { frequency: 500, gainDb: 2, q: 1 }));
    view.select(INPUT, 'b3');
    flushSync();
    expect(errorOf('band-gain')).toBeNull();
    expect(field('band-gain').value).toBe('+2.0 dB');
  });
});

describe('plan notes', () => {
  it('edits the notes as one undoable step and removes them when emptied', async () => {
    const { default: PlanNotes } = await import('../../renderer/src/components/PlanNotes.svelte');
    app = mount(PlanNotes, { target });
    flushSync();
    const area = target.querySelector<HTMLTextAreaElement>('[data-testid="plan-notes"]')!;
    expect(area.value).toBe(demo().notes);
    area.value = 'Measured at the mix position.';
    area.dispatchEvent(new Event('change', { bubbles: true }));
    flushSync();
    expect(doc.plan.notes).toBe('Measured at the mix position.');
    area.value = '  ';
    area.dispatchEvent(new Event('change', { bubbles: true }));
    expect('notes' in doc.plan).toBe(false);
    doc.undo();
    expect(doc.plan.notes).toBe('Measured at the mix position.');
  });
});

describe('shelf slope field: the safe range in its hint, a slope past it refused in place', () => {
  it('a +6 dB high shelf by slope: hint "at most 16.25", S 17.4 refused (cookbook S_max 17.6 puts the poles on the circle)', () => {
    const plan = demo();
    plan.input.bands.push({ id: 'hs', type: 'highShelf', frequency: 5000, gainDb: 6, slope: 1, enabled: true });
    doc.load(plan, null);
    view.select(INPUT, 'hs');
    app = mount(ChainEditor, { target });
    flushSync();
    const slope = field('band-slope');
    // S_safe = (A + 1/A) / (A + 1/A - 2 + 1/100), A = 10^(6/40): 16.2539..., rounded down.
    expect(slope.title).toContain('at most 16.25 for this gain');
    expect(slope.title).toContain('0.01 to 1 keeps the shelf monotonic');
    type(slope, '17.4');
    expect(errorOf('band-slope')).toMatch(/slope: must be at most 16\.25 for a 6 dB shelf/);
    expect(doc.plan.input.bands.find((b) => b.id === 'hs')?.slope).toBe(1);
  });
});
