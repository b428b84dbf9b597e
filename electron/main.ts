/**
 * The Electron main process: windows (one per plan), the menu, dialogs, and the IPC handlers of
 * `DesktopApi`. The file logic lives in plain Node modules beside this one (files, recent,
 * autosave, validate, security), which have their own tests; this file only wires them to Electron.
 *
 * Security (Electron's security checklist): every window runs with `contextIsolation`, `sandbox`,
 * no Node integration, and its page served from `app://biquadrant` under a strict CSP; navigation,
 * new windows, webviews and permission requests are refused; each IPC call is accepted only from
 * the main frame of a window this process created, showing the app's own page, and each payload is
 * validated (plans by the core's reader). A window may write a plan only to a file the user chose
 * for it (dialog, command line, OS, recent list): a compromised page cannot name a path to clobber.
 */
import {
  app,
  BrowserWindow,
  dialog,
  ipcMain,
  Menu,
  protocol,
  session,
  type IpcMainEvent,
  type IpcMainInvokeEvent,
  type OpenDialogOptions,
  type SaveDialogOptions,
} from 'electron';
import { readFile } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { IPC, type HostResult, type MenuCommand, type PlanDocument } from '../src/ipc';
import type { Plan } from '../src/plan/types';
import { recoverablePath, RecoveryStore, type Leftover } from './autosave';
import { CloseAfterSave } from './close-after-save';
import { isPlanPath, readPlanFileTracked, savePlanFileChecked, saveTextFile, withPlanExtension, type DiskFingerprint } from './files';
import { planPathsFromArgv } from './launch-args';
import { buildMenuTemplate } from './menu';
import { answerOf, changedOnDiskPrompt } from './prompts';
import { addRecent, defaultCaseInsensitive, hasRecent, loadRecent, removeRecent, samePathKey, saveRecent } from './recent';
import { APP_BASE, APP_ENTRY_URL, APP_SCHEME, appResponseHeaders, contentSecurityPolicy, resolveAppAsset, withCsp } from './security';
import { APP_NAME, documentLabel, windowTitle } from './title';
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

const here = dirname(fileURLToPath(import.meta.url)); // out/main
const PRELOAD = join(here, '../preload/index.cjs');
const RENDERER_ROOT = join(here, '../renderer');
const DEV_SERVER = !app.isPackaged && process.env.ELECTRON_RENDERER_URL ? process.env.ELECTRON_RENDERER_URL : null;
const APP_URL_BASE = DEV_SERVER ? new URL(DEV_SERVER).origin : APP_BASE;
const ENTRY_URL = DEV_SERVER ?? APP_ENTRY_URL;
const CSP = contentSecurityPolicy(DEV_SERVER);
const PLAN_FILTERS = [{ name: 'Biquadrant plan', extensions: ['bqplan'] }];
const CASE_INSENSITIVE = defaultCaseInsensitive();

// Same folder in development and in a packaged build (whose name would come from productName).
app.setPath('userData', join(app.getPath('appData'), APP_NAME));

// Before `ready`: the app scheme behaves like https (standard URL parsing, secure context, fetch).
protocol.registerSchemesAsPrivileged([
  { scheme: APP_SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: true } },
]);

interface WindowState {
  readonly id: number;
  readonly win: BrowserWindow;
  /** The file shown in the title (as the renderer last reported it, or as last opened/saved here). */
  path: string | null;
  name: string;
  dirty: boolean;
  /** Opened for this file (command line, OS, recent list); `initialDocument` reads it. */
  initialPath: string | null;
  /** Files the user chose for this window: `savePlan` and `revertPlan` accept only these. */
  readonly granted: Set<string>;
  /** A plan file as this window last read or wrote it: a save to that file checks it first. */
  disk: { key: string; fingerprint: DiskFingerprint } | null;
  /** Created to offer a crashed session's work: `takeRecovery` hands it one leftover. */
  offersRecovery: boolean;
  /** The leftover offered to this window, kept until the user restores or discards it. */
  offered: Leftover | null;
  prompting: boolean;
  /** The user chose Save in the close prompt: the save that answers it closes the window. */
  readonly closeAfterSave: CloseAfterSave;
  closeConfirmed: boolean;
}

const windows = new Map<number, WindowState>();
let recent: string[] = [];
let quitting = false;
let recovery: RecoveryStore;
const pendingOpen: string[] = [];
let ready = false;

function pathKey(path: string): string {
  return samePathKey(path, CASE_INSENSITIVE);
}

function grant(state: WindowState, path: string): void {
  state.granted.add(pathKey(path));
}

function isGranted(state: WindowState, path: string): boolean {
  return state.granted.has(pathKey(path));
}

