/**
 * When unsaved work is stored for crash recovery: after a short pause in editing, and at the latest
 * a fixed time after the first change not yet stored, so that continuous editing (a long drag,
 * steady typing, nudging with the keyboard) is stored too. Plain TypeScript, tested with fake timers.
 */

/** Quiet time after the last change before it is stored. */
export const AUTOSAVE_IDLE_MS = 3000;
/** Longest time a change waits to be stored, however busy the editing. */
export const AUTOSAVE_MAX_MS = 30_000;

export interface Clock {
  setTimeout(fn: () => void, ms: number): unknown;
  clearTimeout(handle: unknown): void;
  now(): number;
}

const realClock: Clock = {
  setTimeout: (fn, ms) => setTimeout(fn, ms),
  clearTimeout: (h) => clearTimeout(h as ReturnType<typeof setTimeout>),
  now: () => Date.now(),
};

export class AutosaveScheduler {
  #timer: unknown = null;
  /** When the oldest change not yet stored must be stored; null when all are stored. */
  #deadline: number | null = null;

  constructor(
    private readonly store: () => void,
    private readonly idleMs = AUTOSAVE_IDLE_MS,
    private readonly maxMs = AUTOSAVE_MAX_MS,
    private readonly clock: Clock = realClock,
  ) {}

  /** The document changed (and is unsaved). */
  changed(): void {
    const now = this.clock.now();
    this.#deadline ??= now + this.maxMs;
    this.#cancelTimer();
    this.#timer = this.clock.setTimeout(() => this.#fire(), Math.max(0, Math.min(this.idleMs, this.#deadline - now)));
  }

  /** The document is clean again (saved, or undone to the saved plan): nothing to store. */
  clear(): void {
    this.#cancelTimer();
    this.#deadline = null;
  }

  get waiting(): boolean {
    return this.#deadline !== null;
  }

  #fire(): void {
    this.#timer = null;
    this.#deadline = null;
    this.store();
  }

  #cancelTimer(): void {
    if (this.#timer !== null) this.clock.clearTimeout(this.#timer);
    this.#timer = null;
  }
}
