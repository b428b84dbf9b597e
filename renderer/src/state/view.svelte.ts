/**
 * What the user is looking at (not saved in the plan): the view, the selected chain and band,
 * the frequency window, plot options, solo, and the one-line notice.
 */
import type { Plan } from '$core/plan/types';
import { INPUT, type ChainRef } from '$core/ui/edits';

export type ViewName = 'response' | 'zplane' | 'time' | 'export';
export type PhaseMode = 'wrapped' | 'unwrapped';

export const DEFAULT_RANGE: readonly [number, number] = [20, 20000];
/** Lowest frequency the plots zoom out to. */
export const RANGE_FLOOR_HZ = 2;

export interface Notice {
  kind: 'info' | 'error';
  text: string;
}

export const MAGNITUDE_RANGES: readonly { label: string; range: [number, number] }[] = [
  { label: '\u00b16 dB', range: [-6, 6] },
  { label: '\u00b112 dB', range: [-12, 12] },
  { label: '\u221230..+12 dB', range: [-30, 12] },
  { label: '\u221248..+12 dB', range: [-48, 12] },
  { label: '\u221296..+12 dB', range: [-96, 12] },
];

export class ViewState {
  #view = $state<ViewName>('response');
  #chain = $state<ChainRef>('');
  #bandId = $state<string | null>(null);
  #phaseMode = $state<PhaseMode>('wrapped');
  #showBandCurves = $state(false);
  #range = $state.raw<[number, number] | null>(null);
  #magRange = $state.raw<[number, number]>([-30, 12]);
  #solo = $state.raw<readonly string[]>([]);
  #notice = $state.raw<Notice | null>(null);
  /** The plan sheet is laid out only while the page prints (it costs a response and an analysis). */
  #printing = $state(false);
  #noticeTimer: ReturnType<typeof setTimeout> | null = null;

  get view(): ViewName {
    return this.#view;
  }
  set view(v: ViewName) {
    this.#view = v;
  }
  get phaseMode(): PhaseMode {
    return this.#phaseMode;
  }
  set phaseMode(m: PhaseMode) {
    this.#phaseMode = m;
  }
  get showBandCurves(): boolean {
    return this.#showBandCurves;
  }
  set showBandCurves(v: boolean) {
    this.#showBandCurves = v;
  }
  get magRange(): [number, number] {
    return this.#magRange;
  }
  set magRange(r: [number, number]) {
    this.#magRange = r;
  }
  get solo(): readonly string[] {
    return this.#solo;
  }
  get notice(): Notice | null {
    return this.#notice;
  }
  get printing(): boolean {
    return this.#printing;
  }
  set printing(v: boolean) {
    this.#printing = v;
  }

  /** The selected chain if it exists in `plan`, else the first output. */
  chainIn(plan: Plan): ChainRef {
    const c = this.#chain;
    if (c === INPUT || plan.outputs.some((o) => o.id === c)) return c;
    return plan.outputs[0].id;
  }

  /** The selected band if it exists in the selected chain of `plan`. */
  bandIn(plan: Plan): string | null {
    const chain = this.chainIn(plan);
    const bands = chain === INPUT ? plan.input.bands : (plan.outputs.find((o) => o.id === chain)?.bands ?? []);
    return bands.some((b) => b.id === this.#bandId) ? this.#bandId : null;
  }

  select(chain: ChainRef, bandId: string | null = null): void {
    this.#chain = chain;
    this.#bandId = bandId;
  }

  selectBand(bandId: string | null): void {
    this.#bandId = bandId;
  }

  /** The frequency window, clipped to the plan's Nyquist. */
  rangeFor(sampleRate: number): [number, number] {
    const nyq = sampleRate / 2;
    const r = this.#range ?? DEFAULT_RANGE;
    const hi = Math.min(r[1], nyq);
    const lo = Math.min(Math.max(r[0], RANGE_FLOOR_HZ), hi / 1.5);
    return [lo, hi];
  }

  setRange(lo: number, hi: number, sampleRate: number): void {
    const nyq = sampleRate / 2;
    let a = Math.max(RANGE_FLOOR_HZ, lo);
    let b = Math.min(nyq, hi);
    // At least a third of an octave wide.
    if (b / a < 1.26) {
      const mid = Math.sqrt(a * b);
      a = mid / 1.122;
      b = mid * 1.122;
    }
    this.#range = [a, b];
  }

  resetRange(): void {
    this.#range = null;
  }

  get zoomed(): boolean {
    return this.#range !== null;
  }

  toggleSolo(outputId: string): void {
    this.#solo = this.#solo.includes(outputId) ? this.#solo.filter((s) => s !== outputId) : [...this.#solo, outputId];
  }

  /** Solo ids that still exist in the plan. */
  soloIn(plan: Plan): readonly string[] {
    return this.#solo.filter((s) => plan.outputs.some((o) => o.id === s));
  }

  notify(kind: Notice['kind'], text: string, ms = kind === 'error' ? 9000 : 3500): void {
    this.#notice = { kind, text };
    if (this.#noticeTimer) clearTimeout(this.#noticeTimer);
    this.#noticeTimer = setTimeout(() => (this.#notice = null), ms);
  }

  clearNotice(): void {
    this.#notice = null;
  }
}

export const viewState = new ViewState();
