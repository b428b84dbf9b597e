/**
 * Closing a window with unsaved changes, as explicit state. Plain code (no Electron), so each
 * transition has its own test.
 *
 *   close requested, clean or confirmed   -> the window closes
 *   close requested, dirty                -> ask (Save / Don't Save / Cancel), unless already asking
 *   answer Save                           -> ask the renderer to save (the request lapses
 *                                            after SAVE_TO_CLOSE_MS if no save call takes it)
 *   answer Don't Save                     -> confirmed: the window closes
 *   answer Cancel                         -> stay open; a quit in progress stops
 *   a save call starts                    -> it takes the request (`takeSave`): only that call
 *                                            answers it, whatever its outcome
 *   that save finished, saved             -> confirmed: the window closes (and a quit goes on)
 *   that save refused, cancelled, failed  -> stay open; a quit in progress stops; the request
 *                                            is gone, so a later ordinary save never closes
 *   a save call that did not take it      -> nothing (an ordinary save)
 *
 * The renderer holds the plan, so main cannot save it itself: it asks the renderer to save. The
 * page answers the command at once (a save dialog, if any, is shown during the call), so a
 * request that no save call takes up within `SAVE_TO_CLOSE_MS` lapses too (the page may refuse
 * before calling, for example when a field holds text that is not a valid value).
 */

export const SAVE_TO_CLOSE_MS = 15_000;

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

  /** A save call of this window starts: whether it answers the close prompt. Always disarms. */
  takeSave(now: number): boolean {
    const wanted = this.#saveToCloseUntil > now;
    this.#saveToCloseUntil = 0;
    return wanted;
  }

  /** A save call finished (`wanted`: it took the close prompt's request; `saved`: written). */
  saveFinished(wanted: boolean, saved: boolean): CloseStep {
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
