/**
 * Closing a window with unsaved changes, as explicit state. Plain code (no Electron), so each
 * transition has its own test.
 *
 *   close requested, clean or confirmed   -> the window closes
 *   close requested, dirty                -> ask (Save / Don't Save / Cancel), unless already asking
 *   answer Save                           -> wait for the renderer's save (until the deadline)
 *   answer Don't Save                     -> confirmed: the window closes
 *   answer Cancel                         -> stay open; a quit in progress stops
 *   save finished while waiting, saved    -> confirmed: the window closes (and a quit goes on)
 *   save finished while waiting, failed   -> stay open; a quit in progress stops
 *   save finished, not waiting            -> nothing (an ordinary save)
 *
 * The renderer holds the plan, so main cannot save it itself: it asks the renderer to save and
 * waits for the save to come back. A save that has not come back after `SAVE_TO_CLOSE_MS` no
 * longer closes the window (the user may have gone on working in a save dialog left open).
 */

export const SAVE_TO_CLOSE_MS = 10 * 60 * 1000;

export type PromptAnswer = 'save' | 'discard' | 'cancel';

/** What the caller does next. */
export type CloseStep = 'close' | 'prompt' | 'wait' | 'request-save' | 'stay' | 'stop-quit' | 'none';

export class CloseFlow {
  #prompting = false;
  /** While the close prompt's Save is pending: the time after which a save no longer closes. */
  #saveToCloseUntil = 0;
  #confirmed = false;

  /** The window asked to close (`dirty`: it holds unsaved changes). */
  request(dirty: boolean): CloseStep {
    if (!dirty || this.#confirmed) return 'close';
    return this.#prompting ? 'wait' : 'prompt';
  }

  /** The close prompt is shown (until `answered`). */
  promptShown(): void {
    this.#prompting = true;
  }

  /** The prompt closed without an answer (the dialog failed). */
  promptFailed(): void {
    this.#prompting = false;
  }

  answered(answer: PromptAnswer, now: number): CloseStep {
    this.#prompting = false;
    if (answer === 'save') {
      this.#saveToCloseUntil = now + SAVE_TO_CLOSE_MS;
      return 'request-save';
    }
    if (answer === 'discard') {
      this.#confirmed = true;
      return 'close';
    }
    return 'stop-quit';
  }

  /** A save of this window finished (`saved`: written; false: failed or cancelled). */
  saveFinished(saved: boolean, now: number): CloseStep {
    const wanted = this.#saveToCloseUntil > now;
    this.#saveToCloseUntil = 0;
    if (!wanted) return 'none';
    if (!saved) return 'stop-quit';
    this.#confirmed = true;
    return 'close';
  }

  get prompting(): boolean {
    return this.#prompting;
  }

  get confirmed(): boolean {
    return this.#confirmed;
  }

  /** True while a save asked for by the close prompt is pending. */
  awaitingSave(now: number): boolean {
    return this.#saveToCloseUntil > now;
  }
}
