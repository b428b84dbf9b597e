/**
 * Overflow inside a cascade, and a suggested section order and scaling.
 *
 * A fixed-point board clips wherever a signal passes full scale, not only at the output: what
 * matters is the peak gain of every partial cascade H1, H1 H2, ..., H1..HN over the audio band
 * (0 Hz .. Nyquist, measured by `headroom`, the same search as the plan check), for a full-scale sine at the input.
 *
 * The suggestion follows two published rules:
 * - Ordering: sections by increasing pole radius, so the poles nearest the unit circle (the most
 *   peaked sections) come last. This is the order scipy.signal.zpk2sos produces (its notes: pairs
 *   are formed starting from the poles closest to the unit circle, which end up at the end of the
 *   cascade), and the ordering L. B. Jackson pairs with L-infinity scaling ("Digital Filters and
 *   Signal Processing", chapter on quantization effects; from memory). Sections keep their own
 *   zeros: each band or crossover section is already a pole-zero pair, so nothing is re-paired.
 *   Ties keep the signal order.
 * - Scaling: L-infinity (peak) norm scaling (Jackson, same chapter): the cumulative scale before
 *   the node after section k is S_k = 1 / max(1, peak|H1..Hk|), applied as the factor
 *   s_k = S_k / S_(k-1) on section k's b0 b1 b2. Limited to attenuation (S_k <= 1): every internal
 *   peak ends at or below 0 dBFS and nothing is raised above its designed level. The cascade's
 *   output is then S_N times the designed response; `levelChangeDb` says by how much, to be made
 *   up after the board's last stage if it has the headroom.
 * A separate output gain is taken to act after the cascade (the plan's signal order).
 */
import { HEADROOM_WARN_DB } from '../analysis/thresholds';
import { prefixPeakSearch } from '../analysis/peak-search';
import { poleRadius } from '../analysis/poles';
import { scaleNumerator, type Section } from '../design/section';

export interface PartialPeak {
  /** Sections 1..`through` (1-based). */
  through: number;
  peakDb: number;
  frequencyHz: number;
}

/** The peak gain after section 1, 1..2, ..., 1..N (each over 0 Hz .. Nyquist). */
export function partialCascadePeaks(sections: readonly Section[], sampleRateHz: number): PartialPeak[] {
  return prefixPeakSearch(sections, sampleRateHz).map((p, k) => ({ through: k + 1, peakDb: p.peakDb, frequencyHz: p.frequencyHz }));
}

export const SCALING_METHOD =
  'sections ordered by increasing pole radius (poles nearest the unit circle last), then L-infinity (peak) norm scaling limited to attenuation (L. B. Jackson, "Digital Filters and Signal Processing"; the same ordering as scipy.signal.zpk2sos)';

export interface ScalingSuggestion {
  method: string;
  /** 0-based indexes into the given sections, in the suggested order. */
  order: number[];
  /** The factor on each suggested section's b0 b1 b2, in the suggested order. */
  scales: number[];
  /** The suggested sections (reordered and scaled). */
  sections: Section[];
  /** Peaks of the reordered cascade before scaling, and after (each <= 0 dB up to rounding). */
  peaksUnscaled: PartialPeak[];
  peaks: PartialPeak[];
  /** 20 log10 S_N: the level of the cascade's output relative to the design (<= 0). */
  levelChangeDb: number;
  /** True when the given order and scale already keep every internal peak at or below 0 dBFS. */
  alreadySafe: boolean;
}

/**
 * Internal peaks above this count as overflow: the plan check's own threshold for boost
 * (HEADROOM_WARN_DB, 0.01 dB), so a Butterworth-ish Q typed as 0.7071 (a +4e-6 dB rise) is not
 * reported as overflow. The suggested scaling itself attenuates any peak above 0 dB exactly.
 */
export const OVERFLOW_TOLERANCE_DB = HEADROOM_WARN_DB;
/** Peaks up to this are float rounding of 0 dB (the search reaches 1e-11 dB at 0 Hz for plain cuts). */
const ROUNDING_DB = 1e-9;

export function suggestOrderAndScaling(sections: readonly Section[], sampleRateHz: number, current?: PartialPeak[]): ScalingSuggestion {
  const radii = sections.map(poleRadius);
  const order = sections.map((_, i) => i).sort((a, b) => radii[a] - radii[b] || a - b);
  const reordered = order.map((i) => sections[i]);
  const peaksUnscaled = partialCascadePeaks(reordered, sampleRateHz);
  const scales: number[] = [];
  const peaks: PartialPeak[] = [];
  let previous = 1;
  for (const p of peaksUnscaled) {
    // A peak within rounding of 0 dB (a cut's +1e-11 dB at 0 Hz) is 0 dB: no scaling for it.
    const s = p.peakDb <= ROUNDING_DB ? 1 : 1 / Math.pow(10, p.peakDb / 20);
    scales.push(s / previous);
    // The scaled partial cascade is the unscaled one times S_k at every frequency: same peak
    // frequency, peak lower by 20 log10 S_k (no second search needed).
    peaks.push({ ...p, peakDb: p.peakDb + 20 * Math.log10(s) });
    previous = s;
  }
  const scaled = reordered.map((s, k) => scaleNumerator(s, scales[k]));
  const unchangedOrder = order.every((i, k) => i === k);
  const given = current ?? (unchangedOrder ? peaksUnscaled : partialCascadePeaks(sections, sampleRateHz));
  return {
    method: SCALING_METHOD,
    order,
    scales,
    sections: scaled,
    peaksUnscaled,
    peaks,
    levelChangeDb: 20 * Math.log10(previous),
    alreadySafe: given.every((p) => p.peakDb <= OVERFLOW_TOLERANCE_DB),
  };
}
