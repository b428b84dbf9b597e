/**
 * The host adapter: everything the renderer asks of the world outside the page. In Electron the
 * preload exposes `DesktopApi` as `window.biquadrant`; in a plain browser the same calls fall
 * back to a file picker, the browser's save dialog with a file handle where it has one
 * (`showSaveFilePicker`) or else a download, local storage and the clipboard API.
 */
import type { DesktopApi, HostResult, MenuCommand, PlanDocument } from '$core/ipc';
import { readPlanText } from '$core/plan/read';
import { writePlanText } from '$core/plan/write';
import type { Plan } from '$core/plan/types';

declare global {
  interface Window {
    biquadrant?: DesktopApi;
  }
}

/**
 * A save's outcome. `downloaded`: the browser was handed a download, which the page cannot confirm
 * was written (so the page must not say "saved"). `note`: something the user should know although
 * the call succeeded (no copy kept for Revert because browser storage is full).
 */
export type SaveResult = { ok: true; value: string; downloaded?: boolean; note?: string } | { ok: false; error: string } | { ok: false; cancelled: true };
export type OpenResult = { ok: true; value: PlanDocument; note?: string } | { ok: false; error: string } | { ok: false; cancelled: true };

/** The host as the renderer sees it: the preload's API (less the menu-only Open Recent) and the clipboard. */
export interface Host extends Omit<DesktopApi, 'openRecent' | 'openPlan' | 'savePlan' | 'savePlanAs' | 'saveText'> {
  readonly kind: 'desktop' | 'browser';
  openPlan(): Promise<OpenResult>;
  savePlan(plan: Plan, path: string | null): Promise<SaveResult>;
  savePlanAs(plan: Plan, suggestedPath: string | null): Promise<SaveResult>;
  saveText(suggestedName: string, text: string, extensions: string[]): Promise<SaveResult>;
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
    openMeasurement: () => api.openMeasurement(),
    copyText: copyWithClipboard,
    onMenuCommand: (listener) => api.onMenuCommand(listener),
  };
}

/** One recovery slot per page (per browser tab), keyed by a random id made at page load. */
const RECOVERY_PREFIX = 'biquadrant.recovery.v2.';
/** The single slot every tab shared before: offered like a slot whose tab is gone. */
const LEGACY_RECOVERY_KEY = 'biquadrant.recovery.v1';
/** Saved copies for Revert, by file name: `{at, text}`; version 1 held the bare text. */
const SAVED_PREFIX = 'biquadrant.saved.v2.';
const LEGACY_SAVED_PREFIX = 'biquadrant.saved.v1.';
/** Saved copies kept at most; older ones are pruned (recovery slots never are). */
export const MAX_SAVED_COPIES = 20;
const LOCK_PREFIX = 'biquadrant.slot.';

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

function defaultStorage(): Storage | null {
  try {
    return window.localStorage;
  } catch {
    return null;
  }
}

/** The part of the Web Locks API used here (`navigator.locks`). */
export interface LockManagerLike {
  request(name: string, options: { ifAvailable: true }, callback: (lock: unknown) => Promise<unknown> | unknown): Promise<unknown>;
  request(name: string, callback: (lock: unknown) => Promise<unknown> | unknown): Promise<unknown>;
}

/** The part of the File System Access API used here (`showSaveFilePicker`). */
export interface SaveFileHandle {
  readonly name: string;
  createWritable(): Promise<{ write(data: string): Promise<void>; close(): Promise<void> }>;
  getFile(): Promise<{ text(): Promise<string> }>;
}
export type SaveFilePicker = (options: {
  suggestedName: string;
  types: { description: string; accept: Record<string, string[]> }[];
}) => Promise<SaveFileHandle>;

export interface BrowserHostOptions {
  storage?: Storage | null;
  /** Web Locks; without them (older engines) every slot not this page's own is offered. */
  locks?: LockManagerLike | null;
  /** The browser's save dialog; without it, saves are downloads. */
  showSaveFilePicker?: SaveFilePicker | null;
  /** This page's slot id (random by default). */
  slotId?: string;
}

