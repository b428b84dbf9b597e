/**
 * The IPC handlers of `DesktopApi` (src/ipc.ts): each call is accepted only from the main frame
 * of a window this process created, showing the app's own page, with the right number of
 * arguments; each payload is validated (plans by the core's reader). A window may write a plan
 * only to a file the user chose for it (dialog, command line, OS, recent list): a compromised
 * page cannot name a path to clobber.
 */
import { BrowserWindow, ipcMain, type IpcMainEvent, type IpcMainInvokeEvent } from 'electron';
import { join } from 'node:path';
import { IPC, type HostResult, type PlanDocument } from '../src/ipc';
import type { Plan } from '../src/plan/types';
import { recoverablePath, type RecoveryStore } from './autosave';
import { showExportDialog, showOpenMeasurementDialog, showOpenPlanDialog } from './dialogs';
import { isPlanPath, readMeasurementFile, saveTextFile } from './files';
import { documentLabel } from './title';
import {
  isAppUrl,
  validateArgumentCount,
  validateBoolean,
  validateDocument,
  validateExtensions,
  validateFileName,
  validateOptionalPath,
  validatePath,
  validatePlan,
  validateRecoveryChoice,
  validateText,
  validateTitle,
} from './validate';
import type { WindowRegistry, WindowState } from './windows';

/** What the handlers need from main: the registry and the file flows it owns. */
export interface IpcHost {
  readonly windows: WindowRegistry;
  /** Origin of the app's page: calls from any other page are refused. */
  readonly appUrlBase: string;
  recovery(): RecoveryStore;
  isRecent(path: string): boolean;
  documentsFolder(): string;
  loadFor(state: WindowState, path: string): Promise<HostResult<PlanDocument>>;
  savePlanTo(state: WindowState, plan: Plan, path: string): Promise<HostResult<string>>;
  savePlanWithDialog(state: WindowState, plan: Plan, suggestedPath: string | null): Promise<HostResult<string>>;
  /** Runs a save call; the close prompt's "save, then close" request is answered by it. */
  saveCall(state: WindowState, run: () => Promise<HostResult<string>>): Promise<HostResult<string>>;
  bringToFront(state: WindowState): void;
  refreshTitle(state: WindowState): void;
}

class Refused extends Error {}

function refused(channel: string, reason: string): never {
  console.warn(`IPC ${channel} refused: ${reason}`);
  throw new Refused(`${channel} refused: ${reason}`);
}

/** For methods returning a HostResult: a bad payload is an `{ok: false, error}` the renderer can show. */
function bad(channel: string, error: string): HostResult<never> {
  console.warn(`IPC ${channel} refused: ${error}`);
  return { ok: false, error };
}

