/**
 * The quantized truth of an export: the response the board computes from the exact integers (or
 * rounded decimals), beside the ideal one, and the report the app and the command line show.
 *
 * Every quantized coefficient is integer / 2^n / scale with the sign undone: a double holding the
 * board's value exactly (|integer| < 2^33), so evaluating the response in double precision sees the
 * board's own numbers, not a second rounding of them.
 */
import { parseQFormat, qName } from './fixed';
import { cascadeWithGainDelay, type Response } from '../response/chain-response';
import { normalizedOmega } from '../response/kernel';
import type { BoardProfile } from '../plan/types';
import { idealSections, quantizedSections, type ExportList, type ExportOutput } from './list';
import { partialCascadePeaks, suggestOrderAndScaling, OVERFLOW_TOLERANCE_DB, type PartialPeak, type ScalingSuggestion } from './overflow';
import { copyProfile, DEFAULT_PROFILE } from './profiles';

export interface OutputComparison {
  id: string;
  ideal: Response;
  quantized: Response;
  /** quantized - ideal, dB, per frequency. */
  differenceDb: Float64Array;
  /** Largest |difference| over the given frequencies. */
  largestDifferenceDb: number;
}

/** The ideal and quantized responses of one exported output (gain and delay included, delay in whole samples). */
export function compareOutput(o: ExportOutput, frequenciesHz: ArrayLike<number>, sampleRateHz: number): OutputComparison {
  const omega = normalizedOmega(frequenciesHz, sampleRateHz);
  const idealGain = o.gain.written ? o.gain.ideal : 1;
  const ideal = cascadeWithGainDelay(idealSections(o), idealGain, o.delay.samples, omega, sampleRateHz);
  const quantized = cascadeWithGainDelay(quantizedSections(o), o.gain.quantized, o.delay.samples, omega, sampleRateHz);
  const differenceDb = new Float64Array(omega.length);
  let largest = 0;
  for (let i = 0; i < omega.length; i++) {
    const d = quantized.magnitudeDb[i] - ideal.magnitudeDb[i];
    differenceDb[i] = Number.isFinite(d) ? d : NaN;
    if (Number.isFinite(d)) largest = Math.max(largest, Math.abs(d));
  }
  return { id: o.id, ideal, quantized, differenceDb, largestDifferenceDb: largest };
}

export interface OutputOverflow {
  id: string;
  /** Partial cascade peaks of the quantized sections in the exported order. */
  peaks: PartialPeak[];
  /** Peak after the separate gain (the whole output), when the gain is separate. */
  outputPeakDb: number;
  overflows: boolean;
  suggestion: ScalingSuggestion;
}

export function outputOverflow(o: ExportOutput, sampleRateHz: number): OutputOverflow {
  const sections = quantizedSections(o);
  const peaks = partialCascadePeaks(sections, sampleRateHz);
  const last = peaks.length > 0 ? peaks[peaks.length - 1].peakDb : 0;
  return {
    id: o.id,
    peaks,
    outputPeakDb: last + 20 * Math.log10(Math.abs(o.gain.quantized)),
    overflows: peaks.some((p) => p.peakDb > OVERFLOW_TOLERANCE_DB),
    suggestion: suggestOrderAndScaling(sections, sampleRateHz, peaks),
  };
}

/** Every output's overflow report. */
export function listOverflow(list: ExportList): OutputOverflow[] {
  return list.outputs.map((o) => outputOverflow(o, list.sampleRate));
}

/**
 * The profile behind `response --quantize Qm.n`: the file convention (b0 b1 b2 a1 a2 as computed,
 * no pre-scaling, gain kept exact and separate) with Qm.n numbers; null when `q` is malformed.
 */
export function quantizeProfile(q: string): BoardProfile | null {
  const f = parseQFormat(q);
  if (!f) return null;
  const p = copyProfile(DEFAULT_PROFILE);
  p.name = `${qName(f)} (response check)`;
  p.number = { kind: 'fixed', ...f, notation: 'decimal' };
  p.sectionBudget = 1024;
  return p;
}
