/**
 * Headroom: the largest gain of a chain for a full-scale sine, over 0 Hz .. Nyquist, and where it
 * occurs (docs/references.md, "Headroom and the worst-case peak"). A positive value is boost that
 * a full-scale input turns into clipping. The search (peak-search.ts) looks near every pole and
 * every named band frequency, so a narrow peak is found whatever the grid.
 */
import type { Section } from '../design/section';
import { outsideAudioBand, peakSearch, type Peak } from './peak-search';

export interface Headroom extends Peak {
  /** True when the peak lies outside 20 Hz .. 20 kHz (at DC, near Nyquist): reported so, not hidden. */
  outsideAudioBand: boolean;
}

/** The largest gain of `sections` times |gain| over 0 Hz .. Nyquist; `hintsHz` are band and edge frequencies. */
export function headroom(sections: readonly Section[], gain: number, sampleRateHz: number, hintsHz: readonly number[] = []): Headroom {
  const p = peakSearch(sections, gain, sampleRateHz, hintsHz);
  return { ...p, outsideAudioBand: outsideAudioBand(p.frequencyHz) };
}