export function isQuotaError(e: unknown): boolean {
  return (
    typeof e === 'object' &&
    e !== null &&
    ((e as { name?: unknown }).name === 'QuotaExceededError' || (e as { name?: unknown }).name === 'NS_ERROR_DOM_QUOTA_REACHED' || (e as { code?: unknown }).code === 22)
  );
}

export class StorageFullError extends Error {
  constructor() {
    super('browser storage for this site is full');
    this.name = 'StorageFullError';
  }
}

function randomId(): string {
  const c = globalThis.crypto;
  if (c && typeof c.randomUUID === 'function') return c.randomUUID().replace(/-/g, '');
  return Math.random().toString(36).slice(2) + Date.now().toString(36);
}

interface SlotRecord {
  path: string | null;
  text: string;
  at: number;
}

function readSlot(raw: string | null): SlotRecord | null {
  if (!raw) return null;
  try {
    const v = JSON.parse(raw) as Partial<SlotRecord>;
    if (typeof v.text !== 'string') return null;
    return { path: typeof v.path === 'string' ? v.path : null, text: v.text, at: typeof v.at === 'number' ? v.at : 0 };
  } catch {
    return null;
  }
}

/**
 * The browser fallbacks.
 *
 * Recovery: each page (each tab) autosaves to its own slot, `biquadrant.recovery.v2.<id>`, and
 * holds a Web Lock named after it for as long as it lives. At start-up a page offers the oldest
 * slot whose lock it can take, that is one whose page is gone (closed, crashed or reloaded), and
 * keeps holding that lock while the offer is open, so no other tab offers the same work. The slot
 * is removed only when the user restores it (it then moves to this page's own slot) or discards
 * it: a reload before the answer offers it again. Slots are never pruned.
 *
 * Saves: with `showSaveFilePicker` (Chromium-based browsers), the browser's own save dialog gives a
 * file handle; the plan is written through it, the write is confirmed, and later saves of the same
 * document go to the same file without asking. Without it the plan is downloaded, which the page
 * cannot confirm, so the result says `downloaded` and the page says so instead of "saved".
 * A copy of each saved or opened plan is kept in local storage for Revert; when storage is full,
 * the oldest copies are pruned, and if that is not enough the user is told no copy was kept.
 */
