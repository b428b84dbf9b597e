// @vitest-environment jsdom
// The whole window with an in-memory host: start-up (demo, recovery, a document from the host),
// keyboard shortcuts and nudges (frequency 1/24 octave, gain 0.1 dB, Q 5 %, more with
// Shift), file commands through the host, and a broken file refused with the reader's message.
import { flushSync, mount, tick, unmount } from 'svelte';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import demoText from '../../assets/two-way-monitor.bqplan?raw';
import hallText from '../../assets/three-way-hall.bqplan?raw';
import type { HostResult, MeasurementFile, MenuCommand, PlanDocument } from '../../src/ipc';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import App from '../../renderer/src/App.svelte';
import type { Host } from '../../renderer/src/host/host';
import { documentState as doc } from '../../renderer/src/state/document.svelte';
import { viewState as view } from '../../renderer/src/state/view.svelte';

function read(text: string): Plan {
  const r = readPlanText(text);
  if (!r.ok) throw r.error;
  return r.plan;
}

class FakeHost implements Host {
  readonly kind = 'desktop' as const;
  saved: { plan: Plan; path: string | null }[] = [];
  autosaved: PlanDocument[] = [];
  recovery: PlanDocument | null = null;
  initial: HostResult<PlanDocument> | null = null;
  nextOpen: HostResult<PlanDocument> = { ok: false, cancelled: true };
  dirty: [boolean, string][] = [];
  menu: ((c: MenuCommand) => void) | null = null;
  async openPlan() {
    return this.nextOpen;
  }
  async savePlan(plan: Plan, path: string | null) {
    this.saved.push({ plan, path });
    return { ok: true as const, value: path ?? '/plans/new.bqplan' };
  }
  async savePlanAs(plan: Plan) {
    this.saved.push({ plan, path: null });
    return { ok: true as const, value: '/plans/chosen.bqplan' };
  }
  async revertPlan(path: string) {
    return { ok: true as const, value: { plan: read(demoText), path } };
  }
  async autosave(d: PlanDocument) {
    this.autosaved.push(d);
  }
  async takeRecovery() {
    const r = this.recovery;
    this.recovery = null;
    return r;
  }
  async discardRecovery() {}
  settled: string[] = [];
  async settleRecovery(choice: "restore" | "discard") {
    this.settled.push(choice);
  }
  async initialDocument() {
    return this.initial;
  }
  setDirty(d: boolean, title: string) {
    this.dirty.push([d, title]);
  }
  async saveText() {
    return { ok: true as const, value: 'x.txt' };
  }
  async copyText() {
    return { ok: true as const, value: true as const };
  }
  nextMeasurement: HostResult<MeasurementFile> = { ok: false, cancelled: true };
  async openMeasurement() {
    return this.nextMeasurement;
  }
  onMenuCommand(l: (c: MenuCommand) => void) {
    this.menu = l;
    return () => (this.menu = null);
  }
}

// jsdom has no ResizeObserver (Svelte's bind:clientWidth uses one); the plots are not drawn here anyway.
globalThis.ResizeObserver ??= class {
  observe(): void {}
  unobserve(): void {}
  disconnect(): void {}
};

let target: HTMLElement;
let app: Record<string, unknown> | null = null;
let host: FakeHost;

async function start(): Promise<void> {
  app = mount(App, { target, props: { host } });
  for (let i = 0; i < 5; i++) await tick();
  flushSync();
}

function key(k: string, opts: KeyboardEventInit = {}): void {
  window.dispatchEvent(new KeyboardEvent('keydown', { key: k, bubbles: true, ...opts }));
  flushSync();
}

beforeEach(() => {
  target = document.createElement('div');
  document.body.appendChild(target);
  host = new FakeHost();
  view.resetRange();
});

afterEach(() => {
  if (app) unmount(app);
  app = null;
  target.remove();
});

