/**
 * The open document: the plan, where it lives, whether it changed since it was saved, and the
 * undo history. Plans are never mutated: every edit replaces the plan with a new object that
 * shares what it did not touch, so the history is a list of references and "dirty" is an
 * identity check against the last saved plan.
 */
import type { Diagnostic } from '$core/diagnostics';
import type { Plan } from '$core/plan/types';
import type { EditResult } from '$core/ui/edits';
import { freshPlan } from '$core/ui/edits';
import { planToJson } from '$core/plan/write';

/** The plan as its file would hold it: two plans with the same text are the same document. */
const textOf = new WeakMap<Plan, string>();
function planText(plan: Plan): string {
  let t = textOf.get(plan);
  if (t === undefined) {
    t = JSON.stringify(planToJson(plan));
    textOf.set(plan, t);
  }
  return t;
}

/** The plan's text without its measurements (kept per plan, like planText). */
const restTextOf = new WeakMap<Plan, string>();
function planTextWithoutMeasurements(plan: Plan): string {
  let t = restTextOf.get(plan);
  if (t === undefined) {
    const rest = { ...plan };
    delete rest.measurements;
    t = JSON.stringify(planToJson(rest));
    restTextOf.set(plan, t);
  }
  return t;
}

/**
 * Same content: the same object, or objects that would save to the same file. Plans that share
 * one measurement list (every edit but a measurement's own) compare without it: measurements hold
 * thousands of numbers, and writing them out on every drag frame cost the frame several ms.
 */
export function samePlan(a: Plan | null, b: Plan | null): boolean {
  if (a === b) return true;
  if (a === null || b === null) return false;
  if (a.measurements !== undefined && a.measurements === b.measurements) return planTextWithoutMeasurements(a) === planTextWithoutMeasurements(b);
  return planText(a) === planText(b);
}

const HISTORY_MAX = 300;
/** Edits with the same coalescing key closer than this become one undo step (keyboard nudges, wheel). */
const COALESCE_MS = 900;
/**
 * During a drag the editors' numbers follow at this interval rather than every frame: the plots
 * follow every frame, and re-laying out the side panel 60 times a second cost the drag about
 * 3 ms a frame (measured with `npm run bench:ui`).
 */
const SHOWN_INTERVAL_MS = 90;

export class DocumentState {
  #plan = $state.raw<Plan>(freshPlan());
  #path = $state<string | null>(null);
  #saved = $state.raw<Plan | null>(null);
  #undo = $state.raw<Plan[]>([]);
  #redo = $state.raw<Plan[]>([]);
  /** The plan when the current gesture (a drag) began; null outside a gesture. */
  #gestureStart: Plan | null = null;
  #dragging = $state(false);
  #coalesce: { key: string; at: number } | null = null;
  /** Bumped on every change, for autosave's idle timer. */
  #revision = $state(0);
  /** Bumped when another document is loaded (open, new, revert, recovery): editors reset their typing. */
  #generation = $state(0);
  /** The plan the side panel shows: the plan, except mid-drag where it trails by up to SHOWN_INTERVAL_MS. */
  #shown = $state.raw<Plan>(this.#plan);
  #shownTimer: ReturnType<typeof setTimeout> | null = null;

