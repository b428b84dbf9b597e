/**
 * The one typed contract between the Electron main process, its preload and the renderer.
 *
 * The preload exposes exactly `DesktopApi` as `window.biquadrant`, one method per message; main
 * validates every payload (plans with the core's reader) and checks the sender. The renderer
 * never imports `electron/`: it reaches the host through its host adapter, which uses this API in
 * Electron and browser fallbacks elsewhere.
 */
import type { Plan } from './plan/types';

/** Channel names, one per method. */
export const IPC = {
  openPlan: 'plan:open',
  openRecent: 'plan:open-recent',
  savePlan: 'plan:save',
  savePlanAs: 'plan:save-as',
  revertPlan: 'plan:revert',
  autosave: 'plan:autosave',
  takeRecovery: 'plan:take-recovery',
  discardRecovery: 'plan:discard-recovery',
  settleRecovery: 'plan:settle-recovery',
  initialDocument: 'plan:initial',
  setDirty: 'window:set-dirty',
  saveText: 'file:save-text',
  openMeasurement: 'measurement:open',
  menuCommand: 'menu:command',
} as const;

/** A document as the renderer holds it: the plan and where it lives on disk (null: never saved). */
export interface PlanDocument {
  plan: Plan;
  path: string | null;
}

export type RecoveryChoice = 'restore' | 'discard';

/** A measurement file as read for the renderer's importer: its name (no folder) and its bytes. */
export interface MeasurementFile {
  fileName: string;
  bytes: Uint8Array;
}

export type HostResult<T> = { ok: true; value: T } | { ok: false; error: string } | { ok: false; cancelled: true };

/**
 * Commands the application menu sends to the focused window's renderer. `reload` comes from main's
 * own question about a plan changed on disk: re-read the file without asking again.
 */
export type MenuCommand =
  | 'new'
  | 'open'
  | 'openMeasurement'
  | 'save'
  | 'saveAs'
  | 'revert'
  | 'reload'
  | 'undo'
  | 'redo'
  | 'export'
  | 'view:response'
  | 'view:zplane'
  | 'view:time'
  | 'view:export';

/** A key chord. `mod` is Ctrl, or Cmd on macOS; `key` is a letter (upper case) or a digit. */
export interface Shortcut {
  key: string;
  mod?: true;
  shift?: true;
  alt?: true;
}

export interface CommandSpec {
  id: MenuCommand;
  /** The menu's label; `&` marks the access key (Windows, Linux). */
  label: string;
  /** The chords that run it; the first is the menu's accelerator and the one tooltips name. */
  shortcuts: readonly Shortcut[];
  /** The same chords in macOS's order, where it differs (Redo: Cmd+Shift+Z first). */
  macShortcuts?: readonly Shortcut[];
}

/**
 * The one command table: the Electron menu (electron/menu.ts), the renderer's key map
 * (`commandForKey`) and the toolbar's tooltips (`shortcutText`) are all generated from it, so
 * a shortcut cannot differ between them. View switching uses Alt+digit: in a browser Ctrl+digit
 * switches tabs before the page sees it.
 */
export const COMMAND_TABLE: readonly CommandSpec[] = [
  { id: 'new', label: '&New Plan', shortcuts: [{ key: 'N', mod: true }] },
  { id: 'open', label: '&Open…', shortcuts: [{ key: 'O', mod: true }] },
  { id: 'openMeasurement', label: 'Open &Measurement…', shortcuts: [] },
  { id: 'save', label: '&Save', shortcuts: [{ key: 'S', mod: true }] },
  { id: 'saveAs', label: 'Save &As…', shortcuts: [{ key: 'S', mod: true, shift: true }] },
  { id: 'revert', label: 'Re&vert to Saved', shortcuts: [] },
  { id: 'export', label: '&Export Coefficients…', shortcuts: [{ key: 'E', mod: true }] },
  { id: 'undo', label: '&Undo', shortcuts: [{ key: 'Z', mod: true }] },
  {
    id: 'redo',
    label: '&Redo',
    shortcuts: [
      { key: 'Y', mod: true },
      { key: 'Z', mod: true, shift: true },
    ],
    macShortcuts: [{ key: 'Z', mod: true, shift: true }],
  },
  { id: 'view:response', label: '&Response', shortcuts: [{ key: '1', alt: true }] },
  { id: 'view:zplane', label: '&Z-plane', shortcuts: [{ key: '2', alt: true }] },
  { id: 'view:time', label: '&Time', shortcuts: [{ key: '3', alt: true }] },
  { id: 'view:export', label: 'E&xport', shortcuts: [{ key: '4', alt: true }] },
];

/**
 * Every command main may send: the table's, and `reload`, which main sends alone (after the user
 * chose "Reload from Disk" when the plan changed on disk) and no menu or key runs.
 */
export const MENU_COMMANDS: readonly MenuCommand[] = [...COMMAND_TABLE.map((c) => c.id), 'reload'];

