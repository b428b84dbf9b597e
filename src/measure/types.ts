/**
 * A measured response as the importers give it and the plan keeps it: magnitude (and phase, when
 * the source has it) at strictly increasing frequencies. Phase is stored relative to `delayMs`
 * (the excess-phase form): the full phase is phaseDeg - 360 f delayMs / 1000.
 */
export interface MeasuredResponse {
  /** Shown in the legend; by default the file name without its extension. */
  name: string;
  /** Hz, strictly increasing, all > 0. */
  frequencyHz: number[];
  /** dB (20 log10 |H|), one per frequency. */
  magnitudeDb: number[];
  /** Degrees, unwrapped, relative to `delayMs`; null for a magnitude-only measurement. */
  phaseDeg: number[] | null;
  /** True when `phaseDeg` is a minimum-phase estimate from the magnitude, not measured. */
  phaseEstimated: boolean;
  /** ms: the arrival time removed from the phase (0 when the source gives none). */
  delayMs: number;
  /** The first few comment or header lines of the source, kept as notes. */
  notes: string[];
}