  get plan(): Plan {
    return this.#plan;
  }
  /** For the editors' displays (see SHOWN_INTERVAL_MS); edits always apply to `plan`. */
  get shownPlan(): Plan {
    return this.#shown;
  }
  get path(): string | null {
    return this.#path;
  }
  /** Unsaved: the plan differs from the saved one in content (an edit undone or typed back is not a change). */
  get dirty(): boolean {
    return !samePlan(this.#plan, this.#saved);
  }
  get canUndo(): boolean {
    return this.#undo.length > 0 || this.#gestureStart !== null;
  }
  get canRedo(): boolean {
    return this.#redo.length > 0;
  }
  get dragging(): boolean {
    return this.#dragging;
  }
  get revision(): number {
    return this.#revision;
  }
  get generation(): number {
    return this.#generation;
  }
  get title(): string {
    return this.#plan.name || 'Untitled plan';
  }
  get fileName(): string | null {
    return this.#path ? (this.#path.split(/[\\/]/).pop() ?? this.#path) : null;
  }

  /** Replaces the document (open, new, revert, recovery) and clears the history. */
  load(plan: Plan, path: string | null, opts: { dirty?: boolean } = {}): void {
    this.#endGestureSilently();
    this.#set(plan);
    this.#path = path;
    this.#saved = opts.dirty ? null : plan;
    this.#undo = [];
    this.#redo = [];
    this.#coalesce = null;
    this.#revision++;
    this.#generation++;
  }

  /** Records `plan` (by default the current one) as saved at `path`. */
  markSaved(path: string, plan: Plan = this.#plan): void {
    this.#path = path;
    this.#saved = plan;
  }

  /**
   * Applies a checked edit. Returns the refusal (for the caller to word), or null when applied. Inside a gesture
   * the plan changes but the history waits for `endGesture`.
   */
  apply(result: EditResult, opts: { coalesce?: string } = {}): Diagnostic | null {
    if (!result.ok) return result.diagnostic;
    // An edit that changes nothing (a value typed again, a handle clicked without a move) is no step.
    if (samePlan(result.plan, this.#plan)) return null;
    if (this.#gestureStart === null) {
      const now = Date.now();
      const merge = opts.coalesce !== undefined && this.#coalesce?.key === opts.coalesce && now - this.#coalesce.at < COALESCE_MS;
      if (!merge) this.#push(this.#plan);
      this.#coalesce = opts.coalesce !== undefined ? { key: opts.coalesce, at: now } : null;
      this.#redo = [];
    }
    this.#set(result.plan);
    this.#revision++;
    return null;
  }

  #set(plan: Plan): void {
    this.#plan = plan;
    if (this.#gestureStart === null) {
      this.#shown = plan;
      return;
    }
    this.#shownTimer ??= setTimeout(() => {
      this.#shownTimer = null;
      this.#shown = this.#plan;
    }, SHOWN_INTERVAL_MS);
  }

  beginGesture(): void {
    if (this.#gestureStart !== null) return;
    this.#gestureStart = this.#plan;
    this.#dragging = true;
  }

  /** Ends a gesture: one undo step for the whole drag (none if nothing changed). */
  endGesture(): void {
    const start = this.#gestureStart;
    if (start === null) return;
    this.#gestureStart = null;
    this.#dragging = false;
    this.#coalesce = null;
    if (samePlan(start, this.#plan)) {
      // A click on a handle without a move: no undo step, and the very plan of before (so an
      // identity check against the saved plan still holds).
      this.#plan = start;
    } else {
      this.#push(start);
      this.#redo = [];
    }
    this.#shown = this.#plan;
  }

  #endGestureSilently(): void {
    this.#gestureStart = null;
    this.#dragging = false;
  }

  #push(plan: Plan): void {
    const u = this.#undo.length >= HISTORY_MAX ? this.#undo.slice(1) : this.#undo.slice();
    u.push(plan);
    this.#undo = u;
  }

  undo(): boolean {
    this.endGesture();
    if (this.#undo.length === 0) return false;
    const prev = this.#undo[this.#undo.length - 1];
    this.#undo = this.#undo.slice(0, -1);
    this.#redo = [...this.#redo, this.#plan];
    this.#set(prev);
    this.#coalesce = null;
    this.#revision++;
    return true;
  }

  redo(): boolean {
    this.endGesture();
    if (this.#redo.length === 0) return false;
    const next = this.#redo[this.#redo.length - 1];
    this.#redo = this.#redo.slice(0, -1);
    this.#push(this.#plan);
    this.#set(next);
    this.#coalesce = null;
    this.#revision++;
    return true;
  }
}

export const documentState = new DocumentState();
