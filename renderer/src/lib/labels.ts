/** Display names for plan values (trade terms; the plan file keeps its own identifiers). */
import type { BandType, BesselNormalization, CrossoverFamily } from '../../../src/plan/types';

export const BAND_TYPE_LABEL: Record<BandType, string> = {
  peaking: 'Peaking',
  lowShelf: 'Low shelf',
  highShelf: 'High shelf',
  lowPass: 'Low-pass, 2nd order',
  highPass: 'High-pass, 2nd order',
  bandPass: 'Band-pass',
  notch: 'Notch',
  allPass: 'All-pass, 2nd order',
  lowPass1: 'Low-pass, 1st order',
  highPass1: 'High-pass, 1st order',
  allPass1: 'All-pass, 1st order',
  raw: 'Raw coefficients',
};

/** Short forms for the band list. */
export const BAND_TYPE_SHORT: Record<BandType, string> = {
  peaking: 'PK',
  lowShelf: 'LS',
  highShelf: 'HS',
  lowPass: 'LP2',
  highPass: 'HP2',
  bandPass: 'BP',
  notch: 'N',
  allPass: 'AP2',
  lowPass1: 'LP1',
  highPass1: 'HP1',
  allPass1: 'AP1',
  raw: 'RAW',
};

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
