/**
 * Text typed into a field but not yet applied to the plan.
 *
 * The editors apply typed text when it is confirmed: a number field on Enter or when it loses
 * focus, the names, the notes and the board profile's fields on their `change` event. Until then
 * the plan does not hold it, so a save would write the plan without it while saying "saved", and a
 * close or a reload would drop it. This module knows which field holds such text:
 *
 * - `active` is true while one does (the window then counts as having unsaved changes, so the
 *   close prompt and the browser's leave-page question appear);
 * - `commit()` applies it before a save, a close or a reload: a number field runs its own check
 *   (and a refusal comes back as text, so the save can be refused with the reason), any other
 *   field gets its `change` event.
 *
 * A field marked `data-pending="none"` (the exposure calculator, the import box) is not an edit of
 * the plan and is ignored. The browser fires `change` again when a committed field loses focus;
 * that repeat, with the value already applied, is stopped here so it does not become a second edit.
 */
interface NumberEntry {
  /** Applies the typed text; returns the refusal (`Gain: not a gain`) or null. */
  apply: () => string | null;
}

function isTextField(t: EventTarget | null): t is HTMLInputElement | HTMLTextAreaElement {
  if (t instanceof HTMLTextAreaElement) return t.dataset.pending !== 'none' && !t.readOnly;
  return t instanceof HTMLInputElement && (t.type === 'text' || t.type === 'search' || t.type === '') && t.dataset.pending !== 'none' && !t.readOnly;
}

export class PendingEdits {
  /** The text field (not a number field) typed into since its last `change`. */
  #field = $state.raw<HTMLInputElement | HTMLTextAreaElement | null>(null);
  /** Number fields holding typed text (they register themselves while editing). */
  #numbers = new Map<HTMLElement, NumberEntry>();
  #numberCount = $state(0);
  /** The value each field had at its last applied `change`, to stop the browser's repeat. */
  #applied = new WeakMap<HTMLElement, string>();
  /** The field whose `change` commit() is sending. */
  #committing: HTMLElement | null = null;

  get active(): boolean {
    return this.#field !== null || this.#numberCount > 0;
  }

  /** A number field starts holding typed text; the returned function ends that. */
  registerNumber(el: HTMLElement, apply: () => string | null): () => void {
    this.#numbers.set(el, { apply });
    this.#numberCount = this.#numbers.size;
    return () => {
      if (this.#numbers.get(el)?.apply === apply) this.#numbers.delete(el);
      this.#numberCount = this.#numbers.size;
    };
  }

  /** Listens on the window for typing and `change` events; returns the clean-up. */
  install(win: Window): () => void {
    const onInput = (e: Event): void => {
      const t = e.target;
      if (isTextField(t) && !this.#numbers.has(t) && t.dataset.editing === undefined) this.#field = t;
    };
    const onChange = (e: Event): void => {
      const t = e.target;
      if (!isTextField(t)) return;
      if (t !== this.#committing && t !== this.#field && this.#applied.get(t) === t.value) {
        // The browser's own change on blur, after commit() already applied this value.
        e.stopImmediatePropagation();
        return;
      }
      this.#applied.set(t, t.value);
      if (t === this.#field) this.#field = null;
    };
    win.addEventListener('input', onInput, true);
    win.addEventListener('change', onChange, true);
    return () => {
      win.removeEventListener('input', onInput, true);
      win.removeEventListener('change', onChange, true);
      this.#field = null;
    };
  }

  /**
   * Applies every pending edit. Returns null when all were applied, or the first refusal (the field
   * keeps its text and shows the reason).
   */
  commit(): string | null {
    let refusal: string | null = null;
    for (const entry of [...this.#numbers.values()]) {
      const r = entry.apply();
      refusal ??= r;
    }
    const field = this.#field;
    if (field) {
      this.#field = null;
      this.#committing = field;
      try {
        field.dispatchEvent(new Event('change', { bubbles: true }));
      } finally {
        this.#committing = null;
      }
    }
    return refusal;
  }
}

export const pendingEdits = new PendingEdits();
