/**
 * "Save, then close": the close prompt's Save button asks the page to save, and the window closes
 * once that save succeeds.
 *
 * Plain Node. The request is armed when the prompt sends `save` and is used by the next save call
 * from that window, whatever its outcome: a save that is refused, cancelled or fails disarms it,
 * so a later ordinary save never closes the window by surprise. The page answers the command at
 * once (the save dialog, if any, is shown during the call), so a request that no call takes up
 * within `ARM_MS` lapses too (the page may refuse before calling, for example when a field holds
 * text that is not a valid value).
 */
export const ARM_MS = 15_000;

export class CloseAfterSave {
  #until = 0;

  constructor(private readonly now: () => number = Date.now) {}

  /** The close prompt's Save was chosen. */
  arm(): void {
    this.#until = this.now() + ARM_MS;
  }

  /** A save call starts: whether it was asked for by the close prompt. Always disarms. */
  take(): boolean {
    const wanted = this.#until > this.now();
    this.#until = 0;
    return wanted;
  }

  get armed(): boolean {
    return this.#until > this.now();
  }
}
