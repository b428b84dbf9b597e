/**
 * The window registry: one `WindowState` per window this process created, found by window id or
 * by the file it shows, and the files each window may write. Plain code (Electron's types only),
 * so its rules have their own tests.
 */
import type { BrowserWindow } from 'electron';
import type { Leftover } from './autosave';
import { CloseFlow } from './close-flow';
import type { DiskFingerprint } from './files';
import { samePathKey } from './recent';

export interface WindowState {
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
  /** The close prompt and the save it may ask for (close-flow.ts). */
  readonly close: CloseFlow;
}

export class WindowRegistry {
  readonly #windows = new Map<number, WindowState>();

  constructor(private readonly caseInsensitive: boolean) {}

  /** Registers a new window; `initialPath` is granted to it. */
  add(win: BrowserWindow, options: { initialPath?: string; offersRecovery?: boolean }): WindowState {
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
      close: new CloseFlow(),
    };
    if (options.initialPath) this.grant(state, options.initialPath);
    this.#windows.set(win.id, state);
    return state;
  }

  delete(state: WindowState): void {
    this.#windows.delete(state.id);
  }

  /** The state of a window by its id (any object with `id`: a BrowserWindow or a BaseWindow). */
  of(window: { id: number } | undefined | null): WindowState | undefined {
    return window ? this.#windows.get(window.id) : undefined;
  }

  get size(): number {
    return this.#windows.size;
  }

  all(): WindowState[] {
    return [...this.#windows.values()];
  }

  pathKey(path: string): string {
    return samePathKey(path, this.caseInsensitive);
  }

  /** The user chose `path` for this window (dialog, command line, OS, recent list): it may write it. */
  grant(state: WindowState, path: string): void {
    state.granted.add(this.pathKey(path));
  }

  isGranted(state: WindowState, path: string): boolean {
    return state.granted.has(this.pathKey(path));
  }

  /** Records what this window last saw of the file at `path` (null: nothing known). */
  setDisk(state: WindowState, path: string, fingerprint: DiskFingerprint | null): void {
    state.disk = fingerprint ? { key: this.pathKey(path), fingerprint } : null;
  }

  /** What this window last saw of the file at `path`, if it read or wrote that file. */
  diskOf(state: WindowState, path: string): DiskFingerprint | undefined {
    return state.disk && state.disk.key === this.pathKey(path) ? state.disk.fingerprint : undefined;
  }

  /** The window that shows `path`, if any (one window per plan). */
  showing(path: string): WindowState | undefined {
    const key = this.pathKey(path);
    return this.all().find((s) => s.path !== null && this.pathKey(s.path) === key);
  }
}
