/**
 * The Electron main process: start-up, the app's events, windows (one per plan), the recent list
 * and the menu, and the open/save flows the IPC handlers call. The rest lives in modules beside
 * this one, along its seams:
 *
 *   windows.ts        the window registry and the files each window may write (plain)
 *   close-flow.ts     the close prompt and the save it waits for, as explicit state (plain)
 *   dialogs.ts        the native dialogs
 *   ipc-handlers.ts   the handlers of `DesktopApi`: sender check, payload validation
 *   hardening.ts      permissions, CSP, the app scheme, navigation and new windows refused
 *   files, recent, autosave, validate, security, title, launch-args: file logic (plain, tested)
 *
 * Security (Electron's security checklist): every window runs with `contextIsolation`, `sandbox`,
 * no Node integration, and its page served from `app://biquadrant` under a strict CSP; see
 * hardening.ts and ipc-handlers.ts for the rest.
 */
import { app, BrowserWindow, dialog, Menu, protocol } from 'electron';
import { basename, dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { IPC, type HostResult, type MenuCommand, type PlanDocument } from '../src/ipc';
import type { Plan } from '../src/plan/types';
import { RecoveryStore } from './autosave';
import type { CloseStep, PromptAnswer } from './close-flow';
import { askSaveBeforeClose, safeFileStem, showOpenPlanDialog, showSavePlanDialog } from './dialogs';
import { isPlanPath, readPlanFileTracked, savePlanFileChecked, withPlanExtension } from './files';
import { hardenSessions, hardenWebContents } from './hardening';
import { registerIpc } from './ipc-handlers';
import { planPathsFromArgv } from './launch-args';
import { buildMenuTemplate } from './menu';
import { answerOf, changedOnDiskPrompt } from './prompts';
import { addRecent, defaultCaseInsensitive, hasRecent, loadRecent, removeRecent, saveRecent } from './recent';
import { APP_BASE, APP_ENTRY_URL, APP_SCHEME, contentSecurityPolicy } from './security';
import { APP_NAME, documentLabel, windowTitle } from './title';
import { WindowRegistry, type WindowState } from './windows';

const here = dirname(fileURLToPath(import.meta.url)); // out/main
const PRELOAD = join(here, '../preload/index.cjs');
const RENDERER_ROOT = join(here, '../renderer');
const DEV_SERVER = !app.isPackaged && process.env.ELECTRON_RENDERER_URL ? process.env.ELECTRON_RENDERER_URL : null;
const APP_URL_BASE = DEV_SERVER ? new URL(DEV_SERVER).origin : APP_BASE;
const ENTRY_URL = DEV_SERVER ?? APP_ENTRY_URL;
const CSP = contentSecurityPolicy(DEV_SERVER);
const CASE_INSENSITIVE = defaultCaseInsensitive();

// Same folder in development and in a packaged build (whose name would come from productName).
app.setPath('userData', join(app.getPath('appData'), APP_NAME));

// Before `ready`: the app scheme behaves like https (standard URL parsing, secure context, fetch).
protocol.registerSchemesAsPrivileged([
  { scheme: APP_SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: true } },
]);

const windows = new WindowRegistry(CASE_INSENSITIVE);
let recent: string[] = [];
let quitting = false;
let recovery: RecoveryStore;
const pendingOpen: string[] = [];
let ready = false;

// ---- title, recent list, menu ------------------------------------------------------------------

function refreshTitle(state: WindowState): void {
  if (state.win.isDestroyed()) return;
  state.win.setTitle(windowTitle({ name: state.name, path: state.path, dirty: state.dirty }));
  if (process.platform === 'darwin') {
    state.win.setDocumentEdited(state.dirty);
    state.win.setRepresentedFilename(state.path ?? '');
  }
}

function recentFile(): string {
  return join(app.getPath('userData'), 'recent.json');
}

let recentSaving: Promise<void> = Promise.resolve();

