/**
 * The frequency grid a fit works on, and fractional-octave smoothing as a sparse operator on it.
 *
 * The grid is uniform in log f (R points per octave, anchored at the range's low end), so equal
 * spans of octaves hold equal numbers of points: the error summed over the grid with trapezoid
 * weights is the error integrated over log f, weighted per octave and not per data point
 * (docs/references.md, "Fitting"). It extends half a smoothing width beyond the range where the
 * data allow, so the smoothed response at the range's ends is a full window.
 *
 * Smoothing is the definition of src/measure/smooth.ts (the mean of |H|^2 over log f in
 * [f 2^(-1/2N), f 2^(1/2N)], narrowed symmetrically at the data's ends) discretised by the
 * trapezoid rule on the grid. R is a multiple of 2N, so every window's ends are grid points.
 */

/** Sparse rows: point i smooths over cols[start[i] .. start[i+1]) with weights w (summing to 1). */
export interface SmoothingOperator {
  start: Int32Array;
  cols: Int32Array;
  w: Float64Array;
}

export interface FitGrid {
  frequenciesHz: Float64Array;
  /** Points per octave. */
  perOctave: number;
  /** Indices of the first and last point inside the fit range. */
  first: number;
  last: number;
  /** Per-octave weight of each point inside the range (trapezoid in log2 f), 0 outside. */
  weights: Float64Array;
}

/** Points per octave for 1/N-octave smoothing: at least 48, a multiple of 2N. */
export function pointsPerOctave(smoothingN: number): number {
  const twoN = 2 * Math.max(1, Math.round(smoothingN));
  return twoN * Math.ceil(48 / twoN);
}

/**
 * The grid for a fit from `fromHz` to `toHz`, extended by `extendOctaves` each side within
 * `dataFromHz .. dataToHz` (where the response has values). `fromHz` is a grid point.
 */
export function fitGrid(fromHz: number, toHz: number, dataFromHz: number, dataToHz: number, perOctave: number, extendOctaves: number): FitGrid {
  const R = perOctave;
  const lo = Math.max(-Math.floor(extendOctaves * R + 1e-9), Math.ceil(R * Math.log2(dataFromHz / fromHz) - 1e-9));
  const topIn = Math.floor(R * Math.log2(toHz / fromHz) + 1e-9);
  const hi = Math.min(topIn + Math.floor(extendOctaves * R + 1e-9), Math.floor(R * Math.log2(dataToHz / fromHz) + 1e-9));
  const n = hi - lo + 1;
  const frequenciesHz = new Float64Array(n);
  for (let i = 0; i < n; i++) frequenciesHz[i] = fromHz * Math.pow(2, (lo + i) / R);
  const first = -lo;
  const last = Math.min(topIn - lo, n - 1);
  const weights = new Float64Array(n);
  for (let i = first; i <= last; i++) weights[i] = (i === first || i === last ? 0.5 : 1) / R;
  return { frequenciesHz, perOctave: R, first, last, weights };
}

/**
 * 1/N-octave smoothing on a grid of `perOctave` points per octave and `n` points: each window
 * spans perOctave / (2N) points either side, narrowed symmetrically at the grid's ends.
 */
export function smoothingOperator(n: number, perOctave: number, smoothingN: number): SmoothingOperator {
  const k = smoothingN > 0 ? Math.round(perOctave / (2 * smoothingN)) : 0;
  const start = new Int32Array(n + 1);
  const cols: number[] = [];
  const w: number[] = [];
  for (let i = 0; i < n; i++) {
    start[i] = cols.length;
    const half = Math.min(k, i, n - 1 - i);
    if (half === 0) {
      cols.push(i);
      w.push(1);
      continue;
    }
    const total = 2 * half; // trapezoid: ends weigh 1/2, the rest 1
    for (let j = i - half; j <= i + half; j++) {
      cols.push(j);
      w.push((j === i - half || j === i + half ? 0.5 : 1) / total);
    }
  }
  start[n] = cols.length;
  return { start, cols: Int32Array.from(cols), w: Float64Array.from(w) };
}

/** Smoothed level in dB of a level in dB: 10 log10 of the windowed mean of the power. */
export function smoothDb(op: SmoothingOperator, db: ArrayLike<number>, out = new Float64Array(db.length)): Float64Array {
  for (let i = 0; i < db.length; i++) {
    // Relative to the level at i, so a constant comes back exactly and nothing overflows.
    const ref = db[i];
    let s = 0;
    for (let e = op.start[i]; e < op.start[i + 1]; e++) s += op.w[e] * Math.pow(10, (db[op.cols[e]] - ref) / 10);
    out[i] = ref + 10 * Math.log10(s);
  }
  return out;
}
