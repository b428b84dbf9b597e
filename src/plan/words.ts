/**
 * The words for band types and edges, spelled out (trade terms), for every place that names them
 * in prose: the app's lists and tooltips, export comments, the plan sheet. The plan file keeps its
 * own identifiers (`lowShelf`, `highPass1`); these are what people read.
 */
import type { BandType, EdgeKind } from './types';

export const BAND_TYPE_WORDS: Record<BandType, string> = {
  peaking: 'peaking',
  lowShelf: 'low shelf',
  highShelf: 'high shelf',
  lowPass: 'low-pass, 2nd order',
  highPass: 'high-pass, 2nd order',
  bandPass: 'band-pass',
  notch: 'notch',
  allPass: 'all-pass, 2nd order',
  lowPass1: 'low-pass, 1st order',
  highPass1: 'high-pass, 1st order',
  allPass1: 'all-pass, 1st order',
  raw: 'raw coefficients',
};

export const EDGE_WORDS: Record<EdgeKind, string> = {
  highPass: 'high-pass edge',
  lowPass: 'low-pass edge',
};

/** "Low shelf" from "low shelf": the same words at the start of a label. */
export function capitalized(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
