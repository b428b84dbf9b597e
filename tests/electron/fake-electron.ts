/**
 * A stand-in for the parts of Electron's main-process API that electron/main.ts uses, so its
 * wiring (sender checks, validation, dialogs, close prompts, recovery) runs in vitest. The real
 * `electron` module is never loaded (it needs the binary, which this machine does not have).
 *
 * It models behaviour main.ts relies on, as documented by Electron: `close` is cancellable with
 * `preventDefault()` and is followed by `closed`; `ipcMain.handle` gets `(event, ...args)` with
 * `event.sender` and `event.senderFrame`; `protocol.handle` returns a fetch `Response`.
 */
import { EventEmitter } from 'node:events';

type Handler = (event: unknown, ...args: unknown[]) => unknown;

export interface FakeFrame {
  url: string;
  parent: FakeFrame | null;
}

export class FakeWebContents extends EventEmitter {
  static nextId = 1;
  readonly id = FakeWebContents.nextId++;
  readonly sent: { channel: string; args: unknown[] }[] = [];
  url = '';
  windowOpenHandler: ((details: unknown) => unknown) | null = null;
  readonly mainFrame: FakeFrame = { url: '', parent: null };
  send(channel: string, ...args: unknown[]): void {
    this.sent.push({ channel, args });
  }
  getURL(): string {
    return this.url;
  }
  setWindowOpenHandler(handler: (details: unknown) => unknown): void {
    this.windowOpenHandler = handler;
  }
}

export interface Fake {
  electron: Record<string, unknown>;
  app: EventEmitter & Record<string, any>;
  windows: FakeBrowserWindow[];
  ipcHandlers: Map<string, Handler>;
  ipcListeners: Map<string, Handler>;
  dialog: {
    open: (string | null)[];
    save: (string | null)[];
    messageBox: number[];
    shown: { kind: string; options: any }[];
  };
  menu: { template: any[] | null };
  protocolHandlers: Map<string, (request: Request) => Promise<Response> | Response>;
  privileged: unknown[];
  permissionRequest: ((wc: unknown, permission: string, cb: (ok: boolean) => void) => void) | null;
  focused: FakeBrowserWindow | null;
}

export class FakeBrowserWindow extends EventEmitter {
  static fake: Fake;
  static nextId = 1;
  readonly id = FakeBrowserWindow.nextId++;
  readonly webContents = new FakeWebContents();
  title = '';
  edited = false;
  representedFilename = '';
  destroyed = false;
  shown = false;
  loaded: string[] = [];
  constructor(readonly options: any) {
    super();
    FakeBrowserWindow.fake.windows.push(this);
    FakeBrowserWindow.fake.app.emit('web-contents-created', {}, this.webContents);
    FakeBrowserWindow.fake.focused = this;
  }
  static getFocusedWindow(): FakeBrowserWindow | null {
    const f = FakeBrowserWindow.fake.focused;
    return f && !f.destroyed ? f : null;
  }
  static fromWebContents(wc: unknown): FakeBrowserWindow | null {
    return FakeBrowserWindow.fake.windows.find((w) => w.webContents === wc && !w.destroyed) ?? null;
  }
  async loadURL(url: string): Promise<void> {
    this.loaded.push(url);
    this.webContents.url = url;
    this.webContents.mainFrame.url = url;
    this.emit('ready-to-show');
  }
  show(): void {
    this.shown = true;
  }
  focus(): void {
    FakeBrowserWindow.fake.focused = this;
  }
  isMinimized(): boolean {
    return false;
  }
  restore(): void {}
  getBounds(): { x: number; y: number; width: number; height: number } {
    return { x: 10, y: 10, width: 1000, height: 700 };
  }
  setTitle(title: string): void {
    this.title = title;
  }
  setDocumentEdited(edited: boolean): void {
    this.edited = edited;
  }
  setRepresentedFilename(name: string): void {
    this.representedFilename = name;
  }
  isDestroyed(): boolean {
    return this.destroyed;
  }
  /** Electron's close(): a cancellable `close`, then `closed`. Returns whether it closed. */
  close(): boolean {
    if (this.destroyed) return true;
    let prevented = false;
    this.emit('close', { preventDefault: () => (prevented = true) });
    if (prevented) return false;
    this.destroyed = true;
    this.emit('closed');
    return true;
  }
}

