/**
 * The measurement side of the app that is not saved in the plan: how measurements are shown
 * (smoothing, full or excess phase) and the open import, whose source file stays in memory while
 * its panel is open so a WAV file's channel and gate can be changed and its spectrum taken again
 * from the kept samples. Closing the panel lets the file go: the plan keeps the log-grid spectrum.
 */
import type { Gate, GateWindow } from '$core/measure/gate';
import type { Smoothing } from '$core/measure/smooth';
import type { MeasuredResponse } from '$core/measure/types';
import type { WavInfo } from '$core/measure/wav';

/** How a measurement's phase is drawn: as measured (its arrival delay in it) or with the delay removed (excess phase). */
export type MeasuredPhase = 'full' | 'excess';

/** A WAV impulse response being imported: its header, the chosen channel's samples and the gate. */
export interface WavSource {
  info: WavInfo;
  /** The data chunk, to decode another channel from. */
  data: Uint8Array;
  /** 0-based. */
  channel: number;
  samples: Float64Array;
  gate: Required<Pick<Gate, 'startMs' | 'lengthMs'>>;
  /** The gate in samples around the detected peak, as the spectrum used it. */
  window: GateWindow;
}

export interface ImportSession {
  fileName: string;
  kind: 'wav' | 'text';
  /** The measurement in the plan this panel edits. */
  measurementId: string;
  /** A text file as read (the source for a minimum-phase version). */
  text: MeasuredResponse | null;
  wav: WavSource | null;
  minPhase: boolean;
  /** The last refusal of a change in the panel (a bad gate), or null. */
  problem: string | null;
}

/** A file that could not be imported: its name and the reason (with its line or field). */
export interface ImportFailure {
  fileName: string;
  message: string;
}

export class MeasurementState {
  #smoothing = $state.raw<Smoothing>({ kind: 'none' });
  #phase = $state<MeasuredPhase>('full');
  #session = $state.raw<ImportSession | null>(null);
  #failure = $state.raw<ImportFailure | null>(null);

  /** Smoothing of what is drawn (the plan's data never changes). */
  get smoothing(): Smoothing {
    return this.#smoothing;
  }
  set smoothing(s: Smoothing) {
    this.#smoothing = s;
  }

  get phase(): MeasuredPhase {
    return this.#phase;
  }
  set phase(p: MeasuredPhase) {
    this.#phase = p;
  }

  get session(): ImportSession | null {
    return this.#session;
  }
  set session(s: ImportSession | null) {
    this.#session = s;
    if (s) this.#failure = null;
  }

  get failure(): ImportFailure | null {
    return this.#failure;
  }
  set failure(f: ImportFailure | null) {
    this.#failure = f;
    if (f) this.#session = null;
  }

  /** Closes the panel (and forgets the file). */
  close(): void {
    this.#session = null;
    this.#failure = null;
  }
}

export const measurementState = new MeasurementState();
