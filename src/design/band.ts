/**
 * A band's sections by its design method: the cookbook's bilinear designs (cookbook.ts) or the
 * matched ones (matched.ts). A band's own `design` wins over the plan's default; types without a
 * matched design stay bilinear under a plan-wide "matched" default (the reader refuses an
 * explicit "matched" on them).
 */
import type { Band, DesignMethod } from '../plan/types';
import { designBand } from './cookbook';
import { designMatched, hasMatchedDesign } from './matched';
import type { Section } from './section';

/** The method a band is designed with, given the plan's default. */
export function bandDesignMethod(band: Band, defaultMethod: DesignMethod = 'bilinear'): DesignMethod {
  const m = band.design ?? defaultMethod;
  return m === 'matched' && hasMatchedDesign(band.type) ? 'matched' : 'bilinear';
}

/** The section(s) of one band at a sample rate, by its design method. */
export function designBandBy(band: Band, sampleRateHz: number, defaultMethod: DesignMethod = 'bilinear'): Section[] {
  return bandDesignMethod(band, defaultMethod) === 'matched' ? [designMatched(band, sampleRateHz)] : designBand(band, sampleRateHz);
}
