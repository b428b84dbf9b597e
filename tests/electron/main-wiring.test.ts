/**
 * electron/main.ts wired to a stand-in Electron (fake-electron.ts): window security options, the
 * sender check, payload validation through the real handlers, the save/open flows on real files,
 * the close prompt, crash recovery across two "sessions", and the app scheme's CSP header.
 */
import { chmod, mkdtemp, readdir, readFile, rm, stat, symlink, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { IPC, MENU_COMMANDS } from '../../src/ipc';
import { readPlanText } from '../../src/plan/read';
import { writePlanText } from '../../src/plan/write';
import type { Plan } from '../../src/plan/types';
import { createFakeElectron, ipcEvent, type Fake, type FakeBrowserWindow } from './fake-electron';

// The factory's result is cached across vi.resetModules(), so each export forwards to the fake of
// the current test (set by boot()).
vi.mock('electron', () => {
  const current = (name: string): any => (globalThis as unknown as { __fakeElectron: Fake }).__fakeElectron.electron[name];
  const forward = (name: string): unknown =>
    new Proxy(
      {},
      {
        get: (_t, key) => {
          const target = current(name);
          const v = target[key];
          return typeof v === 'function' ? v.bind(target) : v;
        },
      },
    );
  return {
    app: forward('app'),
    dialog: forward('dialog'),
    ipcMain: forward('ipcMain'),
    Menu: forward('Menu'),
    protocol: forward('protocol'),
    session: forward('session'),
    BrowserWindow: new Proxy(function BrowserWindow() {}, {
      construct: (_t, args) => new (current('BrowserWindow'))(...args),
      get: (_t, key) => {
        const v = current('BrowserWindow')[key];
        return typeof v === 'function' ? v.bind(current('BrowserWindow')) : v;
      },
    }),
  };
});

let root: string;
let fake: Fake;
let plan: Plan;
let warn: ReturnType<typeof vi.spyOn>;

async function boot(): Promise<Fake> {
  fake = createFakeElectron({ appData: join(root, 'appdata'), documents: join(root, 'docs') });
  (globalThis as unknown as { __fakeElectron: Fake }).__fakeElectron = fake;
  vi.resetModules();
  await import('../../electron/main');
  await vi.waitFor(() => expect(fake.windows.length).toBeGreaterThan(0));
  return fake;
}

function invoke(win: FakeBrowserWindow, channel: string, args: unknown[], frame?: { url?: string; parent?: any }): Promise<any> {
  const h = fake.ipcHandlers.get(channel);
  if (!h) throw new Error(`no handler for ${channel}`);
  return Promise.resolve(h(ipcEvent(win, frame), ...args));
}

function send(win: FakeBrowserWindow, channel: string, args: unknown[]): void {
  fake.ipcListeners.get(channel)!(ipcEvent(win), ...args);
}

function menuItem(label: string): any {
  const walk = (items: any[]): any => {
    for (const it of items) {
      if (typeof it.label === 'string' && it.label.replace(/&/g, '') === label) return it;
      if (Array.isArray(it.submenu)) {
        const found = walk(it.submenu);
        if (found) return found;
      }
    }
    return undefined;
  };
  return walk(fake.menu.template ?? []);
}

beforeEach(async () => {
  // Main logs each refused call; kept out of the test output and checked where it matters.
  warn = vi.spyOn(console, 'warn').mockImplementation(() => undefined);
  root = await mkdtemp(join(tmpdir(), 'bq-main-'));
  const read = readPlanText(await readFile(new URL('../../assets/two-way-monitor.bqplan', import.meta.url), 'utf8'));
  if (!read.ok) throw read.error;
  plan = read.plan;
});
afterEach(async () => {
  warn.mockRestore();
  await rm(root, { recursive: true, force: true });
});

describe('start-up and window security', () => {
  it('opens one sandboxed, isolated window on the app scheme, with the preload and a menu', async () => {
    await boot();
    expect(fake.windows).toHaveLength(1);
    const [win] = fake.windows;
    expect(win.options.webPreferences).toMatchObject({ contextIsolation: true, sandbox: true, nodeIntegration: false, webviewTag: false });
    expect(win.options.webPreferences.preload).toMatch(/[/\\]preload[/\\]index\.cjs$/);
    expect(win.loaded).toEqual(['app://biquadrant/index.html']);
    expect(win.title).toBe('Untitled plan \u2014 not saved \u2014 Biquadrant');
    expect(fake.privileged).toEqual([{ scheme: 'app', privileges: { standard: true, secure: true, supportFetchAPI: true } }]);
    expect(fake.app.getPath('userData')).toBe(join(root, 'appdata', 'Biquadrant'));
    // New windows and navigation are refused.
    expect(win.webContents.windowOpenHandler!({ url: 'https://example.com' })).toEqual({ action: 'deny' });
    let prevented = false;
    win.webContents.emit('will-navigate', { preventDefault: () => (prevented = true) });
    expect(prevented).toBe(true);
    // Permissions: nothing but clipboard writes and full screen, and only for the app page.
    const ask = (permission: string, url: string): boolean => {
      let granted: boolean | undefined;
      fake.permissionRequest!({ getURL: () => url }, permission, (ok) => (granted = ok));
      return granted!;
    };
    expect(ask('media', 'app://biquadrant/index.html')).toBe(false);
    expect(ask('clipboard-sanitized-write', 'app://biquadrant/index.html')).toBe(true);
    expect(ask('clipboard-sanitized-write', 'https://example.com/')).toBe(false);
  });

  it('serves the renderer from app://biquadrant with the CSP header, and nothing outside it', async () => {
    await boot();
    const serve = fake.protocolHandlers.get('app')!;
    const page = await serve(new Request('app://biquadrant/index.html'));
    expect(page.status).toBe(200);
    expect(page.headers.get('content-type')).toBe('text/html; charset=utf-8');
    expect(page.headers.get('content-security-policy')).toMatch(/^default-src 'none'; script-src 'self' 'wasm-unsafe-eval';/);
    expect(await page.text()).toContain('<div id="app">');
    expect((await serve(new Request('app://biquadrant/..%2f..%2fpackage.json'))).status).toBe(404);
    expect((await serve(new Request('app://biquadrant/no-such-file.js'))).status).toBe(404);
  });
});

describe('sender check and payload validation', () => {
  it('refuses calls from a sub-frame, a foreign page or a window main did not create', async () => {
    await boot();
    const [win] = fake.windows;
    await expect(invoke(win, IPC.takeRecovery, [], { parent: { url: '', parent: null } })).rejects.toThrow(/unknown sender/);
    await expect(invoke(win, IPC.takeRecovery, [], { url: 'https://evil.example/' })).rejects.toThrow(/unknown sender/);
    const stranger = { webContents: { url: 'app://biquadrant/index.html' } } as unknown as FakeBrowserWindow;
    await expect(invoke(stranger, IPC.takeRecovery, [])).rejects.toThrow(/unknown sender/);
    // The same call from the window itself is answered.
    await expect(invoke(win, IPC.takeRecovery, [])).resolves.toBeNull();
  });

  it('refuses a wrong argument count and bad payloads, writing nothing', async () => {
    await boot();
    const [win] = fake.windows;
    const target = join(root, 'docs', 'x.bqplan');
    await expect(invoke(win, IPC.savePlan, [plan, null, 'extra'])).rejects.toThrow(/expected 2 argument/);
    const bad = structuredClone(plan) as any;
    bad.outputs[0].lowPass.order = 5;
    const r = await invoke(win, IPC.savePlan, [bad, target]);
    expect(r.ok).toBe(false);
    expect(r.error).toContain('plan refused: outputs[0].lowPass.order: linkwitz-riley takes order 2, 4, 6 or 8');
    expect(await invoke(win, IPC.openRecent, ['relative.bqplan'])).toEqual({ ok: false, error: 'path: must be an absolute path' });
    expect(await invoke(win, IPC.saveText, ['../x.txt', 'b0', ['txt']])).toEqual({ ok: false, error: 'suggestedName: must be a file name, not a path' });
    await expect(invoke(win, IPC.autosave, [{ plan, path: null, extra: 1 }])).rejects.toThrow(/document.extra: unknown field/);
    expect(fake.dialog.shown).toEqual([]);
    await expect(readdir(join(root, 'docs'))).rejects.toThrow();
    expect(warn).toHaveBeenCalledWith('IPC plan:save refused: expected 2 argument(s), got 3');
  });

  it('setDirty updates the title; bad values are ignored', async () => {
    await boot();
    const [win] = fake.windows;
    send(win, IPC.setDirty, [true, 'Hall system']);
    expect(win.title).toBe('\u2022 Hall system \u2014 not saved \u2014 Biquadrant');
    // The native edited dot is macOS only.
    expect(win.edited).toBe(process.platform === 'darwin');
    send(win, IPC.setDirty, ['yes', 'Other']);
    send(win, IPC.setDirty, [false, 'Other\n']);
    expect(win.title).toBe('\u2022 Hall system \u2014 not saved \u2014 Biquadrant');
    send(win, IPC.setDirty, [false, 'Hall system', '/plans/hall.bqplan']);
    expect(win.title).toBe('Hall system \u2014 hall.bqplan \u2014 Biquadrant');
    expect(win.edited).toBe(false);
  });
});

describe('open and save', () => {
  it('saves through the dialog, then to the same file with a backup; another path needs the dialog', async () => {
    await boot();
    const [win] = fake.windows;
    const target = join(root, 'monitor'); // the dialog returned no extension
    fake.dialog.save.push(target);
    const first = await invoke(win, IPC.savePlan, [plan, null]);
    expect(first).toEqual({ ok: true, value: target + '.bqplan' });
    expect(fake.dialog.shown[0].options.filters).toEqual([{ name: 'Biquadrant plan', extensions: ['bqplan'] }]);
    expect(await readFile(target + '.bqplan', 'utf8')).toBe(writePlanText(plan));

    const second = await invoke(win, IPC.savePlan, [{ ...plan, name: 'Changed' }, target + '.bqplan']);
    expect(second).toEqual({ ok: true, value: target + '.bqplan' });
    expect(fake.dialog.shown).toHaveLength(1);
    expect(await readFile(target + '.bqplan.bak', 'utf8')).toBe(writePlanText(plan));
    expect(win.title).toBe('Changed \u2014 monitor.bqplan \u2014 Biquadrant');

    // A path the user never chose for this window goes through the dialog (cancelled here).
    const elsewhere = join(root, 'elsewhere.bqplan');
    expect(await invoke(win, IPC.savePlan, [plan, elsewhere])).toEqual({ ok: false, cancelled: true });
    await expect(readFile(elsewhere)).rejects.toThrow();
    // The recent list and its menu follow saved files.
    expect(menuItem('Open Recent').submenu[0].label).toContain('monitor.bqplan');
  });

  it('opens a measurement through its own dialog: its name and bytes, no path; a folder or a file that is not there is refused', async () => {
    await boot();
    const [win] = fake.windows;
    const file = join(root, 'woofer 1m.txt');
    await writeFile(file, '100 0\n1000 -1\n');
    fake.dialog.open.push(file);
    const r = await invoke(win, IPC.openMeasurement, []);
    expect(r.ok).toBe(true);
    expect(r.value.fileName).toBe('woofer 1m.txt');
    expect(new TextDecoder().decode(r.value.bytes)).toBe('100 0\n1000 -1\n');
    expect(JSON.stringify(r.value)).not.toContain(root);
    const shown = fake.dialog.shown[fake.dialog.shown.length - 1];
    expect(shown.options.filters[0].extensions).toEqual(expect.arrayContaining(['txt', 'wav']));
    fake.dialog.open.push(root);
    expect((await invoke(win, IPC.openMeasurement, [])).error).toMatch(/it is not a file/);
    fake.dialog.open.push(join(root, 'gone.wav'));
    expect((await invoke(win, IPC.openMeasurement, [])).error).toMatch(/^Cannot open "gone.wav"/);
    expect(await invoke(win, IPC.openMeasurement, [])).toEqual({ ok: false, cancelled: true });
    await expect(invoke(win, IPC.openMeasurement, ['/etc/passwd'])).rejects.toThrow(/expected 0 argument/);
  });

  it('opens a plan through the dialog; a broken one is refused with the field path and left as it was', async () => {
    await boot();
    const [win] = fake.windows;
    const good = join(root, 'good.bqplan');
    const broken = join(root, 'broken.bqplan');
    await writeFile(good, writePlanText(plan));
    const brokenText = writePlanText(plan).replace('"sampleRate": 48000', '"sampleRate": "48k"');
    await writeFile(broken, brokenText);

    fake.dialog.open.push(broken);
    const r1 = await invoke(win, IPC.openPlan, []);
    expect(r1.ok).toBe(false);
    expect(r1.error).toBe('Cannot open "broken.bqplan": sampleRate: must be a number, not the string "48k"');
    expect(await readFile(broken, 'utf8')).toBe(brokenText);

    fake.dialog.open.push(good);
    expect(await invoke(win, IPC.openPlan, [])).toEqual({ ok: true, value: { plan, path: good } });
    // Revert may re-read that file; another file may not be read through revert.
    expect(await invoke(win, IPC.revertPlan, [good])).toEqual({ ok: true, value: { plan, path: good } });
    expect((await invoke(win, IPC.revertPlan, [broken])).error).toBe('path: this window did not open or save that file');
    // openRecent accepts only files from the recent list.
    expect(await invoke(win, IPC.openRecent, [good])).toEqual({ ok: true, value: { plan, path: good } });
    expect(await invoke(win, IPC.openRecent, [join(root, 'unknown.bqplan')])).toEqual({ ok: false, error: 'path: not in the recent list' });
    expect(fake.app.recentDocuments).toContain(good);
  });

  it('Open Recent in the menu opens the plan in its own window, or focuses the window showing it', async () => {
    await boot();
    const [win] = fake.windows;
    const good = join(root, 'good.bqplan');
    await writeFile(good, writePlanText(plan));
    fake.dialog.open.push(good);
    await invoke(win, IPC.openPlan, []);
    const other = join(root, 'other.bqplan');
    await writeFile(other, writePlanText({ ...plan, name: 'Other' }));
    fake.dialog.open.push(other);
    await invoke(win, IPC.openPlan, []); // now shows `other`; `good` stays in the recent list
    const recentGood = menuItem('Open Recent').submenu.find((i: any) => String(i.label).startsWith('good.bqplan'));
    recentGood.click();
    expect(fake.windows).toHaveLength(2);
    const second = fake.windows[1];
    expect(await invoke(second, IPC.initialDocument, [])).toEqual({ ok: true, value: { plan, path: good } });
    // Again: the window that shows it is focused, no third window.
    fake.focused = win;
    recentGood.click();
    expect(fake.windows).toHaveLength(2);
    expect(fake.focused).toBe(second);
  });

  it('menu commands go to the focused window renderer', async () => {
    await boot();
    const [win] = fake.windows;
    const labels: Record<string, string> = { Undo: 'undo', Redo: 'redo', 'Save As…': 'saveAs', 'Export Coefficients…': 'export', 'Z-plane': 'view:zplane' };
    for (const [label, command] of Object.entries(labels)) {
      menuItem(label).click({}, win);
      expect(win.webContents.sent.at(-1)).toEqual({ channel: IPC.menuCommand, args: [command] });
      expect(MENU_COMMANDS).toContain(command);
    }
  });
});

describe('unsaved changes', () => {
  it('Cancel keeps a dirty window open; Don\u2019t Save closes it and removes its autosave', async () => {
    await boot();
    const [win] = fake.windows;
    send(win, IPC.setDirty, [true, 'Hall']);
    await invoke(win, IPC.autosave, [{ plan, path: null }]);
    const slot = join(root, 'appdata', 'Biquadrant', 'recovery', `${win.id}.json`);
    expect(JSON.parse(await readFile(slot, 'utf8')).plan.name).toBe(plan.name);

    fake.dialog.messageBox.push(2); // Cancel
    expect(win.close()).toBe(false);
    await vi.waitFor(() => expect(fake.dialog.shown).toHaveLength(1));
    expect(fake.dialog.shown[0].options.buttons).toEqual(['Save', "Don't Save", 'Cancel']);
    await new Promise((r) => setTimeout(r, 10));
    expect(win.destroyed).toBe(false);

    fake.dialog.messageBox.push(1); // Don't Save
    win.close();
    await vi.waitFor(() => expect(win.destroyed).toBe(true));
    await vi.waitFor(async () => expect(await readdir(join(root, 'appdata', 'Biquadrant', 'recovery'))).toEqual([]));
  });

  it('Save asks the renderer to save, and the window closes once the save succeeds', async () => {
    await boot();
    const [win] = fake.windows;
    send(win, IPC.setDirty, [true, 'Hall']);
    fake.dialog.messageBox.push(0); // Save
    win.close();
    await vi.waitFor(() => expect(win.webContents.sent.at(-1)).toEqual({ channel: IPC.menuCommand, args: ['save'] }));
    expect(win.destroyed).toBe(false);
    // The renderer answers the command with a save (through the dialog: never saved before).
    fake.dialog.save.push(join(root, 'hall.bqplan'));
    expect((await invoke(win, IPC.savePlan, [plan, null])).ok).toBe(true);
    await vi.waitFor(() => expect(win.destroyed).toBe(true));
    expect(await readFile(join(root, 'hall.bqplan'), 'utf8')).toBe(writePlanText(plan));
  });

  it('a cancelled save keeps the window open', async () => {
    await boot();
    const [win] = fake.windows;
    send(win, IPC.setDirty, [true, 'Hall']);
    fake.dialog.messageBox.push(0);
    win.close();
    await vi.waitFor(() => expect(win.webContents.sent.length).toBe(1));
    expect(await invoke(win, IPC.savePlan, [plan, null])).toEqual({ ok: false, cancelled: true });
    await new Promise((r) => setTimeout(r, 10));
    expect(win.destroyed).toBe(false);
  });
});

describe('crash recovery across sessions', () => {
  it('work autosaved before a crash is offered in the next session until the user answers', async () => {
    await boot();
    const [win] = fake.windows;
    const doc = { plan: { ...plan, name: 'Unsaved work' }, path: null };
    await invoke(win, IPC.autosave, [doc]);
    // Crash: no close, no quit. Next session starts on the same user data folder.
    await boot();
    const [next] = fake.windows;
    expect(fake.windows).toHaveLength(1);
    expect(await invoke(next, IPC.takeRecovery, [])).toEqual(doc);
    await invoke(next, IPC.settleRecovery, ['discard']);
    expect(await invoke(next, IPC.takeRecovery, [])).toBeNull();
  });

  it('after a clean close nothing is offered', async () => {
    await boot();
    const [win] = fake.windows;
    await invoke(win, IPC.autosave, [{ plan, path: null }]);
    send(win, IPC.setDirty, [false, 'x']);
    win.close();
    await vi.waitFor(async () => expect(await readdir(join(root, 'appdata', 'Biquadrant', 'recovery'))).toEqual([]));
    await boot();
    expect(await invoke(fake.windows[0], IPC.takeRecovery, [])).toBeNull();
  });
});

describe('recovered work is kept until the user decides', () => {
  it('a window that closes before Restore or Discard leaves the work to be offered again', async () => {
    await boot();
    const doc = { plan: { ...plan, name: 'Unsaved work' }, path: null };
    await invoke(fake.windows[0], IPC.autosave, [doc]);
    await boot(); // crash, next session
    const [offered] = fake.windows;
    expect(await invoke(offered, IPC.takeRecovery, [])).toEqual(doc);
    // The page reloads before the user answers: it is offered the same work again.
    expect(await invoke(offered, IPC.takeRecovery, [])).toEqual(doc);
    // The window closes without an answer, then the app ends: the next session offers it again.
    offered.close();
    await boot();
    expect(await invoke(fake.windows[0], IPC.takeRecovery, [])).toEqual(doc);
  });

  it('Restore moves the work into the window own slot (a crash right after loses nothing); Discard deletes it', async () => {
    await boot();
    const doc = { plan: { ...plan, name: 'Unsaved work' }, path: null };
    await invoke(fake.windows[0], IPC.autosave, [doc]);
    await boot();
    const [win] = fake.windows;
    await invoke(win, IPC.takeRecovery, []);
    await invoke(win, IPC.settleRecovery, ['restore']);
    const dir = join(root, 'appdata', 'Biquadrant', 'recovery');
    expect(await readdir(dir)).toEqual([`${win.id}.json`]);
    expect(await invoke(win, IPC.takeRecovery, [])).toBeNull();
    await boot(); // crash right after Restore
    const [again] = fake.windows;
    expect((await invoke(again, IPC.takeRecovery, [])).plan.name).toBe('Unsaved work');
    await invoke(again, IPC.settleRecovery, ['discard']);
    expect(await readdir(dir)).toEqual([]);
    await expect(invoke(again, IPC.settleRecovery, ['maybe'])).rejects.toThrow(/choice: must be "restore" or "discard"/);
  });
});

describe('a recovered document regains only a path the user chose', () => {
  it('attack: a page autosaves a document claiming a path it was never given, crashes, and cannot save there after recovery', async () => {
    await boot();
    const [win] = fake.windows;
    const victim = join(root, 'victim.bqplan');
    await writeFile(victim, 'not a plan, but precious');
    // The compromised page claims the path in its autosave, then the session crashes.
    await invoke(win, IPC.autosave, [{ plan, path: victim }]);
    await boot();
    const [next] = fake.windows;
    const rec = await invoke(next, IPC.takeRecovery, []);
    expect(rec.path).toBeNull(); // comes back untitled
    await invoke(next, IPC.settleRecovery, ['restore']);
    // Saving to the claimed path goes through the dialog (cancelled here); the file is untouched.
    expect(await invoke(next, IPC.savePlan, [plan, victim])).toEqual({ ok: false, cancelled: true });
    expect(await readFile(victim, 'utf8')).toBe('not a plan, but precious');
    expect(fake.dialog.shown.map((d) => d.kind)).toEqual(['save']);
  });

  it('the same attack within one session (the renderer crashes and reloads) gains nothing either', async () => {
    await boot();
    const [win] = fake.windows;
    const victim = join(root, 'victim.bqplan');
    await writeFile(victim, 'precious');
    await invoke(win, IPC.autosave, [{ plan, path: victim }]);
    win.webContents.emit('render-process-gone', {}, { reason: 'crashed' });
    await vi.waitFor(() => expect(win.loaded).toHaveLength(2));
    expect((await invoke(win, IPC.takeRecovery, [])).path).toBeNull();
    await invoke(win, IPC.settleRecovery, ['restore']);
    expect(await invoke(win, IPC.savePlan, [plan, victim])).toEqual({ ok: false, cancelled: true });
    expect(await readFile(victim, 'utf8')).toBe('precious');
  });

  it('a path chosen through the dialog, or in the recent list and still there, comes back', async () => {
    await boot();
    const [win] = fake.windows;
    const chosen = join(root, 'chosen.bqplan');
    fake.dialog.save.push(chosen);
    await invoke(win, IPC.savePlan, [plan, null]);
    await invoke(win, IPC.autosave, [{ plan: { ...plan, name: 'Edited' }, path: chosen }]);
    await boot();
    const [next] = fake.windows;
    const rec = await invoke(next, IPC.takeRecovery, []);
    expect(rec.path).toBe(chosen);
    await invoke(next, IPC.settleRecovery, ['restore']);
    expect(await invoke(next, IPC.savePlan, [rec.plan, chosen])).toEqual({ ok: true, value: chosen });
    expect(JSON.parse(await readFile(chosen, 'utf8')).name).toBe('Edited');
  });

  it('a symbolic link named *.bqplan that points at another kind of file is not regained, even from the recent list', async () => {
    if (process.platform === 'win32') return;
    await boot();
    const [win] = fake.windows;
    const link = join(root, 'link.bqplan');
    fake.dialog.save.push(link);
    await invoke(win, IPC.savePlan, [plan, null]); // a real plan file, chosen by the user, in the recent list
    await invoke(win, IPC.autosave, [{ plan, path: link }]);
    // Meanwhile the file is replaced by a link to something that is not a plan.
    const precious = join(root, 'precious.txt');
    await writeFile(precious, 'precious');
    await rm(link);
    await symlink(precious, link);
    await boot();
    const [next] = fake.windows;
    expect((await invoke(next, IPC.takeRecovery, [])).path).toBeNull();
    await invoke(next, IPC.settleRecovery, ['restore']);
    // The first window, which had chosen the file, may still name it, but the save through the link is refused.
    const r = await invoke(next, IPC.savePlan, [plan, link]);
    expect(r).toEqual({ ok: false, cancelled: true }); // not granted here: the dialog, cancelled
    fake.dialog.save.push(link);
    const viaDialog = await invoke(next, IPC.savePlan, [plan, null]);
    expect(viaDialog.ok).toBe(false);
    expect(viaDialog.error).toBe('Not saved to "link.bqplan": it is a link to a file that is not a plan (not named *.bqplan). The file on disk is unchanged.');
    expect(await readFile(precious, 'utf8')).toBe('precious');
  });
});

describe('the plan on disk is not silently replaced', () => {
  async function openedIn(win: FakeBrowserWindow, name = 'plan.bqplan'): Promise<string> {
    const p = join(root, name);
    await writeFile(p, writePlanText(plan));
    fake.dialog.open.push(p);
    expect((await invoke(win, IPC.openPlan, [])).ok).toBe(true);
    return p;
  }

  it('a file changed by another program since it was opened: asks; Cancel leaves it as the other program wrote it', async () => {
    await boot();
    const [win] = fake.windows;
    const p = await openedIn(win);
    const theirs = writePlanText({ ...plan, name: 'Changed elsewhere' });
    await writeFile(p, theirs);
    fake.dialog.messageBox.push(3); // Cancel
    const r = await invoke(win, IPC.savePlan, [{ ...plan, name: 'Mine' }, p]);
    expect(r).toEqual({ ok: false, cancelled: true });
    expect(await readFile(p, 'utf8')).toBe(theirs);
    const box = fake.dialog.shown.find((d) => d.kind === 'message')!.options;
    expect(box.message).toBe('"plan.bqplan" was changed by another program since you opened or saved it.');
    expect(box.buttons).toEqual(['Overwrite', 'Reload from Disk', 'Save As…', 'Cancel']);
  });

  it('Overwrite replaces it (the other version kept as .bak); the next save does not ask again', async () => {
    await boot();
    const [win] = fake.windows;
    const p = await openedIn(win);
    const theirs = writePlanText({ ...plan, name: 'Changed elsewhere' });
    await writeFile(p, theirs);
    fake.dialog.messageBox.push(0);
    expect(await invoke(win, IPC.savePlan, [{ ...plan, name: 'Mine' }, p])).toEqual({ ok: true, value: p });
    expect(JSON.parse(await readFile(p, 'utf8')).name).toBe('Mine');
    expect(await readFile(p + '.bak', 'utf8')).toBe(theirs);
    expect(await invoke(win, IPC.savePlan, [{ ...plan, name: 'Mine again' }, p])).toEqual({ ok: true, value: p });
    expect(fake.dialog.shown.filter((d) => d.kind === 'message')).toHaveLength(1);
  });

  it('Reload from Disk asks the page to reload the file; Save As goes through the dialog', async () => {
    await boot();
    const [win] = fake.windows;
    const p = await openedIn(win);
    await writeFile(p, writePlanText({ ...plan, name: 'Changed elsewhere' }));
    fake.dialog.messageBox.push(1);
    expect(await invoke(win, IPC.savePlan, [plan, p])).toEqual({ ok: false, cancelled: true });
    expect(win.webContents.sent.at(-1)).toEqual({ channel: IPC.menuCommand, args: ['reload'] });
    expect(JSON.parse(await readFile(p, 'utf8')).name).toBe('Changed elsewhere');
    fake.dialog.messageBox.push(2);
    const other = join(root, 'other.bqplan');
    fake.dialog.save.push(other);
    expect(await invoke(win, IPC.savePlan, [{ ...plan, name: 'Mine' }, p])).toEqual({ ok: true, value: other });
    expect(JSON.parse(await readFile(p, 'utf8')).name).toBe('Changed elsewhere');
    expect(JSON.parse(await readFile(other, 'utf8')).name).toBe('Mine');
  });

  it('the check survives a crash: recovered work does not overwrite a file changed since, without asking', async () => {
    await boot();
    const [win] = fake.windows;
    const p = await openedIn(win);
    await invoke(win, IPC.autosave, [{ plan: { ...plan, name: 'Mine' }, path: p }]);
    await boot(); // crash
    const theirs = writePlanText({ ...plan, name: 'Changed elsewhere' });
    await writeFile(p, theirs);
    const [next] = fake.windows;
    expect((await invoke(next, IPC.takeRecovery, [])).path).toBe(p);
    await invoke(next, IPC.settleRecovery, ['restore']);
    fake.dialog.messageBox.push(3); // Cancel
    expect(await invoke(next, IPC.savePlan, [{ ...plan, name: 'Mine' }, p])).toEqual({ ok: false, cancelled: true });
    expect(await readFile(p, 'utf8')).toBe(theirs);
  });

  it('a read-only plan is refused with a clear message and left as it is', async () => {
    await boot();
    const [win] = fake.windows;
    const p = await openedIn(win);
    await chmod(p, 0o444);
    const r = await invoke(win, IPC.savePlan, [{ ...plan, name: 'Mine' }, p]);
    expect(r.ok).toBe(false);
    expect(r.error).toBe('Not saved to "plan.bqplan": the file is read-only. Use Save As to save under another name, or make the file writable and save again. The file on disk is unchanged.');
    expect(await readFile(p, 'utf8')).toBe(writePlanText(plan));
    expect((await stat(p)).mode & 0o777).toBe(0o444);
  });
});

describe('close after save', () => {
  it('a save refused at the close prompt disarms it: a later ordinary save does not close the window', async () => {
    await boot();
    const [win] = fake.windows;
    const p = join(root, 'hall.bqplan');
    fake.dialog.save.push(p);
    await invoke(win, IPC.savePlan, [plan, null]);
    send(win, IPC.setDirty, [true, 'Hall']);
    fake.dialog.messageBox.push(0); // Save
    win.close();
    await vi.waitFor(() => expect(win.webContents.sent.at(-1)).toEqual({ channel: IPC.menuCommand, args: ['save'] }));
    // The page answers with a plan main refuses.
    const bad = structuredClone(plan) as any;
    bad.outputs[0].lowPass.order = 5;
    expect((await invoke(win, IPC.savePlan, [bad, p])).ok).toBe(false);
    // Later, an ordinary save succeeds: the window stays open.
    expect(await invoke(win, IPC.savePlan, [plan, p])).toEqual({ ok: true, value: p });
    await new Promise((r) => setTimeout(r, 20));
    expect(win.destroyed).toBe(false);
  });

  it('a read-only file at the close prompt: refused, and the window stays open after a later save elsewhere', async () => {
    await boot();
    const [win] = fake.windows;
    const p = join(root, 'hall.bqplan');
    fake.dialog.save.push(p);
    await invoke(win, IPC.savePlan, [plan, null]);
    await chmod(p, 0o444);
    send(win, IPC.setDirty, [true, 'Hall']);
    fake.dialog.messageBox.push(0);
    win.close();
    await vi.waitFor(() => expect(win.webContents.sent.at(-1)).toEqual({ channel: IPC.menuCommand, args: ['save'] }));
    expect((await invoke(win, IPC.savePlan, [plan, p])).ok).toBe(false);
    fake.dialog.save.push(join(root, 'elsewhere.bqplan'));
    expect((await invoke(win, IPC.savePlanAs, [plan, null])).ok).toBe(true);
    await new Promise((r) => setTimeout(r, 20));
    expect(win.destroyed).toBe(false);
  });
});