function windowShowing(path: string): WindowState | undefined {
  const key = pathKey(path);
  return [...windows.values()].find((s) => s.path !== null && pathKey(s.path) === key);
}

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

function stateOfWindow(window: { id: number } | undefined | null): WindowState | undefined {
  return window ? windows.get(window.id) : undefined;
}

function rebuildMenu(): void {
  const template = buildMenuTemplate(
    {
      command: (command, window) => {
        const state = stateOfWindow(window) ?? stateOfWindow(BrowserWindow.getFocusedWindow());
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
  const state: WindowState = {
    id: win.id,
    win,
    path: options.initialPath ?? null,
    name: '',
    dirty: false,
    initialPath: options.initialPath ?? null,
    granted: new Set(),
    disk: null,
    offersRecovery: options.offersRecovery ?? false,
    offered: null,
    prompting: false,
    closeAfterSave: new CloseAfterSave(),
    closeConfirmed: false,
  };
  if (options.initialPath) grant(state, options.initialPath);
  windows.set(win.id, state);
  refreshTitle(state);

  win.once('ready-to-show', () => win.show());
  win.on('close', (event) => {
    if (!state.dirty || state.closeConfirmed) return;
    event.preventDefault();
    if (!state.prompting) void promptBeforeClose(state);
  });
  win.on('closed', () => {
    windows.delete(state.id);
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
  const showing = windowShowing(path);
  if (showing) return bringToFront(showing);
  createWindow({ initialPath: path });
}

async function promptBeforeClose(state: WindowState): Promise<void> {
  state.prompting = true;
  let response: number;
  try {
    state.win.focus();
    ({ response } = await dialog.showMessageBox(state.win, {
      type: 'warning',
      buttons: ['Save', "Don't Save", 'Cancel'],
      defaultId: 0,
      cancelId: 2,
      noLink: true,
      title: APP_NAME,
      message: `Save the changes to "${documentLabel(state)}" before closing?`,
      detail: 'If you do not save, your changes since the last save are lost.',
    }));
  } finally {
    state.prompting = false;
  }
  if (state.win.isDestroyed()) return;
  if (response === 0) {
    // The renderer holds the plan: ask it to save; the save that answers, if it succeeds, closes the window.
    state.closeAfterSave.arm();
    sendCommand(state, 'save');
  } else if (response === 1) {
    state.closeConfirmed = true;
    await recovery.remove(state.id).catch(() => undefined);
    state.win.close();
    if (quitting) app.quit();
  } else {
    quitting = false;
  }
}

/** After a save call (`wanted`: the close prompt asked for it): closes the window if it saved. */
function afterSave(state: WindowState, wanted: boolean, saved: boolean): void {
  if (!wanted) return;
  if (!saved) {
    quitting = false;
    return;
  }
  state.dirty = false;
  state.closeConfirmed = true;
  setImmediate(() => {
    if (!state.win.isDestroyed()) state.win.close();
    if (quitting) app.quit();
  });
}

// ---- dialogs and file operations ---------------------------------------------------------------

async function showOpenDialog(win: BrowserWindow | undefined): Promise<string | null> {
  const options: OpenDialogOptions = { title: 'Open plan', filters: PLAN_FILTERS, properties: ['openFile'] };
  const result = win ? await dialog.showOpenDialog(win, options) : await dialog.showOpenDialog(options);
  return result.canceled || result.filePaths.length === 0 ? null : result.filePaths[0];
}

/** Open with no window to ask (macOS, all windows closed): the plan opens in a new window. */
async function openWithDialog(win: BrowserWindow | undefined): Promise<void> {
  const path = await showOpenDialog(win);
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
  setDisk(state, path, read.value.disk);
  grant(state, path);
  refreshTitle(state);
  await rememberRecent(path);
  return { ok: true, value: { plan: read.value.plan, path } };
}

function setDisk(state: WindowState, path: string, fingerprint: DiskFingerprint | null): void {
  state.disk = fingerprint ? { key: pathKey(path), fingerprint } : null;
}

/** What this window last saw of the file at `path`, if it read or wrote that file. */
function diskOf(state: WindowState, path: string): DiskFingerprint | undefined {
  return state.disk && state.disk.key === pathKey(path) ? state.disk.fingerprint : undefined;
}

/**
 * Saves to a granted path. When the window knows what the file looked like (it opened or saved it)
 * and another program changed it since, asks: overwrite, reload from disk, save as, or cancel.
 */
async function savePlanTo(state: WindowState, plan: Plan, path: string, checkDisk: boolean): Promise<HostResult<string>> {
  const expected = checkDisk ? diskOf(state, path) : undefined;
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
  setDisk(state, path, saved.disk);
  grant(state, path);
  await recovery.remove(state.id).catch(() => undefined);
  await rememberRecent(path);
  refreshTitle(state);
  return { ok: true, value: path };
}

function safeFileStem(name: string): string {
  const stem = name.replace(/[\u0000-\u001f<>:"/\\|?*]+/g, ' ').replace(/\s+/g, ' ').trim().slice(0, 80);
  return stem || 'plan';
}

async function savePlanWithDialog(state: WindowState, plan: Plan, suggestedPath: string | null): Promise<HostResult<string>> {
  const defaultPath = suggestedPath ?? join(app.getPath('documents'), `${safeFileStem(plan.name)}.bqplan`);
  const options: SaveDialogOptions = {
    title: 'Save plan',
    defaultPath,
    filters: PLAN_FILTERS,
    properties: ['createDirectory', 'showOverwriteConfirmation'],
  };
  const result = await dialog.showSaveDialog(state.win, options);
  if (result.canceled || !result.filePath) return { ok: false, cancelled: true };
  // The dialog has asked about replacing an existing file; no second question about its content.
  return savePlanTo(state, plan, withPlanExtension(result.filePath), false);
}

/**
 * A save call from the page. The close prompt's "save, then close" request is taken up here,
 * before anything can refuse, so any outcome other than a successful save disarms it.
 */
async function saveCall(state: WindowState, run: () => Promise<HostResult<string>>): Promise<HostResult<string>> {
  const closeAfter = state.closeAfterSave.take();
  let result: HostResult<string> = { ok: false, cancelled: true };
  try {
    result = await run();
    return result;
  } finally {
    afterSave(state, closeAfter, result.ok);
  }
}

// ---- IPC ---------------------------------------------------------------------------------------

/**
 * The window that sent an IPC message, or null when the sender is not to be trusted: not the main
 * frame, not the app's page, or not a window this process created.
 */
function senderState(event: IpcMainInvokeEvent | IpcMainEvent): WindowState | null {
  const frame = event.senderFrame;
  if (!frame || frame.parent !== null) return null;
  if (!isAppUrl(frame.url, APP_URL_BASE)) return null;
  const win = BrowserWindow.fromWebContents(event.sender);
  if (!win) return null;
  const state = windows.get(win.id);
  if (!state || state.win.webContents !== event.sender) return null;
  return state;
}

class Refused extends Error {}

function refused(channel: string, reason: string): never {
  console.warn(`IPC ${channel} refused: ${reason}`);
  throw new Refused(`${channel} refused: ${reason}`);
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

/** For methods returning a HostResult: a bad payload is an `{ok: false, error}` the renderer can show. */
function bad(channel: string, error: string): HostResult<never> {
  console.warn(`IPC ${channel} refused: ${error}`);
  return { ok: false, error };
}

function registerIpc(): void {
  handle(IPC.openPlan, 0, async (state) => {
    const path = await showOpenDialog(state.win);
    if (!path) return { ok: false, cancelled: true };
    const showing = windowShowing(path);
    if (showing && showing !== state) {
      bringToFront(showing);
      return { ok: false, error: `"${documentLabel(showing)}" is already open in another window.` };
    }
    return loadFor(state, path);
  });

  handle(IPC.openRecent, 1, async (state, [path]) => {
    const p = validatePath(path);
    if (!p.ok) return bad(IPC.openRecent, p.error);
    if (!hasRecent(recent, p.value, { caseInsensitive: CASE_INSENSITIVE })) return bad(IPC.openRecent, 'path: not in the recent list');
    return loadFor(state, p.value);
  });

  handle(IPC.savePlan, 2, (state, [plan, path]) =>
    saveCall(state, async () => {
      const pl = validatePlan(plan);
      if (!pl.ok) return bad(IPC.savePlan, pl.error);
      const p = validateOptionalPath(path);
      if (!p.ok) return bad(IPC.savePlan, p.error);
      if (p.value === null) return savePlanWithDialog(state, pl.value, null);
      if (!isPlanPath(p.value) || !isGranted(state, p.value)) {
        // Only files the user chose for this window; anything else goes through the dialog.
        return savePlanWithDialog(state, pl.value, isPlanPath(p.value) ? p.value : null);
      }
      return savePlanTo(state, pl.value, p.value, true);
    }),
  );

  handle(IPC.savePlanAs, 2, (state, [plan, suggestedPath]) =>
    saveCall(state, async () => {
      const pl = validatePlan(plan);
      if (!pl.ok) return bad(IPC.savePlanAs, pl.error);
      const p = validateOptionalPath(suggestedPath, 'suggestedPath');
      if (!p.ok) return bad(IPC.savePlanAs, p.error);
      return savePlanWithDialog(state, pl.value, p.value);
    }),
  );

  handle(IPC.revertPlan, 1, async (state, [path]) => {
    const p = validatePath(path);
    if (!p.ok) return bad(IPC.revertPlan, p.error);
    if (!isGranted(state, p.value)) return bad(IPC.revertPlan, 'path: this window did not open or save that file');
    return loadFor(state, p.value);
  });

  handle(IPC.autosave, 1, async (state, [doc]) => {
    const d = validateDocument(doc);
    if (!d.ok) refused(IPC.autosave, d.error);
    // Main records whether the path is one the user chose for this window; the page cannot say so.
    const granted = d.value.path !== null && isGranted(state, d.value.path);
    await recovery.write(state.id, d.value, { pathGranted: granted, disk: granted ? (diskOf(state, d.value.path!) ?? null) : null });
  });

  handle(IPC.takeRecovery, 0, async (state) => {
    if (!state.offered) {
      if (!state.offersRecovery) return null;
      state.offersRecovery = false;
      const left = await recovery.claimLeftover();
      if (!left) return null;
      const inRecent = (p: string): boolean => hasRecent(recent, p, { caseInsensitive: CASE_INSENSITIVE });
      const path = await recoverablePath(left.doc.path, left.meta, inRecent);
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
    if (c.value === 'discard') return recovery.discardLeftover(offered.name);
    const { doc, meta } = offered;
    if (doc.path !== null) {
      grant(state, doc.path);
      state.path = doc.path;
      setDisk(state, doc.path, meta.disk);
      refreshTitle(state);
    }
    await recovery.restoreLeftover(offered.name, state.id, doc, { pathGranted: doc.path !== null, disk: meta.disk });
  });

  handle(IPC.discardRecovery, 0, async (state) => {
    await recovery.remove(state.id);
  });

  handle(IPC.initialDocument, 0, async (state) => {
    if (!state.initialPath) return null;
    const result = await loadFor(state, state.initialPath);
    if (!result.ok) {
      state.path = null;
      refreshTitle(state);
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
    const result = await dialog.showSaveDialog(state.win, {
      title: 'Export',
      defaultPath: join(app.getPath('documents'), n.value),
      filters: [{ name: 'Export', extensions: x.value }],
      properties: ['createDirectory', 'showOverwriteConfirmation'],
    });
    if (result.canceled || !result.filePath) return { ok: false, cancelled: true };
    const saved = await saveTextFile(result.filePath, t.value);
    return saved.ok ? { ok: true, value: saved.value } : { ok: false, error: saved.error };
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
    refreshTitle(state);
  });
}

// ---- security for every web contents ---------------------------------------------------------

function hardenSessions(): void {
  const ses = session.defaultSession;
  // Clipboard writes (copying coefficients) and full screen are all the page may ask for.
  const allowed = (url: string, permission: string) => isAppUrl(url, APP_URL_BASE) && (permission === 'clipboard-sanitized-write' || permission === 'fullscreen');
  ses.setPermissionRequestHandler((contents, permission, callback) => callback(allowed(contents.getURL(), permission)));
  ses.setPermissionCheckHandler((_contents, permission, requestingOrigin) => allowed(requestingOrigin, permission));
  ses.webRequest.onHeadersReceived((details, callback) => {
    if (isAppUrl(details.url, APP_URL_BASE)) callback({ responseHeaders: withCsp(details.responseHeaders, CSP) });
    else callback({});
  });
  protocol.handle(APP_SCHEME, async (request) => {
    const asset = resolveAppAsset(RENDERER_ROOT, request.url);
    if (!asset || request.method !== 'GET') return new Response('Not found', { status: 404 });
    try {
      const body = await readFile(asset.file);
      return new Response(new Uint8Array(body), { status: 200, headers: appResponseHeaders(asset.mimeType, CSP) });
    } catch {
      return new Response('Not found', { status: 404 });
    }
  });
}

app.on('web-contents-created', (_event, contents) => {
  contents.setWindowOpenHandler(() => ({ action: 'deny' }));
  contents.on('will-navigate', (event) => event.preventDefault());
  contents.on('will-redirect', (event) => event.preventDefault());
  contents.on('will-attach-webview', (event) => event.preventDefault());
});

// ---- start-up ----------------------------------------------------------------------------------

async function start(): Promise<void> {
  await app.whenReady();
  hardenSessions();
  registerIpc();
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
    const first = [...windows.values()][0];
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
