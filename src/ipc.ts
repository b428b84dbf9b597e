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
  menuCommand: 'menu:command',
} as const;

/** A document as the renderer holds it: the plan and where it lives on disk (null: never saved). */
export interface PlanDocument {
  plan: Plan;
  path: string | null;
}

export type RecoveryChoice = 'restore' | 'discard';

export type HostResult<T> = { ok: true; value: T } | { ok: false; error: string } | { ok: false; cancelled: true };

/**
 * Commands the application menu sends to the focused window's renderer. `reload` comes from main's
 * own question about a plan changed on disk: re-read the file without asking again.
 */
export type MenuCommand =
  | 'new'
  | 'open'
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

export const MENU_COMMANDS: readonly MenuCommand[] = [
  'new',
  'open',
  'save',
  'saveAs',
  'revert',
  'reload',
  'undo',
  'redo',
  'export',
  'view:response',
  'view:zplane',
  'view:time',
  'view:export',
];

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
  /** Subscribes to menu commands; returns an unsubscribe function. */
  onMenuCommand(listener: (command: MenuCommand) => void): () => void;
}
