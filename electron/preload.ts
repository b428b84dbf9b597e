/**
 * The preload: exposes exactly `DesktopApi` as `window.biquadrant`, one method per IPC message.
 *
 * It runs sandboxed (`sandbox: true`), so it is built as one CommonJS file with `src/ipc.ts`
 * bundled in; only `electron` is required at run time. Nothing else of Electron or Node reaches the
 * page: no `ipcRenderer`, no event objects, no generic send. Main validates every payload anyway;
 * the checks here only keep the renderer's mistakes close to where they happen.
 */
import { contextBridge, ipcRenderer, type IpcRendererEvent } from 'electron';
import { IPC, MENU_COMMANDS, type DesktopApi, type MenuCommand } from '../src/ipc';

const api: DesktopApi = {
  openPlan: () => ipcRenderer.invoke(IPC.openPlan),
  openRecent: (path) => ipcRenderer.invoke(IPC.openRecent, path),
  savePlan: (plan, path) => ipcRenderer.invoke(IPC.savePlan, plan, path),
  savePlanAs: (plan, suggestedPath) => ipcRenderer.invoke(IPC.savePlanAs, plan, suggestedPath),
  revertPlan: (path) => ipcRenderer.invoke(IPC.revertPlan, path),
  autosave: (doc) => ipcRenderer.invoke(IPC.autosave, doc),
  takeRecovery: () => ipcRenderer.invoke(IPC.takeRecovery),
  discardRecovery: () => ipcRenderer.invoke(IPC.discardRecovery),
  settleRecovery: (choice) => ipcRenderer.invoke(IPC.settleRecovery, choice),
  initialDocument: () => ipcRenderer.invoke(IPC.initialDocument),
  setDirty: (dirty, title, path) => {
    if (path === undefined) ipcRenderer.send(IPC.setDirty, dirty, title);
    else ipcRenderer.send(IPC.setDirty, dirty, title, path);
  },
  saveText: (suggestedName, text, extensions) => ipcRenderer.invoke(IPC.saveText, suggestedName, text, extensions),
  openMeasurement: () => ipcRenderer.invoke(IPC.openMeasurement),
  onMenuCommand: (listener) => {
    if (typeof listener !== 'function') throw new TypeError('onMenuCommand: listener must be a function');
    const handler = (_event: IpcRendererEvent, command: unknown): void => {
      if (typeof command === 'string' && (MENU_COMMANDS as readonly string[]).includes(command)) listener(command as MenuCommand);
    };
    ipcRenderer.on(IPC.menuCommand, handler);
    return () => {
      ipcRenderer.removeListener(IPC.menuCommand, handler);
    };
  },
};

contextBridge.exposeInMainWorld('biquadrant', api);
