// @vitest-environment jsdom
// The host adapter: the preload API when Electron provides one, browser fallbacks otherwise.
import { afterEach, describe, expect, it, vi } from 'vitest';
import demoText from '../../assets/two-way-monitor.bqplan?raw';
import type { DesktopApi, MenuCommand } from '../../src/ipc';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import { browserHost, createHost, planFileName, type LockManagerLike, type SaveFileHandle } from '../../renderer/src/host/host';

function demo(): Plan {
  const r = readPlanText(demoText);
  if (!r.ok) throw r.error;
  return r.plan;
}

afterEach(() => {
  delete window.biquadrant;
  localStorage.clear();
  vi.restoreAllMocks();
});

describe('createHost', () => {
  it('uses window.biquadrant (the preload API) when present and passes calls through', async () => {
    let listener: ((c: MenuCommand) => void) | null = null;
    const api: DesktopApi = {
      openPlan: vi.fn(async () => ({ ok: true as const, value: { plan: demo(), path: '/p/a.bqplan' } })),
      openRecent: vi.fn(),
      savePlan: vi.fn(async (_p: Plan, path: string | null) => ({ ok: true as const, value: path ?? '/p/new.bqplan' })),
      savePlanAs: vi.fn(),
      revertPlan: vi.fn(),
      autosave: vi.fn(async () => {}),
      takeRecovery: vi.fn(async () => null),
      discardRecovery: vi.fn(async () => {}),
      settleRecovery: vi.fn(async () => {}),
      initialDocument: vi.fn(async () => null),
      setDirty: vi.fn(),
      saveText: vi.fn(),
      onMenuCommand: vi.fn((l: (c: MenuCommand) => void) => {
        listener = l;
        return () => (listener = null);
      }),
    } as unknown as DesktopApi;
    window.biquadrant = api;
    const host = createHost();
    expect(host.kind).toBe('desktop');
    const opened = await host.openPlan();
    expect(opened.ok && opened.value.path).toBe('/p/a.bqplan');
    const plan = demo();
    expect(await host.savePlan(plan, '/p/a.bqplan')).toEqual({ ok: true, value: '/p/a.bqplan' });
    expect(api.savePlan).toHaveBeenCalledWith(plan, '/p/a.bqplan');
    host.setDirty(true, 'x', '/plans/x.bqplan');
    expect(api.setDirty).toHaveBeenCalledWith(true, 'x', '/plans/x.bqplan');
    const seen: MenuCommand[] = [];
    const off = host.onMenuCommand((c) => seen.push(c));
    listener!('save');
    expect(seen).toEqual(['save']);
    off();
    expect(listener).toBeNull();
  });

  it('falls back to the browser without it', () => {
    expect(createHost().kind).toBe('browser');
  });
});

/**
 * Web Locks as browsers implement them, for several "tabs" in one test: a lock is held while its
 * callback's promise is pending; `ifAvailable` gets null when another holds it; `close()` is the
 * tab going away (the browser releases its locks).
 */
class FakeLocks {
  readonly held = new Map<string, object>();
  tab(): { locks: LockManagerLike; close: () => void } {
    const mine = new Set<string>();
    const owner = {};
    const locks = {
      request: (name: string, a: unknown, b?: unknown): Promise<unknown> => {
        const opts = (typeof a === 'function' ? {} : a) as { ifAvailable?: boolean };
        const cb = (typeof a === 'function' ? a : b) as (lock: unknown) => unknown;
        if (this.held.has(name)) {
          if (opts.ifAvailable) return Promise.resolve(cb(null));
          return new Promise(() => undefined);
        }
        this.held.set(name, owner);
        mine.add(name);
        return Promise.resolve(cb({ name })).then((r) => {
          if (this.held.get(name) === owner) this.held.delete(name);
          mine.delete(name);
          return r;
        });
      },
    } as LockManagerLike;
    return {
      locks,
      close: () => {
        for (const n of mine) if (this.held.get(n) === owner) this.held.delete(n);
        mine.clear();
      },
    };
  }
}

/** A Storage with a size limit that throws the browsers' QuotaExceededError. */
class SmallStorage implements Storage {
  readonly map = new Map<string, string>();
  constructor(public limit: number) {}
  get length(): number {
    return this.map.size;
  }
  used(): number {
    let n = 0;
    for (const [k, v] of this.map) n += k.length + v.length;
    return n;
  }
  clear(): void {
    this.map.clear();
  }
  getItem(k: string): string | null {
    return this.map.get(k) ?? null;
  }
  key(i: number): string | null {
    return [...this.map.keys()][i] ?? null;
  }
  removeItem(k: string): void {
    this.map.delete(k);
  }
  setItem(k: string, v: string): void {
    const after = this.used() - (this.map.has(k) ? k.length + this.map.get(k)!.length : 0) + k.length + v.length;
    if (after > this.limit) throw new DOMException('full', 'QuotaExceededError');
    this.map.set(k, v);
  }
}

