/**
 * From a gated impulse response to a MeasuredResponse on a log-frequency grid
 * (docs/measurements.md, "Spectrum and grid").
 *
 * - The gated samples are placed in the FFT buffer with the peak at index 0 (the samples before
 *   the peak wrap to the end), so the FFT gives the spectrum relative to the peak's arrival: the
 *   excess phase. The peak's time from the first sample of the file is the delay.
 * - FFT size: the smallest power of two that holds the gate and gives bins of at most
 *   GRID_LOW_HZ / BINS_PER_LOWEST_HZ (zero padding), so the linear interpolation between bins is
 *   far finer than the grid at its low end.
 * - The grid: GRID_POINTS_PER_OCTAVE points per octave anchored at 1 kHz, from the first at or
 *   above GRID_LOW_HZ to the last at or below the lower of GRID_HIGH_HZ and GRID_TOP_OF_NYQUIST x
 *   Nyquist. Level (dB) and unwrapped phase are interpolated linearly in frequency between bins.
 * - FFT by fft.js (a kept radix-4 real FFT), not our own.
 */
import FFT from 'fft.js';
import { findPeak, gateWeights, gateWindow, type Gate, type GateWindow } from './gate';
import type { MeasuredResponse } from './types';

export const GRID_POINTS_PER_OCTAVE = 96;
export const GRID_LOW_HZ = 10;
export const GRID_HIGH_HZ = 40000;
export const GRID_TOP_OF_NYQUIST = 0.95;
/**
 * Bins per GRID_LOW_HZ: 16 puts bins at most 0.63 Hz apart. Linear interpolation between them
 * then errs by (bin^2 / 8) |d2L/df2|: for a 24 dB/octave slope at 20 Hz, |d2L/df2| = 0.087
 * dB/Hz^2, about 0.004 dB.
 */
export const BINS_PER_LOWEST_HZ = 16;
/** Levels below this are written as this (an exact zero of the spectrum has no finite dB). */
export const LEVEL_FLOOR_DB = -300;

/** The log grid of a measurement: 1000 2^(k / perOctave) Hz for every k with the value in [lowHz, highHz]. */
export function logGridHz(lowHz: number, highHz: number, perOctave = GRID_POINTS_PER_OCTAVE): number[] {
  const k0 = Math.ceil(Math.log2(lowHz / 1000) * perOctave - 1e-9);
  const k1 = Math.floor(Math.log2(highHz / 1000) * perOctave + 1e-9);
  const out: number[] = [];
  for (let k = k0; k <= k1; k++) out.push(1000 * Math.pow(2, k / perOctave));
  return out;
}

/** The grid an impulse response at `sampleRate` is kept on. */
export function measurementGridHz(sampleRate: number): number[] {
  return logGridHz(GRID_LOW_HZ, Math.min(GRID_HIGH_HZ, (GRID_TOP_OF_NYQUIST * sampleRate) / 2));
}

function nextPow2(n: number): number {
  let p = 4; // fft.js needs a power of two > 1
  while (p < n) p *= 2;
  return p;
}

// fft.js builds a table of twiddle factors per size; a window or a re-import reuses it.
const FFTS = new Map<number, FFT>();
function fftOfSize(size: number): FFT {
  let f = FFTS.get(size);
  if (!f) {
    if (FFTS.size >= 4) FFTS.clear();
    f = new FFT(size);
    FFTS.set(size, f);
  }
  return f;
}

export interface ImpulseOptions {
  name: string;
  notes?: string[];
  gate?: Gate;
}

/** The gate this impulse response gets with `gate` (its peak found automatically). */
export function impulseGate(samples: ArrayLike<number>, sampleRate: number, gate?: Gate): GateWindow {
  const peak = findPeak(samples);
  if (peak < 0) throw new RangeError('the impulse response is silent (every sample is 0)');
  return gateWindow(peak, sampleRate, gate);
}

/**
 * The gated spectrum of one channel's impulse response on the measurement grid. Throws a
 * RangeError for a silent response, a bad gate or a sample rate too low for the grid.
 */
export function impulseResponseToMeasurement(samples: ArrayLike<number>, sampleRate: number, options: ImpulseOptions): MeasuredResponse {
  const grid = measurementGridHz(sampleRate);
  if (grid.length < 2) throw new RangeError(`sample rate ${sampleRate} Hz: too low for a response from ${GRID_LOW_HZ} Hz`);
  const w = impulseGate(samples, sampleRate, options.gate);
  const weights = gateWeights(w);
  // Only the part of the gate inside the file has samples; the rest is zeros, so the FFT needs
  // to hold that part only (a gate of any length costs no more than the file).
  const from = Math.max(0, w.start);
  const to = Math.min(samples.length, w.end);
  const size = nextPow2(Math.max(to - from, Math.ceil((BINS_PER_LOWEST_HZ * sampleRate) / GRID_LOW_HZ)));
  const input = new Float64Array(size);
  for (let i = from; i < to; i++) {
    const at = i - w.peak;
    input[at >= 0 ? at : size + at] = samples[i] * weights[i - w.start];
  }
  const fft = fftOfSize(size);
  const spectrum = new Float64Array(2 * size);
  fft.realTransform(spectrum, input);
  // realTransform fills bins 0 .. size/2 (the rest is their mirror): all the grid needs.
  const binHz = sampleRate / size;
  const lastBin = Math.min(size / 2, Math.ceil(grid[grid.length - 1] / binHz) + 1);
  const levelDb = new Float64Array(lastBin + 1);
  const phaseDeg = new Float64Array(lastBin + 1);
  let offset = 0;
  let prev = 0;
  for (let k = 0; k <= lastBin; k++) {
    const re = spectrum[2 * k];
    const im = spectrum[2 * k + 1];
    const p2 = re * re + im * im;
    levelDb[k] = p2 > 0 ? Math.max(LEVEL_FLOOR_DB, 10 * Math.log10(p2)) : LEVEL_FLOOR_DB;
    const raw = (Math.atan2(im, re) * 180) / Math.PI;
    if (k > 0) offset -= 360 * Math.round((raw + offset - prev) / 360);
    prev = raw + offset;
    phaseDeg[k] = prev;
  }
  const magnitudeDb: number[] = new Array(grid.length);
  const phase: number[] = new Array(grid.length);
  for (let j = 0; j < grid.length; j++) {
    const x = grid[j] / binHz;
    const k = Math.min(Math.floor(x), lastBin - 1);
    const t = x - k;
    magnitudeDb[j] = levelDb[k] + t * (levelDb[k + 1] - levelDb[k]);
    phase[j] = phaseDeg[k] + t * (phaseDeg[k + 1] - phaseDeg[k]);
  }
  return {
    name: options.name,
    frequencyHz: grid,
    magnitudeDb,
    phaseDeg: phase,
    phaseEstimated: false,
    delayMs: (w.peak * 1000) / sampleRate,
    notes: options.notes ?? [],
  };
}