/** Saves the list as it is when the write runs; writes are chained so an older list never lands last. */
function persistRecent(): Promise<void> {
  recentSaving = recentSaving
    .then(() => saveRecent(recentFile(), recent))
    .catch((e: unknown) => console.warn('recent list not saved:', e));
  return recentSaving;
}

async function rememberRecent(path: string): Promise<void> {
  recent = addRecent(recent, path, { caseInsensitive: CASE_INSENSITIVE });
  app.addRecentDocument(path);
  rebuildMenu();
  await persistRecent();
}

async function forgetRecent(path: string): Promise<void> {
  recent = removeRecent(recent, path, { caseInsensitive: CASE_INSENSITIVE });
  rebuildMenu();
  await persistRecent();
}

function sendCommand(state: WindowState, command: MenuCommand): void {
  if (!state.win.isDestroyed()) state.win.webContents.send(IPC.menuCommand, command);
}

function rebuildMenu(): void {
  const template = buildMenuTemplate(
    {
      command: (command, window) => {
        const state = windows.of(window) ?? windows.of(BrowserWindow.getFocusedWindow());
        if (state) return sendCommand(state, command);
        // No window (macOS keeps running with none): New and Open still work.
        if (command === 'new') createWindow({});
        else if (command === 'open') void openWithDialog(undefined);
      },
      newWindow: () => createWindow({}),
      openRecent: (path) => openInWindow(path),
      clearRecent: () => {
        recent = [];
        app.clearRecentDocuments();
        rebuildMenu();
        void persistRecent();
      },
    },
    { platform: process.platform, recent, developer: !app.isPackaged },
  );
  Menu.setApplicationMenu(Menu.buildFromTemplate(template));
}

// ---- windows -----------------------------------------------------------------------------------

function createWindow(options: { initialPath?: string; offersRecovery?: boolean }): WindowState {
  const focused = BrowserWindow.getFocusedWindow();
  const win = new BrowserWindow({
    width: 1320,
    height: 860,
    minWidth: 760,
    minHeight: 520,
    show: false,
    title: APP_NAME,
    // Cascade from the focused window so a new one does not hide it exactly.
    ...(focused ? { x: focused.getBounds().x + 28, y: focused.getBounds().y + 28 } : {}),
    webPreferences: {
      preload: PRELOAD,
      contextIsolation: true,
      sandbox: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      webSecurity: true,
      allowRunningInsecureContent: false,
      webviewTag: false,
      navigateOnDragDrop: false,
      spellcheck: false,
    },
  });
  const state = windows.add(win, options);
  refreshTitle(state);

  win.once('ready-to-show', () => win.show());
  win.on('close', (event) => {
    const step = state.close.request(state.dirty);
    if (step === 'close') return;
    event.preventDefault();
    if (step === 'prompt') void promptBeforeClose(state);
  });
  win.on('closed', () => {
    windows.delete(state);
    // Offered work the user did not answer stays on disk for a later offer.
    if (state.offered) recovery.unclaim(state.offered.name);
    // A window that closes (saved, clean, or changes discarded) leaves no recovery slot behind.
    void recovery.remove(state.id).catch(() => undefined);
  });
  win.webContents.on('render-process-gone', (_event, details) => {
    if (details.reason === 'clean-exit' || win.isDestroyed()) return;
    // The page crashed: hand its last autosave to the reloaded page as a leftover.
    void recovery
      .release(state.id)
      .then((had) => {
        state.offersRecovery = state.offersRecovery || had;
        state.dirty = false;
        if (!win.isDestroyed()) void win.loadURL(ENTRY_URL);
      })
      .catch((e: unknown) => console.error('recovery after a renderer crash failed:', e));
  });
  void win.loadURL(ENTRY_URL);
  return state;
}

function bringToFront(state: WindowState): void {
  if (state.win.isMinimized()) state.win.restore();
  state.win.focus();
}