describe('start-up', () => {
  it('opens the embedded demo plan on the chain with bands', async () => {
    await start();
    expect(doc.plan.name).toBe(read(demoText).name);
    expect(doc.dirty).toBe(false);
    expect(view.chainIn(doc.plan)).toBe('input');
    expect(target.querySelectorAll('[data-testid="band-row"]')).toHaveLength(2);
    expect(target.querySelector('[data-testid="caution"]')?.textContent).toMatch(/High levels damage hearing/);
  });

  it('opens the document the host was started with', async () => {
    host.initial = { ok: true, value: { plan: read(hallText), path: '/plans/hall.bqplan' } };
    await start();
    expect(doc.plan.outputs.map((o) => o.id)).toEqual(['sub', 'low', 'mid', 'high']);
    expect(doc.path).toBe('/plans/hall.bqplan');
  });

  it('offers recovered work and restores it as unsaved', async () => {
    const rec = read(demoText);
    rec.name = 'Recovered work';
    host.recovery = { plan: rec, path: null };
    await start();
    const banner = target.querySelector('[data-testid="recovery"]');
    expect(banner?.textContent).toMatch(/Recovered work/);
    banner!.querySelector<HTMLButtonElement>('button.primary')!.click();
    flushSync();
    expect(doc.plan.name).toBe('Recovered work');
    expect(doc.dirty).toBe(true);
    expect(target.querySelector('[data-testid="recovery"]')).toBeNull();
    // Only now may the host delete its copy.
    expect(host.settled).toEqual(['restore']);
  });
});

describe('keyboard', () => {
  beforeEach(async () => {
    await start();
    view.select('input', 'b2'); // 63 Hz, -4.5 dB, Q 4
    flushSync();
  });

  it('arrows nudge frequency by 1/24 octave and gain by 0.1 dB; Shift for more', () => {
    key('ArrowRight');
    expect(doc.plan.input.bands[1].frequency).toBeCloseTo(63 * Math.pow(2, 1 / 24), 1);
    key('ArrowUp');
    expect(doc.plan.input.bands[1].gainDb).toBeCloseTo(-4.4, 12);
    key('ArrowDown', { shiftKey: true });
    expect(doc.plan.input.bands[1].gainDb).toBeCloseTo(-5.4, 12);
    key('PageUp');
    expect(doc.plan.input.bands[1].q).toBeCloseTo(4.2, 12); // 4 x 1.05
  });

  it('a nudge a band type cannot take says so in words, not the file identifier', () => {
    view.select('input', 'b1'); // 2nd-order high-pass: no gain
    flushSync();
    const p0 = doc.plan;
    key('ArrowUp');
    expect(doc.plan).toBe(p0);
    expect(view.notice?.text).toBe('High-pass, 2nd order: this band type has no gain.');
    doc.apply({ ok: true, plan: { ...doc.plan, input: { bands: [...doc.plan.input.bands, { id: 'b3', type: 'lowPass1', frequency: 9000, enabled: true }] } } });
    view.select('input', 'b3');
    flushSync();
    const p1 = doc.plan;
    key('PageUp');
    expect(doc.plan).toBe(p1);
    expect(view.notice?.text).toBe('Low-pass, 1st order: this band type has no Q.');
  });

  it('Ctrl+Z and Ctrl+Shift+Z (and Ctrl+Y) undo and redo', () => {
    const p0 = doc.plan;
    key('ArrowUp');
    const p1 = doc.plan;
    expect(p1).not.toBe(p0);
    key('z', { ctrlKey: true });
    expect(doc.plan).toBe(p0);
    key('z', { ctrlKey: true, shiftKey: true });
    expect(doc.plan).toBe(p1);
    key('z', { metaKey: true });
    key('y', { ctrlKey: true });
    expect(doc.plan).toBe(p1);
  });

  it('Alt+1..4 switch views, as the menu and the tooltips say (command table in src/ipc.ts); Ctrl+digit does not', () => {
    key('2', { altKey: true });
    expect(view.view).toBe('zplane');
    key('4', { altKey: true });
    expect(view.view).toBe('export');
    key('3', { ctrlKey: true });
    expect(view.view).toBe('export');
    key('1', { altKey: true });
    expect(view.view).toBe('response');
    const titles = [...target.querySelectorAll('nav.views button')].map((b) => b.getAttribute('title'));
    expect(titles).toEqual(['Response (Alt+1)', 'Z-plane (Alt+2)', 'Time (Alt+3)', 'Export (Alt+4)']);
    expect(target.querySelector('[data-testid="save"]')?.getAttribute('title')).toBe('Save (Ctrl+S)');
  });

  it('Delete removes the selected band; number keys select bands', () => {
    key('1');
    expect(view.bandIn(doc.plan)).toBe('b1');
    key('Delete');
    expect(doc.plan.input.bands.map((b) => b.id)).toEqual(['b2']);
    expect(view.bandIn(doc.plan)).toBe('b2');
  });

  it('Ctrl+S saves through the host and clears the dirty mark', async () => {
    key('ArrowUp');
    expect(doc.dirty).toBe(true);
    key('s', { ctrlKey: true });
    for (let i = 0; i < 5; i++) await tick();
    expect(host.saved).toHaveLength(1);
    expect(host.saved[0].plan).toBe(doc.plan);
    expect(doc.dirty).toBe(false);
    expect(doc.path).toBe('/plans/chosen.bqplan');
    expect(host.dirty.at(-1)?.[0]).toBe(false);
  });
});

