/**
 * The preload (electron/preload.ts) against a stand-in `electron`: it exposes exactly the
 * DesktopApi methods under `biquadrant`, each on its own channel with its own arguments, and
 * passes on only known menu commands (never the IPC event object).
 */
import { describe, expect, it, vi } from 'vitest';
import { IPC, type DesktopApi } from '../../src/ipc';

const calls: { kind: string; channel: string; args: unknown[] }[] = [];
const listeners = new Map<string, Set<(...a: unknown[]) => void>>();
const exposed: Record<string, unknown> = {};

vi.mock('electron', () => ({
  contextBridge: { exposeInMainWorld: (key: string, api: unknown) => void (exposed[key] = api) },
  ipcRenderer: {
    invoke: (channel: string, ...args: unknown[]) => {
      calls.push({ kind: 'invoke', channel, args });
      return Promise.resolve('answer');
    },
    send: (channel: string, ...args: unknown[]) => void calls.push({ kind: 'send', channel, args }),
    on: (channel: string, fn: (...a: unknown[]) => void) => {
      if (!listeners.has(channel)) listeners.set(channel, new Set());
      listeners.get(channel)!.add(fn);
    },
    removeListener: (channel: string, fn: (...a: unknown[]) => void) => void listeners.get(channel)?.delete(fn),
  },
}));

describe('preload', async () => {
  await import('../../electron/preload');
  const api = exposed.biquadrant as DesktopApi;

  it('exposes exactly the DesktopApi methods under one key', () => {
    expect(Object.keys(exposed)).toEqual(['biquadrant']);
    expect(Object.keys(api).sort()).toEqual(
      [
        'autosave', 'discardRecovery', 'initialDocument', 'onMenuCommand', 'openMeasurement', 'openPlan', 'openRecent', 'revertPlan',
        'savePlan', 'savePlanAs', 'saveText', 'setDirty', 'settleRecovery', 'takeRecovery',
      ].sort(),
    );
    expect(Object.values(api).every((v) => typeof v === 'function')).toBe(true);
  });

  it('maps each method to its own channel with its own arguments', async () => {
    const plan = { name: 'p' } as never;
    calls.length = 0;
    await api.openPlan();
    await api.openRecent('/a.bqplan');
    await api.savePlan(plan, null);
    await api.savePlanAs(plan, '/b.bqplan');
    await api.revertPlan('/a.bqplan');
    await api.autosave({ plan, path: null });
    await api.takeRecovery();
    await api.discardRecovery();
    await api.settleRecovery('restore');
    await api.initialDocument();
    await api.saveText('c.txt', 'b0', ['txt']);
    await api.openMeasurement();
    api.setDirty(true, 'Plan');
    api.setDirty(false, 'Plan', null);
    expect(calls).toEqual([
      { kind: 'invoke', channel: IPC.openPlan, args: [] },
      { kind: 'invoke', channel: IPC.openRecent, args: ['/a.bqplan'] },
      { kind: 'invoke', channel: IPC.savePlan, args: [plan, null] },
      { kind: 'invoke', channel: IPC.savePlanAs, args: [plan, '/b.bqplan'] },
      { kind: 'invoke', channel: IPC.revertPlan, args: ['/a.bqplan'] },
      { kind: 'invoke', channel: IPC.autosave, args: [{ plan, path: null }] },
      { kind: 'invoke', channel: IPC.takeRecovery, args: [] },
      { kind: 'invoke', channel: IPC.discardRecovery, args: [] },
      { kind: 'invoke', channel: IPC.settleRecovery, args: ['restore'] },
      { kind: 'invoke', channel: IPC.initialDocument, args: [] },
      { kind: 'invoke', channel: IPC.saveText, args: ['c.txt', 'b0', ['txt']] },
      { kind: 'invoke', channel: IPC.openMeasurement, args: [] },
      { kind: 'send', channel: IPC.setDirty, args: [true, 'Plan'] },
      { kind: 'send', channel: IPC.setDirty, args: [false, 'Plan', null] },
    ]);
  });

  it('passes known menu commands to the listener, without the event, until unsubscribed', () => {
    const got: unknown[][] = [];
    const off = api.onMenuCommand((...args: unknown[]) => void got.push(args));
    const emit = (...a: unknown[]): void => listeners.get(IPC.menuCommand)!.forEach((fn) => fn({ sender: 'event' }, ...a));
    emit('undo');
    emit('format-disk');
    emit(42);
    emit('view:zplane');
    off();
    emit('redo');
    expect(got).toEqual([['undo'], ['view:zplane']]);
    expect(() => api.onMenuCommand('nope' as never)).toThrow(TypeError);
  });
});