/** One window per plan: focus the window that shows `path`, or open a new one for it. */
function openInWindow(path: string): void {
  if (!ready) {
    pendingOpen.push(path);
    return;
  }
  const showing = windows.showing(path);
  if (showing) return bringToFront(showing);
  createWindow({ initialPath: path });
}

async function promptBeforeClose(state: WindowState): Promise<void> {
  state.close.promptShown();
  let answer: PromptAnswer;
  try {
    answer = await askSaveBeforeClose(state.win, documentLabel(state));
  } catch (e) {
    state.close.promptFailed();
    throw e;
  }
  const step = state.close.answered(answer, Date.now());
  if (state.win.isDestroyed()) return;
  if (step === 'request-save') {
    // The renderer holds the plan: ask it to save; the save call that answers, if it succeeds, closes the window.
    sendCommand(state, 'save');
  } else if (step === 'close') {
    await recovery.remove(state.id).catch(() => undefined);
    state.win.close();
    if (quitting) app.quit();
  } else {
    quitting = false;
  }
}

/** After a save call (`wanted`: it answers the close prompt): closes the window if it saved. */
function afterSave(state: WindowState, wanted: boolean, saved: boolean): void {
  const step: CloseStep = state.close.saveFinished(wanted, saved);
  if (step === 'stop-quit') quitting = false;
  if (step !== 'close') return;
  state.dirty = false;
  setImmediate(() => {
    if (!state.win.isDestroyed()) state.win.close();
    if (quitting) app.quit();
  });
}

// ---- dialogs and file operations ---------------------------------------------------------------

/** Open with no window to ask (macOS, all windows closed): the plan opens in a new window. */
async function openWithDialog(win: BrowserWindow | undefined): Promise<void> {
  const path = await showOpenPlanDialog(win);
  if (path) openInWindow(path);
}

/** Reads a plan for a window; on success the window shows that file and may save to it. */
async function loadFor(state: WindowState, path: string): Promise<HostResult<PlanDocument>> {
  const read = await readPlanFileTracked(path);
  if (!read.ok) {
    if (/does not exist/.test(read.error) && hasRecent(recent, path, { caseInsensitive: CASE_INSENSITIVE })) await forgetRecent(path);
    return { ok: false, error: read.error };
  }
  state.path = path;
  state.name = read.value.plan.name;
  windows.setDisk(state, path, read.value.disk);
  windows.grant(state, path);
  refreshTitle(state);
  await rememberRecent(path);
  return { ok: true, value: { plan: read.value.plan, path } };
}

/**
 * Saves to a granted path. When the window knows what the file looked like (it opened or saved it)
 * and another program changed it since, asks: overwrite, reload from disk, save as, or cancel.
 */
async function savePlanTo(state: WindowState, plan: Plan, path: string, checkDisk = true): Promise<HostResult<string>> {
  const expected = checkDisk ? windows.diskOf(state, path) : undefined;
  let saved = await savePlanFileChecked(path, plan, { expected });
  if (!saved.ok && saved.changedOnDisk !== undefined) {
    const prompt = changedOnDiskPrompt(basename(path), saved.changedOnDisk === null);
    const { response } = await dialog.showMessageBox(state.win, {
      type: prompt.type,
      buttons: prompt.buttons,
      defaultId: prompt.defaultId,
      cancelId: prompt.cancelId,
      noLink: true,
      title: APP_NAME,
      message: prompt.message,
      detail: prompt.detail,
    });
    const answer = answerOf(prompt, response, 'cancel');
    if (answer === 'overwrite') saved = await savePlanFileChecked(path, plan, {});
    else if (answer === 'saveAs') return savePlanWithDialog(state, plan, path);
    else {
      if (answer === 'reload') sendCommand(state, 'reload');
      return { ok: false, cancelled: true };
    }
  }
  if (!saved.ok) return { ok: false, error: saved.error };
  state.path = path;
  state.name = saved.value.name;
  windows.setDisk(state, path, saved.disk);
  windows.grant(state, path);
  await recovery.remove(state.id).catch(() => undefined);
  await rememberRecent(path);
  refreshTitle(state);
  return { ok: true, value: path };
}

