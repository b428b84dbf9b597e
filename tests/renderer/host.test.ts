// @vitest-environment jsdom
// The host adapter: the preload API when Electron provides one, browser fallbacks otherwise.
import { afterEach, describe, expect, it, vi } from 'vitest';
import demoText from '../../assets/two-way-monitor.bqplan?raw';
import type { DesktopApi, MenuCommand } from '../../src/ipc';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import { browserHost, createHost, planFileName } from '../../renderer/src/host/host';

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

describe('browser host', () => {
  it('keeps unsaved work in local storage for recovery, once', async () => {
    const host = browserHost();
    expect(await host.takeRecovery()).toBeNull();
    const plan = demo();
    await host.autosave({ plan, path: 'monitor.bqplan' });
    const rec = await host.takeRecovery();
    expect(rec?.path).toBe('monitor.bqplan');
    expect(rec?.plan).toEqual(plan);
    expect(await host.takeRecovery()).toBeNull(); // taken
  });

  it('saves by download with a file name from the plan, and reverts to that saved copy', async () => {
    const host = browserHost();
    const click = vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(() => {});
    URL.createObjectURL = vi.fn(() => 'blob:x');
    URL.revokeObjectURL = vi.fn();
    const plan = demo();
    const r = await host.savePlan(plan, null);
    expect(r).toEqual({ ok: true, value: 'two-way-studio-monitor-control-room-a.bqplan' });
    expect(click).toHaveBeenCalledTimes(1);
    const back = await host.revertPlan('two-way-studio-monitor-control-room-a.bqplan');
    expect(back.ok && back.value.plan).toEqual(plan);
    const missing = await host.revertPlan('other.bqplan');
    expect(missing.ok).toBe(false);
  });

  it('file names come from the path or the plan name', () => {
    expect(planFileName(demo(), null)).toBe('two-way-studio-monitor-control-room-a.bqplan');
    expect(planFileName(demo(), 'C:\\plans\\hall.bqplan')).toBe('hall.bqplan');
    expect(planFileName({ ...demo(), name: '***' }, null)).toBe('plan.bqplan');
  });
});