export function createFakeElectron(paths: { appData: string; documents: string }): Fake {
  const app = new EventEmitter() as EventEmitter & Record<string, any>;
  const pathMap: Record<string, string> = { appData: paths.appData, documents: paths.documents, userData: paths.appData + '/default' };
  const fake: Fake = {
    electron: {},
    app,
    windows: [],
    ipcHandlers: new Map(),
    ipcListeners: new Map(),
    dialog: { open: [], save: [], messageBox: [], shown: [] },
    menu: { template: null },
    protocolHandlers: new Map(),
    privileged: [],
    permissionRequest: null,
    focused: null,
  };
  FakeBrowserWindow.fake = fake;
  Object.assign(app, {
    isPackaged: false,
    quitCalls: 0,
    recentDocuments: [] as string[],
    setPath: (name: string, value: string) => void (pathMap[name] = value),
    getPath: (name: string) => {
      const p = pathMap[name];
      if (!p) throw new Error(`no path ${name}`);
      return p;
    },
    whenReady: () => Promise.resolve(),
    requestSingleInstanceLock: () => true,
    quit: () => {
      app.quitCalls++;
    },
    exit: () => undefined,
    addRecentDocument: (p: string) => app.recentDocuments.push(p),
    clearRecentDocuments: () => (app.recentDocuments.length = 0),
  });
  const dialog = {
    showOpenDialog: async (_win: unknown, options: any) => {
      fake.dialog.shown.push({ kind: 'open', options });
      const p = fake.dialog.open.shift() ?? null;
      return p === null ? { canceled: true, filePaths: [] } : { canceled: false, filePaths: [p] };
    },
    showSaveDialog: async (_win: unknown, options: any) => {
      fake.dialog.shown.push({ kind: 'save', options });
      const p = fake.dialog.save.shift() ?? null;
      return p === null ? { canceled: true, filePath: '' } : { canceled: false, filePath: p };
    },
    showMessageBox: async (_win: unknown, options: any) => {
      fake.dialog.shown.push({ kind: 'message', options });
      const r = fake.dialog.messageBox.shift();
      if (r === undefined) throw new Error('unexpected message box');
      return { response: r, checkboxChecked: false };
    },
    showErrorBox: (title: string, content: string) => fake.dialog.shown.push({ kind: 'error', options: { title, content } }),
  };
  const ipcMain = {
    handle: (channel: string, fn: Handler) => fake.ipcHandlers.set(channel, fn),
    on: (channel: string, fn: Handler) => fake.ipcListeners.set(channel, fn),
  };
  const Menu = {
    buildFromTemplate: (template: any[]) => template,
    setApplicationMenu: (template: any[]) => (fake.menu.template = template),
  };
  const protocol = {
    registerSchemesAsPrivileged: (schemes: unknown[]) => fake.privileged.push(...schemes),
    handle: (scheme: string, fn: (request: Request) => Promise<Response>) => fake.protocolHandlers.set(scheme, fn),
  };
  const session = {
    defaultSession: {
      setPermissionRequestHandler: (fn: Fake['permissionRequest']) => (fake.permissionRequest = fn),
      setPermissionCheckHandler: () => undefined,
      webRequest: { onHeadersReceived: () => undefined },
    },
  };
  fake.electron = { app, BrowserWindow: FakeBrowserWindow, dialog, ipcMain, Menu, protocol, session };
  return fake;
}

/** An IPC event as main sees it, from `win`'s main frame unless told otherwise. */
export function ipcEvent(win: FakeBrowserWindow, frame?: Partial<FakeFrame>): { sender: FakeWebContents; senderFrame: FakeFrame } {
  return { sender: win.webContents, senderFrame: { url: frame?.url ?? win.webContents.url, parent: frame?.parent ?? null } };
}