async function savePlanWithDialog(state: WindowState, plan: Plan, suggestedPath: string | null): Promise<HostResult<string>> {
  const defaultPath = suggestedPath ?? join(app.getPath('documents'), `${safeFileStem(plan.name)}.bqplan`);
  const chosen = await showSavePlanDialog(state.win, defaultPath);
  if (!chosen) return { ok: false, cancelled: true };
  // The dialog has asked about replacing an existing file; no second question about its content.
  return savePlanTo(state, plan, withPlanExtension(chosen), false);
}

/**
 * A save call from the page. The close prompt's "save, then close" request is taken up here,
 * before anything can refuse, so any outcome other than a successful save disarms it.
 */
async function saveCall(state: WindowState, run: () => Promise<HostResult<string>>): Promise<HostResult<string>> {
  const closeAfter = state.close.takeSave(Date.now());
  let result: HostResult<string> = { ok: false, cancelled: true };
  try {
    result = await run();
    return result;
  } finally {
    afterSave(state, closeAfter, result.ok);
  }
}

app.on('web-contents-created', (_event, contents) => hardenWebContents(contents));

// ---- start-up ----------------------------------------------------------------------------------

async function start(): Promise<void> {
  await app.whenReady();
  hardenSessions({ appUrlBase: APP_URL_BASE, csp: CSP, rendererRoot: RENDERER_ROOT });
  registerIpc({
    windows,
    appUrlBase: APP_URL_BASE,
    recovery: () => recovery,
    isRecent: (path) => hasRecent(recent, path, { caseInsensitive: CASE_INSENSITIVE }),
    documentsFolder: () => app.getPath('documents'),
    loadFor,
    savePlanTo,
    savePlanWithDialog,
    saveCall,
    bringToFront,
    refreshTitle,
  });
  recovery = new RecoveryStore(join(app.getPath('userData'), 'recovery'));
  recent = await loadRecent(recentFile(), { caseInsensitive: CASE_INSENSITIVE });
  rebuildMenu();
  let leftovers = 0;
  try {
    leftovers = await recovery.claimLeftovers();
  } catch (e) {
    console.error('could not look for unsaved work from the last session:', e);
  }
  ready = true;
  const paths = [...planPathsFromArgv(process.argv, process.cwd()), ...pendingOpen.splice(0)];
  for (const path of paths) openInWindow(path);
  // One window per document left by a crash, each offering it; at least one window.
  const recoveryWindows = Math.max(leftovers, windows.size === 0 ? 1 : 0);
  for (let i = 0; i < recoveryWindows; i++) createWindow({ offersRecovery: i < leftovers });
}

if (!app.requestSingleInstanceLock()) {
  // Another instance runs: it receives our argv through `second-instance` and opens the plans.
  app.quit();
} else {
  app.on('second-instance', (_event, argv, workingDirectory) => {
    const paths = planPathsFromArgv(argv, workingDirectory);
    if (paths.length > 0) {
      for (const path of paths) openInWindow(path);
      return;
    }
    const first = windows.all()[0];
    if (first) bringToFront(first);
    else if (ready) createWindow({});
  });
  // macOS: a plan double-clicked in the Finder or dropped on the Dock icon (may come before `ready`).
  app.on('open-file', (event, path) => {
    event.preventDefault();
    if (isPlanPath(path)) openInWindow(path);
  });
  app.on('before-quit', () => {
    quitting = true;
  });
  app.on('window-all-closed', () => {
    if (process.platform !== 'darwin' || quitting) app.quit();
  });
  app.on('activate', () => {
    if (ready && windows.size === 0) createWindow({});
  });
  start().catch((e: unknown) => {
    console.error(e);
    dialog.showErrorBox(APP_NAME, `Biquadrant could not start: ${e instanceof Error ? e.message : String(e)}`);
    app.exit(1);
  });
}
