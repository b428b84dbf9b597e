/** Display names for plan values (trade terms; the plan file keeps its own identifiers). */
import { BAND_TYPES, type BandType, type BesselNormalization, type CrossoverFamily } from '$core/plan/types';
import { BAND_TYPE_WORDS, capitalized } from '$core/plan/words';

/** The band types spelled out (src/plan/words.ts), as a label starts. */
export const BAND_TYPE_LABEL = Object.fromEntries(BAND_TYPES.map((t) => [t, capitalized(BAND_TYPE_WORDS[t])])) as Record<BandType, string>;

export const FAMILY_LABEL: Record<CrossoverFamily, string> = {
  butterworth: 'Butterworth',
  'linkwitz-riley': 'Linkwitz-Riley',
  bessel: 'Bessel',
};

export const NORMALIZATION_LABEL: Record<BesselNormalization, string> = {
  phase: 'phase (Butterworth asymptote)',
  delay: 'delay (1/(2\u03c0f) s at DC)',
  magnitude: 'magnitude (\u22123 dB at f)',
};