async function settle(): Promise<void> {
  for (let i = 0; i < 5; i++) await Promise.resolve();
}

describe('browser host: recovery', () => {
  it('a page autosaves to its own slot; a later page (after a reload or crash) is offered it', async () => {
    const registry = new FakeLocks();
    const first = registry.tab();
    const a = browserHost({ locks: first.locks });
    const plan = demo();
    await a.autosave({ plan, path: 'monitor.bqplan' });
    expect(await a.takeRecovery()).toBeNull(); // its own live work is not "left over"
    first.close(); // reload: the page goes away
    const b = browserHost({ locks: registry.tab().locks });
    const rec = await b.takeRecovery();
    expect(rec?.path).toBe('monitor.bqplan');
    expect(rec?.plan).toEqual(plan);
  });

  it('recovered work stays until Restore or Discard: a reload before answering offers it again', async () => {
    const registry = new FakeLocks();
    const crashed = registry.tab();
    await browserHost({ locks: crashed.locks }).autosave({ plan: { ...demo(), name: 'Unsaved' }, path: null });
    crashed.close();
    const offeredTab = registry.tab();
    const b = browserHost({ locks: offeredTab.locks });
    expect((await b.takeRecovery())?.plan.name).toBe('Unsaved');
    offeredTab.close(); // reload before clicking Restore
    const c = browserHost({ locks: registry.tab().locks });
    expect((await c.takeRecovery())?.plan.name).toBe('Unsaved');
    await c.settleRecovery('restore');
    // Restored: now this page's own work (kept until saved), no longer offered to another page.
    const d = browserHost({ locks: registry.tab().locks });
    expect(await d.takeRecovery()).toBeNull();
    expect(Object.keys(localStorage).filter((k) => k.startsWith('biquadrant.recovery'))).toHaveLength(1);
    await c.discardRecovery(); // saved later
    expect(Object.keys(localStorage).filter((k) => k.startsWith('biquadrant.recovery'))).toHaveLength(0);
  });

  it('Discard removes the offered work', async () => {
    const registry = new FakeLocks();
    const t = registry.tab();
    await browserHost({ locks: t.locks }).autosave({ plan: demo(), path: null });
    t.close();
    const b = browserHost({ locks: registry.tab().locks });
    expect(await b.takeRecovery()).not.toBeNull();
    await b.settleRecovery('discard');
    expect(await browserHost({ locks: registry.tab().locks }).takeRecovery()).toBeNull();
  });

  it('two open tabs: neither can take or discard the other one\'s work', async () => {
    const registry = new FakeLocks();
    const tabA = browserHost({ locks: registry.tab().locks });
    await tabA.autosave({ plan: { ...demo(), name: 'Tab A work' }, path: null });
    const tabB = browserHost({ locks: registry.tab().locks });
    await settle();
    expect(await tabB.takeRecovery()).toBeNull();
    await tabB.autosave({ plan: { ...demo(), name: 'Tab B work' }, path: null });
    await tabB.discardRecovery(); // B saved its plan: only B's slot goes
    const slots = Object.keys(localStorage).filter((k) => k.startsWith('biquadrant.recovery'));
    expect(slots).toHaveLength(1);
    expect(localStorage.getItem(slots[0])).toContain('Tab A work');
  });

  it('the single slot of earlier versions is still offered', async () => {
    localStorage.setItem('biquadrant.recovery.v1', JSON.stringify({ path: null, text: demoText, at: 1 }));
    const b = browserHost({ locks: new FakeLocks().tab().locks });
    expect((await b.takeRecovery())?.plan).toEqual(demo());
    await b.settleRecovery('discard');
    expect(localStorage.getItem('biquadrant.recovery.v1')).toBeNull();
  });
});

