/**
 * Headroom: the largest gain of a chain over the audio band (10 Hz .. min(20 kHz, 0.45 fs)) and
 * where it occurs. A positive value is boost that a full-scale input turns into clipping.
 *
 * Found on a dense log grid, then refined by golden-section search on log f around the best grid
 * point, so the figure does not depend on where the grid happened to fall.
 */
import { packSections, type Section } from '../design/section';
import { allocateKernelOutput, cascadeResponse } from '../response/kernel';
import { HEADROOM_LOW_HZ, audioBandTopHz } from './thresholds';

const GRID_POINTS = 1024;

export interface Headroom {
  /** Largest gain in dB (cascade and linear gain; delay and polarity do not change it). */
  peakDb: number;
  /** Where, in Hz. */
  frequencyHz: number;
}

export function headroomBand(sampleRateHz: number): [number, number] {
  return [HEADROOM_LOW_HZ, audioBandTopHz(sampleRateHz)];
}

/** The largest gain of `sections` times |gain| over the headroom band. */
export function headroom(sections: readonly Section[], gain: number, sampleRateHz: number): Headroom {
  const [lo, hi] = headroomBand(sampleRateHz);
  const packed = packSections(sections);
  const n = sections.length;
  const gainDb = 20 * Math.log10(Math.abs(gain));
  const grid = new Float64Array(GRID_POINTS);
  const lLo = Math.log(lo);
  const lStep = (Math.log(hi) - lLo) / (GRID_POINTS - 1);
  for (let i = 0; i < GRID_POINTS; i++) grid[i] = ((2 * Math.PI) / sampleRateHz) * Math.exp(lLo + i * lStep);
  const k = allocateKernelOutput(GRID_POINTS);
  cascadeResponse(packed, n, grid, k);
  let best = 0;
  for (let i = 1; i < GRID_POINTS; i++) if (k.magnitudeDb[i] > k.magnitudeDb[best]) best = i;

  const one = allocateKernelOutput(1);
  const w = new Float64Array(1);
  const at = (logF: number): number => {
    w[0] = ((2 * Math.PI) / sampleRateHz) * Math.exp(logF);
    cascadeResponse(packed, n, w, one);
    return one.magnitudeDb[0];
  };
  // Golden-section search for the maximum on [best - 1, best + 1] grid steps.
  let a = lLo + Math.max(0, best - 1) * lStep;
  let b = lLo + Math.min(GRID_POINTS - 1, best + 1) * lStep;
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = at(c);
  let fd = at(d);
  for (let i = 0; i < 60 && b - a > 1e-12; i++) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = at(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = at(d);
    }
  }
  const lBest = (a + b) / 2;
  let peak = at(lBest);
  let where = Math.exp(lBest);
  // The grid point wins if the search did not beat it (a peak at the band's end).
  if (k.magnitudeDb[best] > peak) {
    peak = k.magnitudeDb[best];
    where = Math.exp(lLo + best * lStep);
  }
  return { peakDb: peak + gainDb, frequencyHz: where };
}
