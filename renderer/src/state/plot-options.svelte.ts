/**
 * What the user chose to see on the plots (not saved in the plan): curves hidden from the legend,
 * the snapshot drawn as ghosts, the two outputs whose phase difference is drawn, the group-delay
 * range, and the Z-plane and Time windows.
 */
import type { Plan } from '$core/plan/types';

export class PlotOptions {
  #hidden = $state.raw<ReadonlySet<string>>(new Set());
  #snapshot = $state.raw<{ plan: Plan; takenAt: Date } | null>(null);
  #phasePair = $state.raw<[string, string] | null>(null);
  #groupDelayFull = $state(false);
  #zplaneWindow = $state.raw<{ x: [number, number]; y: [number, number] } | null>(null);
  #timeWindow = $state.raw<[number, number] | null>(null);

  /** Curve ids (as in the legend) the user switched off. */
  get hidden(): ReadonlySet<string> {
    return this.#hidden;
  }
  isHidden(id: string): boolean {
    return this.#hidden.has(id);
  }
  toggle(id: string): void {
    const next = new Set(this.#hidden);
    if (!next.delete(id)) next.add(id);
    this.#hidden = next;
  }

  /** The plan as it was when the snapshot was taken; its curves are drawn as ghosts. */
  get snapshot(): { plan: Plan; takenAt: Date } | null {
    return this.#snapshot;
  }
  takeSnapshot(plan: Plan): void {
    this.#snapshot = { plan, takenAt: new Date() };
  }
  clearSnapshot(): void {
    this.#snapshot = null;
  }

  /** Output ids [a, b] whose phase difference (a minus b) is drawn, or null. */
  get phasePair(): [string, string] | null {
    return this.#phasePair;
  }
  set phasePair(p: [string, string] | null) {
    this.#phasePair = p;
  }
  /** The pair if both outputs still exist in `plan` and differ. */
  phasePairIn(plan: Plan): [string, string] | null {
    const p = this.#phasePair;
    if (!p || p[0] === p[1]) return null;
    return p.every((id) => plan.outputs.some((o) => o.id === id)) ? p : null;
  }

  get groupDelayFull(): boolean {
    return this.#groupDelayFull;
  }
  set groupDelayFull(v: boolean) {
    this.#groupDelayFull = v;
  }

  /** Z-plane window (real, imaginary); null follows the roots. */
  get zplaneWindow(): { x: [number, number]; y: [number, number] } | null {
    return this.#zplaneWindow;
  }
  set zplaneWindow(w: { x: [number, number]; y: [number, number] } | null) {
    this.#zplaneWindow = w;
  }

  /** Time window in ms; null shows the whole computed length. */
  get timeWindow(): [number, number] | null {
    return this.#timeWindow;
  }
  set timeWindow(w: [number, number] | null) {
    this.#timeWindow = w;
  }
}

export const plotOptions = new PlotOptions();