describe('browser host: storage full', () => {
  it('autosave prunes the oldest saved copies to make room, and says so when it still cannot', async () => {
    const storage = new SmallStorage(3 * demoText.length);
    // Two saved copies (for Revert) fill most of it.
    storage.setItem('biquadrant.saved.v1.old.bqplan', demoText);
    storage.setItem('biquadrant.saved.v2.newer.bqplan', JSON.stringify({ at: 5, text: demoText }));
    const host = browserHost({ storage, locks: null });
    await host.autosave({ plan: demo(), path: null });
    expect(storage.getItem('biquadrant.saved.v1.old.bqplan')).toBeNull(); // the oldest went first
    expect([...storage.map.keys()].some((k) => k.startsWith('biquadrant.recovery.v2.'))).toBe(true);
    // Nothing left to prune: a clear error, not silence.
    storage.limit = 100;
    await expect(host.autosave({ plan: { ...demo(), name: 'bigger' }, path: null })).rejects.toThrow(/browser storage for this site is full/);
  });

  it('open still opens when no copy can be kept, and tells the user', async () => {
    const storage = new SmallStorage(10);
    const host = browserHost({ storage, locks: null });
    const file = new File([demoText], 'monitor.bqplan');
    vi.spyOn(HTMLInputElement.prototype, 'click').mockImplementation(function (this: HTMLInputElement) {
      Object.defineProperty(this, 'files', { value: [file] });
      this.dispatchEvent(new Event('change'));
    });
    const r = await host.openPlan();
    expect(r.ok).toBe(true);
    expect(r.ok && r.note).toBe('Browser storage for this site is full: no copy was kept for Revert.');
    expect(r.ok && r.value.plan).toEqual(demo());
  });
});

describe('browser host: saving', () => {
  it('without a save dialog it downloads, and says it is a download (not confirmed)', async () => {
    const host = browserHost({ showSaveFilePicker: null });
    const click = vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(() => {});
    URL.createObjectURL = vi.fn(() => 'blob:x');
    URL.revokeObjectURL = vi.fn();
    const plan = demo();
    const r = await host.savePlan(plan, null);
    expect(r).toEqual({ ok: true, value: 'two-way-studio-monitor-control-room-a.bqplan', downloaded: true });
    expect(click).toHaveBeenCalledTimes(1);
    const back = await host.revertPlan('two-way-studio-monitor-control-room-a.bqplan');
    expect(back.ok && back.value.plan).toEqual(plan);
    const missing = await host.revertPlan('other.bqplan');
    expect(missing.ok).toBe(false);
    // A download with storage full: still downloaded, no exception, and the note says no copy was kept.
    const full = browserHost({ showSaveFilePicker: null, storage: new SmallStorage(10) });
    const r2 = await full.savePlan(plan, null);
    expect(r2.ok && r2.downloaded && r2.note).toMatch(/no copy was kept/);
    // Exports are downloads too, and say so.
    expect(await host.saveText('x.txt', 'b0', ['txt'])).toEqual({ ok: true, value: 'x.txt', downloaded: true });
  });

  it('with the browser save dialog it writes through the file handle; the next save reuses it', async () => {
    const written: string[] = [];
    const asked: string[] = [];
    const handle: SaveFileHandle = {
      name: 'hall.bqplan',
      createWritable: async () => ({ write: async (d: string) => void written.push(d), close: async () => undefined }),
      getFile: async () => ({ text: async () => written.at(-1) ?? '' }),
    };
    const host = browserHost({
      showSaveFilePicker: async (o) => {
        asked.push(o.suggestedName);
        return handle;
      },
    });
    const plan = demo();
    expect(await host.savePlan(plan, null)).toEqual({ ok: true, value: 'hall.bqplan' });
    expect(asked).toEqual(['two-way-studio-monitor-control-room-a.bqplan']);
    expect(readPlanText(written[0]).ok && readPlanText(written[0])).toMatchObject({ plan });
    expect(await host.savePlan({ ...plan, name: 'Again' }, 'hall.bqplan')).toEqual({ ok: true, value: 'hall.bqplan' });
    expect(asked).toHaveLength(1);
    const back = await host.revertPlan('hall.bqplan');
    expect(back.ok && back.value.plan.name).toBe('Again');
    // Save As asks again; a dismissed dialog is a cancel.
    const cancelling = browserHost({ showSaveFilePicker: async () => Promise.reject(new DOMException('no', 'AbortError')) });
    expect(await cancelling.savePlanAs(plan, null)).toEqual({ ok: false, cancelled: true });
  });

  it('file names come from the path or the plan name', () => {
    expect(planFileName(demo(), null)).toBe('two-way-studio-monitor-control-room-a.bqplan');
    expect(planFileName(demo(), 'C:\\plans\\hall.bqplan')).toBe('hall.bqplan');
    expect(planFileName({ ...demo(), name: '***' }, null)).toBe('plan.bqplan');
  });
});
