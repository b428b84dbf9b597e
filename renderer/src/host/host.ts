/**
 * The host adapter: everything the renderer asks of the world outside the page. In Electron the
 * preload exposes `DesktopApi` as `window.biquadrant`; in a plain browser the same calls fall
 * back to a file picker, a download, local storage and the clipboard API.
 */
import type { DesktopApi, HostResult, MenuCommand } from '../../../src/ipc';
import { readPlanText } from '../../../src/plan/read';
import { writePlanText } from '../../../src/plan/write';
import type { Plan } from '../../../src/plan/types';

declare global {
  interface Window {
    biquadrant?: DesktopApi;
  }
}

/** The host as the renderer sees it: the preload's API (less the menu-only Open Recent) and the clipboard. */
export interface Host extends Omit<DesktopApi, 'openRecent'> {
  readonly kind: 'desktop' | 'browser';
  copyText(text: string): Promise<HostResult<true>>;
}

function message(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

async function copyWithClipboard(text: string): Promise<HostResult<true>> {
  try {
    await navigator.clipboard.writeText(text);
    return { ok: true, value: true };
  } catch {
    // Older engines or a page without clipboard permission: the selection-copy fallback.
    const area = document.createElement('textarea');
    area.value = text;
    area.setAttribute('readonly', '');
    area.style.position = 'fixed';
    area.style.opacity = '0';
    document.body.appendChild(area);
    area.select();
    const done = document.execCommand('copy');
    area.remove();
    return done ? { ok: true, value: true } : { ok: false, error: 'the clipboard is not available here' };
  }
}

export function desktopHost(api: DesktopApi): Host {
  return {
    kind: 'desktop',
    openPlan: () => api.openPlan(),
    savePlan: (plan, path) => api.savePlan(plan, path),
    savePlanAs: (plan, suggested) => api.savePlanAs(plan, suggested),
    revertPlan: (path) => api.revertPlan(path),
    autosave: (doc) => api.autosave(doc),
    takeRecovery: () => api.takeRecovery(),
    discardRecovery: () => api.discardRecovery(),
    settleRecovery: (choice) => api.settleRecovery(choice),
    initialDocument: () => api.initialDocument(),
    setDirty: (dirty, title, path) => api.setDirty(dirty, title, path),
    saveText: (name, text, ext) => api.saveText(name, text, ext),
    copyText: copyWithClipboard,
    onMenuCommand: (listener) => api.onMenuCommand(listener),
  };
}

const RECOVERY_KEY = 'biquadrant.recovery.v1';
const SAVED_KEY = 'biquadrant.saved.v1.';

/** A file name for a plan: its name in lower-case words, `.bqplan`. */
export function planFileName(plan: Plan, path: string | null): string {
  if (path) return path.split(/[\\/]/).pop() || 'plan.bqplan';
  const base = plan.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60) || 'plan';
  return `${base}.bqplan`;
}

function download(name: string, text: string, type: string): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  a.style.display = 'none';
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10000);
}

/** Asks for one file; resolves null when the picker is dismissed. */
function pickFile(accept: string): Promise<File | null> {
  return new Promise((resolve) => {
    const input = document.createElement('input');
    input.type = 'file';
    input.accept = accept;
    input.style.display = 'none';
    input.dataset.hostPicker = 'plan';
    document.body.appendChild(input);
    const finish = (file: File | null) => {
      input.remove();
      resolve(file);
    };
    input.addEventListener('change', () => finish(input.files?.[0] ?? null), { once: true });
    input.addEventListener('cancel', () => finish(null), { once: true });
    input.click();
  });
}

function storage(): Storage | null {
  try {
    return window.localStorage;
  } catch {
    return null;
  }
}

export function browserHost(): Host {
  const menuListeners = new Set<(c: MenuCommand) => void>();
  return {
    kind: 'browser',
    async openPlan() {
      const file = await pickFile('.bqplan,.json,application/json');
      if (!file) return { ok: false, cancelled: true };
      let text: string;
      try {
        text = await file.text();
      } catch (e) {
        return { ok: false, error: `${file.name}: cannot read the file (${message(e)})` };
      }
      const r = readPlanText(text);
      if (!r.ok) return { ok: false, error: `${file.name}: ${r.error.message}` };
      storage()?.setItem(SAVED_KEY + file.name, text);
      return { ok: true, value: { plan: r.plan, path: file.name } };
    },
    async savePlan(plan, path) {
      const name = planFileName(plan, path);
      const text = writePlanText(plan);
      download(name, text, 'application/json');
      storage()?.setItem(SAVED_KEY + name, text);
      return { ok: true, value: name };
    },
    async savePlanAs(plan, suggested) {
      return this.savePlan(plan, suggested);
    },
    async revertPlan(path) {
      const text = storage()?.getItem(SAVED_KEY + path);
      if (!text) return { ok: false, error: `no saved copy of ${path} in this browser; open the file again` };
      const r = readPlanText(text);
      if (!r.ok) return { ok: false, error: `${path}: ${r.error.message}` };
      return { ok: true, value: { plan: r.plan, path } };
    },
    async autosave(doc) {
      storage()?.setItem(RECOVERY_KEY, JSON.stringify({ path: doc.path, text: writePlanText(doc.plan), at: Date.now() }));
    },
    async takeRecovery() {
      const s = storage();
      const raw = s?.getItem(RECOVERY_KEY);
      if (!raw) return null;
      s?.removeItem(RECOVERY_KEY);
      try {
        const v = JSON.parse(raw) as { path: string | null; text: string };
        const r = readPlanText(v.text);
        return r.ok ? { plan: r.plan, path: v.path ?? null } : null;
      } catch {
        return null;
      }
    },
    async discardRecovery() {
      storage()?.removeItem(RECOVERY_KEY);
    },
    async settleRecovery() {},
    async initialDocument() {
      return null;
    },
    setDirty(dirty, title) {
      document.title = `${dirty ? '\u2022 ' : ''}${title} \u2014 Biquadrant`;
    },
    async saveText(name, text) {
      download(name, text, 'text/plain');
      return { ok: true, value: name };
    },
    copyText: copyWithClipboard,
    onMenuCommand(listener) {
      menuListeners.add(listener);
      return () => menuListeners.delete(listener);
    },
  };
}

export function createHost(): Host {
  return typeof window !== 'undefined' && window.biquadrant ? desktopHost(window.biquadrant) : browserHost();
}