export function registerIpc(host: IpcHost): void {
  const { windows } = host;

  /**
   * The window that sent an IPC message, or null when the sender is not to be trusted: not the
   * main frame, not the app's page, or not a window this process created.
   */
  function senderState(event: IpcMainInvokeEvent | IpcMainEvent): WindowState | null {
    const frame = event.senderFrame;
    if (!frame || frame.parent !== null) return null;
    if (!isAppUrl(frame.url, host.appUrlBase)) return null;
    const win = BrowserWindow.fromWebContents(event.sender);
    if (!win) return null;
    const state = windows.of(win);
    if (!state || state.win.webContents !== event.sender) return null;
    return state;
  }

  /** Registers an invoke handler that checks the sender and the argument count first. */
  function handle(channel: string, argumentCount: number, fn: (state: WindowState, args: unknown[]) => Promise<unknown>): void {
    ipcMain.handle(channel, async (event, ...args: unknown[]) => {
      const state = senderState(event);
      if (!state) refused(channel, 'unknown sender');
      const count = validateArgumentCount(args, argumentCount);
      if (!count.ok) refused(channel, count.error);
      return fn(state, args);
    });
  }

  handle(IPC.openPlan, 0, async (state) => {
    const path = await showOpenPlanDialog(state.win);
    if (!path) return { ok: false, cancelled: true };
    const showing = windows.showing(path);
    if (showing && showing !== state) {
      host.bringToFront(showing);
      return { ok: false, error: `"${documentLabel(showing)}" is already open in another window.` };
    }
    return host.loadFor(state, path);
  });

  handle(IPC.openRecent, 1, async (state, [path]) => {
    const p = validatePath(path);
    if (!p.ok) return bad(IPC.openRecent, p.error);
    if (!host.isRecent(p.value)) return bad(IPC.openRecent, 'path: not in the recent list');
    return host.loadFor(state, p.value);
  });

  handle(IPC.savePlan, 2, (state, [plan, path]) =>
    host.saveCall(state, async () => {
      const pl = validatePlan(plan);
      if (!pl.ok) return bad(IPC.savePlan, pl.error);
      const p = validateOptionalPath(path);
      if (!p.ok) return bad(IPC.savePlan, p.error);
      if (p.value === null) return host.savePlanWithDialog(state, pl.value, null);
      if (!isPlanPath(p.value) || !windows.isGranted(state, p.value)) {
        // Only files the user chose for this window; anything else goes through the dialog.
        return host.savePlanWithDialog(state, pl.value, isPlanPath(p.value) ? p.value : null);
      }
      return host.savePlanTo(state, pl.value, p.value);
    }),
  );

  handle(IPC.savePlanAs, 2, (state, [plan, suggestedPath]) =>
    host.saveCall(state, async () => {
      const pl = validatePlan(plan);
      if (!pl.ok) return bad(IPC.savePlanAs, pl.error);
      const p = validateOptionalPath(suggestedPath, 'suggestedPath');
      if (!p.ok) return bad(IPC.savePlanAs, p.error);
      return host.savePlanWithDialog(state, pl.value, p.value);
    }),
  );

  handle(IPC.revertPlan, 1, async (state, [path]) => {
    const p = validatePath(path);
    if (!p.ok) return bad(IPC.revertPlan, p.error);
    if (!windows.isGranted(state, p.value)) return bad(IPC.revertPlan, 'path: this window did not open or save that file');
    return host.loadFor(state, p.value);
  });

  handle(IPC.autosave, 1, async (state, [doc]) => {
    const d = validateDocument(doc);
    if (!d.ok) refused(IPC.autosave, d.error);
    // Main records whether the path is one the user chose for this window; the page cannot say so.
    const granted = d.value.path !== null && windows.isGranted(state, d.value.path);
    await host.recovery().write(state.id, d.value, { pathGranted: granted, disk: granted ? (windows.diskOf(state, d.value.path!) ?? null) : null });
  });

  handle(IPC.takeRecovery, 0, async (state) => {
    if (!state.offered) {
      if (!state.offersRecovery) return null;
      state.offersRecovery = false;
      const left = await host.recovery().claimLeftover();
      if (!left) return null;
      const path = await recoverablePath(left.doc.path, left.meta, host.isRecent);
      state.offered = { name: left.name, doc: { plan: left.doc.plan, path }, meta: path === null ? { pathGranted: false, disk: null } : left.meta };
    }
    // Offered again, unchanged, until the user answers (the page may reload before that).
    return state.offered.doc;
  });

  handle(IPC.settleRecovery, 1, async (state, [choice]) => {
    const c = validateRecoveryChoice(choice);
    if (!c.ok) refused(IPC.settleRecovery, c.error);
    const offered = state.offered;
    if (!offered) return;
    state.offered = null;
    if (c.value === 'discard') return host.recovery().discardLeftover(offered.name);
    const { doc, meta } = offered;
    if (doc.path !== null) {
      windows.grant(state, doc.path);
      state.path = doc.path;
      windows.setDisk(state, doc.path, meta.disk);
      host.refreshTitle(state);
    }
    await host.recovery().restoreLeftover(offered.name, state.id, doc, { pathGranted: doc.path !== null, disk: meta.disk });
  });

  handle(IPC.discardRecovery, 0, async (state) => {
    await host.recovery().remove(state.id);
  });

  handle(IPC.initialDocument, 0, async (state) => {
    if (!state.initialPath) return null;
    const result = await host.loadFor(state, state.initialPath);
    if (!result.ok) {
      state.path = null;
      host.refreshTitle(state);
    }
    return result;
  });

  handle(IPC.saveText, 3, async (state, [suggestedName, text, extensions]) => {
    const n = validateFileName(suggestedName);
    if (!n.ok) return bad(IPC.saveText, n.error);
    const t = validateText(text);
    if (!t.ok) return bad(IPC.saveText, t.error);
    const x = validateExtensions(extensions);
    if (!x.ok) return bad(IPC.saveText, x.error);
    const path = await showExportDialog(state.win, join(host.documentsFolder(), n.value), x.value);
    if (!path) return { ok: false, cancelled: true };
    const saved = await saveTextFile(path, t.value);
    return saved.ok ? { ok: true, value: saved.value } : { ok: false, error: saved.error };
  });

  // A measurement file: main asks where and reads the bytes; the renderer's importer reads them
  // (and names the line or field of a file it refuses). No path reaches the page.
  handle(IPC.openMeasurement, 0, async (state) => {
    const path = await showOpenMeasurementDialog(state.win);
    if (!path) return { ok: false, cancelled: true };
    const read = await readMeasurementFile(path);
    return read.ok ? { ok: true, value: read.value } : { ok: false, error: read.error };
  });

  ipcMain.on(IPC.setDirty, (event, ...args: unknown[]) => {
    const state = senderState(event);
    if (!state) return void console.warn(`IPC ${IPC.setDirty} refused: unknown sender`);
    if (args.length < 2 || args.length > 3) return void console.warn(`IPC ${IPC.setDirty} refused: expected 2 or 3 arguments`);
    const dirty = validateBoolean(args[0], 'dirty');
    if (!dirty.ok) return void console.warn(`IPC ${IPC.setDirty} refused: ${dirty.error}`);
    const title = validateTitle(args[1]);
    if (!title.ok) return void console.warn(`IPC ${IPC.setDirty} refused: ${title.error}`);
    const path = args.length === 3 ? validateOptionalPath(args[2]) : null;
    if (path && !path.ok) return void console.warn(`IPC ${IPC.setDirty} refused: ${path.error}`);
    state.dirty = dirty.value;
    state.name = title.value;
    // Display only: a path reported here is not a file this window may write.
    if (path && path.ok) state.path = path.value;
    host.refreshTitle(state);
  });
}