describe('autosave', () => {
  it('continuous editing (a nudge every second) is still stored for recovery within the maximum interval', async () => {
    vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout', 'Date'] });
    try {
      await start();
      view.select('input', 'b2');
      flushSync();
      // One small step first: the alternating large steps below then never bring the plan back to
      // its saved state (which is clean, and has nothing to recover).
      key('ArrowUp');
      for (let i = 0; i < 40; i++) {
        key(i % 2 ? 'ArrowUp' : 'ArrowDown', { shiftKey: true });
        vi.advanceTimersByTime(1000);
        await tick();
      }
      expect(host.autosaved.length).toBeGreaterThanOrEqual(1);
      expect(host.autosaved[0].plan.input.bands[1]).toBeDefined();
    } finally {
      vi.useRealTimers();
    }
  });
});

describe('text typed but not applied', () => {
  beforeEach(async () => {
    await start();
    view.select('input', 'b2'); // 63 Hz, -4.5 dB, Q 4
    flushSync();
  });

  function typeOnly(testid: string, text: string): HTMLInputElement | HTMLTextAreaElement {
    const el = target.querySelector<HTMLInputElement | HTMLTextAreaElement>(`[data-testid="${testid}"]`)!;
    el.focus();
    el.value = text;
    el.dispatchEvent(new Event('input', { bubbles: true }));
    flushSync();
    return el;
  }

  function ctrlS(on: Element): void {
    on.dispatchEvent(new KeyboardEvent('keydown', { key: 's', ctrlKey: true, bubbles: true }));
    flushSync();
  }

  async function settle(): Promise<void> {
    for (let i = 0; i < 5; i++) await tick();
    flushSync();
  }

  it('a gain typed without Enter is in the plan Ctrl+S saves', async () => {
    const gain = typeOnly('band-gain', '+2 dB');
    // Counts as unsaved while typed: the close prompt would ask.
    expect(host.dirty.at(-1)?.[0]).toBe(true);
    ctrlS(gain);
    await settle();
    expect(host.saved).toHaveLength(1);
    expect(host.saved[0].plan.input.bands[1].gainDb).toBe(2);
    expect(doc.plan.input.bands[1].gainDb).toBe(2);
    expect(view.notice?.text).toMatch(/^Saved /);
    expect(host.dirty.at(-1)?.[0]).toBe(false);
  });

  it('notes typed and not yet left are saved with the plan, as one edit', async () => {
    const notes = typeOnly('plan-notes', 'Measured at 1 m, invented scenario.');
    ctrlS(notes);
    await settle();
    expect(host.saved[0].plan.notes).toBe('Measured at 1 m, invented scenario.');
    // Leaving the field afterwards is not a second edit (the browser fires change again on blur).
    const plan = doc.plan;
    notes.dispatchEvent(new Event('change', { bubbles: true }));
    expect(doc.plan).toBe(plan);
    expect(doc.dirty).toBe(false);
  });

  it('text that is not a valid value refuses the save with the reason; nothing is saved', async () => {
    const gain = typeOnly('band-gain', 'loud');
    ctrlS(gain);
    await settle();
    expect(host.saved).toHaveLength(0);
    expect(view.notice?.kind).toBe('error');
    expect(view.notice?.text).toMatch(/^Not saved: Gain: .*not a gain.*press Escape/);
    expect(target.querySelector('[data-testid="band-gain-error"]')).not.toBeNull();
  });
});