export function commandSpec(id: MenuCommand): CommandSpec {
  const spec = COMMAND_TABLE.find((c) => c.id === id);
  if (!spec) throw new Error(`no command ${id}`);
  return spec;
}

function chords(spec: CommandSpec, mac: boolean): readonly Shortcut[] {
  return mac && spec.macShortcuts ? spec.macShortcuts : spec.shortcuts;
}

/** The menu accelerator of a command (Electron's syntax), or undefined when it has no shortcut. */
export function accelerator(id: MenuCommand, mac: boolean): string | undefined {
  const s = chords(commandSpec(id), mac)[0];
  if (!s) return undefined;
  return [s.mod ? 'CmdOrCtrl' : null, s.alt ? 'Alt' : null, s.shift ? 'Shift' : null, s.key].filter((p) => p !== null).join('+');
}

/** The chord as a tooltip names it: "Ctrl+Shift+S", "Alt+1"; on macOS "⇧⌘S", "⌥1". */
export function shortcutText(id: MenuCommand, mac: boolean): string | null {
  const s = chords(commandSpec(id), mac)[0];
  if (!s) return null;
  if (mac) return `${s.alt ? '⌥' : ''}${s.shift ? '⇧' : ''}${s.mod ? '⌘' : ''}${s.key}`;
  return [s.mod ? 'Ctrl' : null, s.alt ? 'Alt' : null, s.shift ? 'Shift' : null, s.key].filter((p) => p !== null).join('+');
}

/** The fields of a keyboard event the key map reads. */
export interface KeyChord {
  key: string;
  /** `KeyboardEvent.code` ("Digit1"): Alt+digit types another character on some layouts. */
  code?: string;
  ctrlKey: boolean;
  metaKey: boolean;
  shiftKey: boolean;
  altKey: boolean;
}

function matches(s: Shortcut, e: KeyChord): boolean {
  const key = s.key.toLowerCase();
  const sameKey = e.key.toLowerCase() === key || e.code === (/^\d$/.test(key) ? `Digit${key}` : `Key${s.key.toUpperCase()}`);
  return sameKey && !!s.mod === (e.ctrlKey || e.metaKey) && !!s.shift === e.shiftKey && !!s.alt === e.altKey;
}

/** The command a key press runs in the renderer (every chord of the table, on every platform), or null. */
export function commandForKey(e: KeyChord): MenuCommand | null {
  for (const spec of COMMAND_TABLE) if (spec.shortcuts.some((s) => matches(s, e)) || spec.macShortcuts?.some((s) => matches(s, e))) return spec.id;
  return null;
}

export interface DesktopApi {
  /** Shows an open dialog (`*.bqplan`) and reads the chosen plan; a bad file is refused with the reader's message. */
  openPlan(): Promise<HostResult<PlanDocument>>;
  /** Opens a plan from the recent list by path. */
  openRecent(path: string): Promise<HostResult<PlanDocument>>;
  /** Saves to `path` (atomic, keeps `*.bqplan.bak`); with no path, asks where. Returns the path written. */
  savePlan(plan: Plan, path: string | null): Promise<HostResult<string>>;
  /** Always asks where. */
  savePlanAs(plan: Plan, suggestedPath: string | null): Promise<HostResult<string>>;
  /** Re-reads the plan from disk. */
  revertPlan(path: string): Promise<HostResult<PlanDocument>>;
  /** Stores unsaved work in the user data folder (crash recovery). */
  autosave(doc: PlanDocument): Promise<void>;
  /**
   * The autosaved document left by a crash, if any. It stays stored until `settleRecovery`: a page
   * that reloads or closes before the user answers is offered it again. Its path is null unless the
   * user had chosen that file (see electron/autosave.ts `recoverablePath`).
   */
  takeRecovery(): Promise<PlanDocument | null>;
  /** The user restored (kept) or discarded the document `takeRecovery` gave. */
  settleRecovery(choice: RecoveryChoice): Promise<void>;
  /** Clears this window's own autosave (its work was saved, or is back to the saved plan). */
  discardRecovery(): Promise<void>;
  /** The document this window was opened for (a path from the command line or the OS), or null. */
  initialDocument(): Promise<HostResult<PlanDocument> | null>;
  /**
   * Tells main whether the window has unsaved changes (for the close prompt and the title).
   * `title` is the plan's name; `path` (optional, added later) is the document's file, or null for
   * a plan never saved, so the title shows the right file after New or a recovered document.
   */
  setDirty(dirty: boolean, title: string, path?: string | null): void;
  /** Save dialog for an export (text). */
  saveText(suggestedName: string, text: string, extensions: string[]): Promise<HostResult<string>>;
  /**
   * Shows an open dialog for a measurement file (text columns or a WAV impulse response) and
   * reads it whole; the renderer's importer reads the bytes (a file it cannot read changes nothing).
   */
  openMeasurement(): Promise<HostResult<MeasurementFile>>;
  /** Subscribes to menu commands; returns an unsubscribe function. */
  onMenuCommand(listener: (command: MenuCommand) => void): () => void;
}