export function browserHost(options: BrowserHostOptions = {}): Host {
  const menuListeners = new Set<(c: MenuCommand) => void>();
  const store = (): Storage | null => (options.storage !== undefined ? options.storage : defaultStorage());
  const locks: LockManagerLike | null =
    options.locks !== undefined ? options.locks : typeof navigator !== 'undefined' && 'locks' in navigator ? (navigator.locks as unknown as LockManagerLike) : null;
  const picker: SaveFilePicker | null =
    options.showSaveFilePicker !== undefined
      ? options.showSaveFilePicker
      : typeof window !== 'undefined' && typeof (window as unknown as { showSaveFilePicker?: unknown }).showSaveFilePicker === 'function'
        ? ((o) => (window as unknown as { showSaveFilePicker: SaveFilePicker }).showSaveFilePicker(o))
        : null;
  const slotId = options.slotId ?? randomId();
  const ownKey = RECOVERY_PREFIX + slotId;
  /** File handles from the save dialog, by the name the document shows. */
  const handles = new Map<string, SaveFileHandle>();
  let offered: { key: string; record: SlotRecord; release: () => void } | null = null;

  // This page's own slot lock, held until the page goes away.
  if (locks) void locks.request(LOCK_PREFIX + slotId, () => new Promise<never>(() => undefined)).catch(() => undefined);

  /** Takes the lock of another page's slot if that page is gone; returns its release, or null. */
  async function claim(key: string): Promise<(() => void) | null> {
    if (!locks) return () => undefined;
    const name = key === LEGACY_RECOVERY_KEY ? LOCK_PREFIX + 'legacy' : LOCK_PREFIX + key.slice(RECOVERY_PREFIX.length);
    return new Promise((resolve) => {
      let release: () => void = () => undefined;
      const held = new Promise<void>((r) => (release = r));
      locks
        .request(name, { ifAvailable: true }, (lock) => {
          if (!lock) {
            resolve(null);
            return undefined;
          }
          resolve(release);
          return held;
        })
        .catch(() => resolve(null));
    });
  }

  function savedCopies(s: Storage): { key: string; at: number }[] {
    const out: { key: string; at: number }[] = [];
    for (let i = 0; i < s.length; i++) {
      const key = s.key(i);
      if (!key) continue;
      if (key.startsWith(LEGACY_SAVED_PREFIX)) out.push({ key, at: 0 });
      else if (key.startsWith(SAVED_PREFIX)) out.push({ key, at: readSlot(s.getItem(key))?.at ?? 0 });
    }
    return out.sort((a, b) => a.at - b.at);
  }

  /**
   * Writes `value` at `key`; when storage is full, removes saved copies (oldest first, never
   * `key` itself nor a recovery slot) until it fits. Throws StorageFullError when it cannot.
   */
  function putPruning(key: string, value: string): void {
    const s = store();
    if (!s) throw new StorageFullError();
    for (;;) {
      try {
        s.setItem(key, value);
        return;
      } catch (e) {
        if (!isQuotaError(e)) throw e;
        const oldest = savedCopies(s).find((c) => c.key !== key && c.key !== LEGACY_SAVED_PREFIX + key.slice(SAVED_PREFIX.length));
        if (!oldest) throw new StorageFullError();
        s.removeItem(oldest.key);
      }
    }
  }

  /** Keeps a copy for Revert; returns a note for the user when it could not. */
  function keepCopy(name: string, text: string): string | undefined {
    try {
      putPruning(SAVED_PREFIX + name, JSON.stringify({ at: Date.now(), text }));
      store()?.removeItem(LEGACY_SAVED_PREFIX + name);
      const s = store();
      if (s) for (const c of savedCopies(s).slice(0, Math.max(0, savedCopies(s).length - MAX_SAVED_COPIES))) s.removeItem(c.key);
      return undefined;
    } catch (e) {
      if (e instanceof StorageFullError) return 'Browser storage for this site is full: no copy was kept for Revert.';
      throw e;
    }
  }

  function savedText(name: string): string | null {
    const s = store();
    const v2 = readSlot(s?.getItem(SAVED_PREFIX + name) ?? null);
    return v2 ? v2.text : (s?.getItem(LEGACY_SAVED_PREFIX + name) ?? null);
  }

  async function writeThroughPicker(plan: Plan, name: string, handle: SaveFileHandle | null): Promise<SaveResult> {
    let h = handle;
    if (!h) {
      try {
        h = await picker!({ suggestedName: name, types: [{ description: 'Biquadrant plan', accept: { 'application/json': ['.bqplan'] } }] });
      } catch (e) {
        if (typeof e === 'object' && e !== null && (e as { name?: unknown }).name === 'AbortError') return { ok: false, cancelled: true };
        return { ok: false, error: `the save dialog failed (${message(e)})` };
      }
    }
    const text = writePlanText(plan);
    try {
      const w = await h.createWritable();
      await w.write(text);
      await w.close();
    } catch (e) {
      return { ok: false, error: `${h.name}: not written (${message(e)})` };
    }
    handles.set(h.name, h);
    const note = keepCopy(h.name, text);
    return note ? { ok: true, value: h.name, note } : { ok: true, value: h.name };
  }

  function saveByDownload(plan: Plan, path: string | null): SaveResult {
    const name = planFileName(plan, path);
    const text = writePlanText(plan);
    download(name, text, 'application/json');
    const note = keepCopy(name, text);
    return note ? { ok: true, value: name, downloaded: true, note } : { ok: true, value: name, downloaded: true };
  }

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
      handles.delete(file.name); // a file from the picker has no handle: the next save asks where
      const note = keepCopy(file.name, text);
      return note ? { ok: true, value: { plan: r.plan, path: file.name }, note } : { ok: true, value: { plan: r.plan, path: file.name } };
    },
    async openMeasurement() {
      const file = await pickFile('.txt,.csv,.frd,.dat,.wav,.wave,text/plain,text/csv,audio/wav');
      if (!file) return { ok: false, cancelled: true };
      try {
        return { ok: true, value: { fileName: file.name, bytes: new Uint8Array(await file.arrayBuffer()) } };
      } catch (e) {
        return { ok: false, error: `${file.name}: cannot read the file (${message(e)})` };
      }
    },
    async savePlan(plan, path) {
      if (picker) return writeThroughPicker(plan, planFileName(plan, path), path ? (handles.get(path) ?? null) : null);
      return saveByDownload(plan, path);
    },
    async savePlanAs(plan, suggested) {
      if (picker) return writeThroughPicker(plan, planFileName(plan, suggested), null);
      return saveByDownload(plan, suggested);
    },
    async revertPlan(path) {
      const handle = handles.get(path);
      let text: string | null = null;
      if (handle) {
        try {
          text = await (await handle.getFile()).text();
        } catch (e) {
          return { ok: false, error: `${path}: cannot read the file (${message(e)})` };
        }
      } else text = savedText(path);
      if (!text) return { ok: false, error: `no saved copy of ${path} in this browser; open the file again` };
      const r = readPlanText(text);
      if (!r.ok) return { ok: false, error: `${path}: ${r.error.message}` };
      return { ok: true, value: { plan: r.plan, path } };
    },
    async autosave(doc) {
      putPruning(ownKey, JSON.stringify({ path: doc.path, text: writePlanText(doc.plan), at: Date.now() } satisfies SlotRecord));
    },
    async takeRecovery() {
      if (offered) {
        const r = readPlanText(offered.record.text);
        return r.ok ? { plan: r.plan, path: offered.record.path } : null;
      }
      const s = store();
      if (!s) return null;
      const slots: { key: string; record: SlotRecord }[] = [];
      for (let i = 0; i < s.length; i++) {
        const key = s.key(i);
        if (!key || key === ownKey || (key !== LEGACY_RECOVERY_KEY && !key.startsWith(RECOVERY_PREFIX))) continue;
        const record = readSlot(s.getItem(key));
        if (record) slots.push({ key, record });
      }
      slots.sort((a, b) => a.record.at - b.record.at);
      for (const slot of slots) {
        const r = readPlanText(slot.record.text);
        if (!r.ok) continue; // left in place for a person to look at; never offered broken
        const release = await claim(slot.key);
        if (!release) continue; // its page is still open
        if (s.getItem(slot.key) === null) {
          release(); // settled by its own page meanwhile
          continue;
        }
        offered = { key: slot.key, record: slot.record, release };
        return { plan: r.plan, path: slot.record.path };
      }
      return null;
    },
    async settleRecovery(choice) {
      const o = offered;
      if (!o) return;
      offered = null;
      try {
        // Restored work becomes this page's own: it is written there before the old slot goes.
        if (choice === 'restore') putPruning(ownKey, JSON.stringify({ ...o.record, at: Date.now() }));
        store()?.removeItem(o.key);
      } finally {
        o.release();
      }
    },
    async discardRecovery() {
      store()?.removeItem(ownKey);
    },
    async initialDocument() {
      return null;
    },
    setDirty(dirty, title) {
      document.title = `${dirty ? '\u2022 ' : ''}${title} \u2014 Biquadrant`;
    },
    async saveText(name, text) {
      download(name, text, 'text/plain');
      return { ok: true, value: name, downloaded: true };
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