describe('files through the host', () => {
  it('reload (chosen in the desktop changed-on-disk question) re-reads the file without asking again', async () => {
    host.initial = { ok: true, value: { plan: read(hallText), path: '/plans/hall.bqplan' } };
    await start();
    doc.apply({ ok: true, plan: { ...doc.plan, name: 'Mine' } });
    let asked = 0;
    const confirm = window.confirm;
    window.confirm = () => (asked++, false);
    try {
      host.menu!('reload');
      for (let i = 0; i < 5; i++) await tick();
      expect(asked).toBe(0);
      expect(doc.plan.name).toBe(read(demoText).name); // what FakeHost.revertPlan reads "from disk"
      expect(doc.dirty).toBe(false);
      // The menu's own Revert still asks.
      doc.apply({ ok: true, plan: { ...doc.plan, name: 'Mine' } });
      host.menu!('revert');
      for (let i = 0; i < 5; i++) await tick();
      expect(asked).toBe(1);
      expect(doc.plan.name).toBe('Mine');
    } finally {
      window.confirm = confirm;
    }
  });

  it('a download is reported as a download the browser does not confirm, never as "Saved"', async () => {
    await start();
    host.savePlanAs = async (plan: Plan) => {
      host.saved.push({ plan, path: null });
      return { ok: true as const, value: 'monitor.bqplan', downloaded: true };
    };
    host.menu!('save');
    for (let i = 0; i < 5; i++) await tick();
    expect(host.saved).toHaveLength(1);
    expect(view.notice?.text).toMatch(/^Downloaded monitor\.bqplan\. The browser does not confirm it was written/);
    expect(view.notice?.text).not.toMatch(/Saved/);
  });

  it('a broken file is refused with the reader message and the open plan stays', async () => {
    await start();
    const before = doc.plan;
    host.nextOpen = { ok: false, error: 'broken.bqplan: outputs[0].bands[0].q: must be > 0' };
    host.menu!('open');
    for (let i = 0; i < 5; i++) await tick();
    flushSync();
    expect(doc.plan).toBe(before);
    const notice = target.querySelector('[data-testid="notice"]');
    expect(notice?.getAttribute('role')).toBe('alert');
    expect(notice?.textContent).toMatch(/outputs\[0\]\.bands\[0\]\.q: must be > 0/);
  });

  it('Open Measurement (menu) imports the file the host read: on the plot and in the list; a file it cannot read changes nothing', async () => {
    await start();
    const before = doc.plan;
    host.nextMeasurement = { ok: true, value: { fileName: 'bad.txt', bytes: new TextEncoder().encode('100 0\n100 1\n') } };
    host.menu!('openMeasurement');
    for (let i = 0; i < 5; i++) await tick();
    flushSync();
    expect(doc.plan).toBe(before);
    expect(target.querySelector('[data-testid="measure-error"]')?.textContent).toMatch(/^line 2: /);
    host.nextMeasurement = { ok: true, value: { fileName: 'room.txt', bytes: new TextEncoder().encode('20 3\n200 0\n2000 -1\n') } };
    host.menu!('openMeasurement');
    for (let i = 0; i < 5; i++) await tick();
    flushSync();
    expect(doc.plan.measurements?.map((m) => m.id)).toEqual(['room']);
    expect(doc.plan.systemMeasurementIds).toEqual(['room']);
    expect(target.querySelectorAll('[data-testid="measurement-row"]')).toHaveLength(1);
    expect(target.querySelector('[data-testid="measure-caution"]')).not.toBeNull();
    host.nextMeasurement = { ok: false, error: 'Cannot open "x.wav": permission denied.' };
    host.menu!('openMeasurement');
    for (let i = 0; i < 5; i++) await tick();
    flushSync();
    expect(target.querySelector('[data-testid="notice"]')?.textContent).toMatch(/permission denied/);
    expect(doc.plan.measurements).toHaveLength(1);
  });

  it('menu commands switch views and create a fresh plan with one full-range output', async () => {
    await start();
    host.menu!('view:zplane');
    flushSync();
    expect(target.querySelector('[data-testid="stability"]')?.textContent).toMatch(/Largest pole radius 0\.9\d+/);
    host.menu!('view:time');
    flushSync();
    expect(view.view).toBe('time');
    host.menu!('new');
    flushSync();
    expect(doc.plan.outputs).toHaveLength(1);
    expect(doc.plan.outputs[0].name).toBe('Full range');
    host.menu!('view:response');
  });

  it('a sample rate that leaves a band above Nyquist is refused with a message', async () => {
    await start();
    const select = target.querySelector<HTMLSelectElement>('[data-testid="sample-rate"]')!;
    doc.apply({ ok: true, plan: { ...doc.plan, input: { bands: [...doc.plan.input.bands, { id: 'b3', type: 'peaking', frequency: 21000, gainDb: 1, q: 1, enabled: true }] } } });
    select.value = 'custom';
    select.dispatchEvent(new Event('change', { bubbles: true }));
    flushSync();
    const custom = target.querySelector<HTMLInputElement>('[data-testid="sample-rate-custom"]')!;
    custom.focus();
    custom.value = '32k';
    custom.dispatchEvent(new Event('input', { bubbles: true }));
    custom.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }));
    flushSync();
    expect(doc.plan.sampleRate).toBe(48000);
    expect(target.querySelector('[data-testid="sample-rate-custom-error"]')?.textContent).toMatch(/input chain band 3 at 21 kHz/);
    custom.value = '96k';
    custom.dispatchEvent(new Event('input', { bubbles: true }));
    custom.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }));
    flushSync();
    // The 21 kHz band moves by more than the tolerance: the rate waits for the dialog's choice.
    expect(doc.plan.sampleRate).toBe(48000);
    target.querySelector<HTMLButtonElement>('[data-testid="retarget-keep"]')!.click();
    flushSync();
    expect(doc.plan.sampleRate).toBe(96000);
  });

  it('a refused preset rate puts the list back to the rate the plan keeps', async () => {
    await start();
    const select = target.querySelector<HTMLSelectElement>('[data-testid="sample-rate"]')!;
    doc.apply({ ok: true, plan: { ...doc.plan, input: { bands: [...doc.plan.input.bands, { id: 'b3', type: 'peaking', frequency: 23000, gainDb: 1, q: 1, enabled: true }] } } });
    flushSync();
    select.value = '44100';
    select.dispatchEvent(new Event('change', { bubbles: true }));
    flushSync();
    expect(doc.plan.sampleRate).toBe(48000);
    expect(select.value).toBe('48000');
    expect(view.notice?.text).toMatch(/44\.1 kHz refused/);
    select.value = '96000';
    select.dispatchEvent(new Event('change', { bubbles: true }));
    flushSync();
    // The 23 kHz band moves by more than the tolerance: the list keeps the plan's rate until the dialog's choice.
    expect(select.value).toBe('48000');
    target.querySelector<HTMLButtonElement>('[data-testid="retarget-keep"]')!.click();
    flushSync();
    expect(doc.plan.sampleRate).toBe(96000);
    expect(select.value).toBe('96000');
  });

  it('Ctrl+Z in the notes or a name field is the text undo there, not an undo of the plan', async () => {
    await start();
    const before = doc.plan;
    doc.apply({ ok: true, plan: { ...doc.plan, name: 'Edited by a test' } });
    flushSync();
    expect(doc.canUndo).toBe(true);
    for (const sel of ['[data-testid="plan-notes"]', '[data-testid="plan-name"]']) {
      const field = target.querySelector<HTMLElement>(sel)!;
      field.focus();
      field.dispatchEvent(new KeyboardEvent('keydown', { key: 'z', ctrlKey: true, bubbles: true, cancelable: true }));
      flushSync();
      expect(doc.plan.name).toBe('Edited by a test');
    }
    key('z', { ctrlKey: true });
    expect(doc.plan).toBe(before);
  });
});
