/**
 * Minimum phase from magnitude (docs/measurements.md, "Minimum phase").
 *
 * The homomorphic (cepstral) method: for a minimum-phase system, ln H = ln|H| + j arg H is the
 * transform of a causal sequence, the complex cepstrum; it is the real cepstrum of ln|H| folded
 * onto n >= 0 (c[0], 2 c[n] for 0 < n < N/2, c[N/2]). A. V. Oppenheim and R. W. Schafer,
 * "Discrete-Time Signal Processing", chapter on the complex cepstrum and minimum-phase systems.
 * The FFTs are fft.js's.
 *
 * The uniform grid. A measurement is the response of a continuous-time system, known only from
 * f_first to f_last. The grid is uniform in theta on [0, pi], mapped to frequency by the bilinear
 * transform f = c tan(theta / 2) with c = sqrt(f_first f_last): the bilinear transform maps a
 * continuous-time minimum-phase system to a discrete-time one with the same phase at the mapped
 * frequency, so the whole axis 0 .. infinity is on the grid (no Nyquist where an extended slope
 * would have to stop), and the bins are spaced evenly in log f around c (MINPHASE_FFT_SIZE = 2^17
 * points: 1/2000 octave at c, 1/400 octave at 20 Hz and 20 kHz for data from 20 Hz to 20 kHz).
 * The bins at theta = 0 and pi (0 Hz and infinity) take the level a quarter and a half bin in.
 *
 * The tails. Between data points the level is linear in log f. Beyond each end it follows the
 * form of a rational transfer function's tail: an asymptote of m x 6.02 dB per octave (m an
 * integer, from the slope of the last 1/8 octave, or one either side) plus a term that dies away
 * as f^(p) below the data (f^(-p) above), p one of 1, 2, 3, 4, 6, 8; the m and p whose least-squares
 * fit to the last half octave is closest are used, and the tail starts exactly at the last point.
 * A tail that does not behave like that (noise, a resonance beyond the data) makes the estimate
 * wrong near that end; nothing in magnitude-only data can say otherwise.
 */
import FFT from 'fft.js';
import type { MeasuredResponse } from './types';

export const MINPHASE_FFT_SIZE = 1 << 17;
/** The part of the data the tail is fitted to, and the part its slope is read from (octaves). */
export const TAIL_FIT_OCTAVES = 0.5;
export const TAIL_SLOPE_OCTAVES = 0.125;
const TAIL_POWERS = [1, 2, 3, 4, 6, 8];
const DB_PER_OCTAVE_STEP = 20 * Math.log10(2); // 6.02 dB per octave per order
const DB_PER_NEPER = 20 / Math.LN10;

/** The level beyond one end of the data: L(u) = Le + m s (u - ue) + b (2^(-side p (u - ue)) - 1). */
interface Tail {
  ue: number;
  le: number;
  slope: number; // dB per octave (m x 6.02)
  b: number;
  p: number;
  side: -1 | 1;
}

function tailLevel(t: Tail, u: number): number {
  return t.le + t.slope * (u - t.ue) + t.b * (Math.pow(2, -t.side * t.p * (u - t.ue)) - 1);
}

/** Least-squares slope of y over x. */
function slopeOf(x: number[], y: number[]): number {
  const n = x.length;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i];
    my += y[i];
  }
  mx /= n;
  my /= n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) * (x[i] - mx);
  }
  return sxx > 0 ? sxy / sxx : 0;
}

function fitTail(u: Float64Array, level: readonly number[], side: -1 | 1): Tail {
  const n = u.length;
  const e = side < 0 ? 0 : n - 1;
  const ue = u[e];
  const le = level[e];
  const span = Math.abs(u[n - 1] - u[0]);
  // Points within the fit and slope ranges of this end (at least 2 of each).
  const near = (octaves: number) => {
    const xs: number[] = [];
    const ys: number[] = [];
    for (let k = 0; k < n; k++) {
      const i = side < 0 ? k : n - 1 - k;
      if (xs.length >= 2 && Math.abs(u[i] - ue) > octaves) break;
      xs.push(u[i]);
      ys.push(level[i]);
    }
    return { xs, ys };
  };
  const s = near(Math.min(TAIL_SLOPE_OCTAVES, span / 4));
  const m0 = Math.round(slopeOf(s.xs, s.ys) / DB_PER_OCTAVE_STEP);
  const fit = near(Math.min(TAIL_FIT_OCTAVES, span / 2));
  let best: Tail = { ue, le, slope: m0 * DB_PER_OCTAVE_STEP, b: 0, p: 1, side };
  let bestResidual = Infinity;
  if (fit.xs.length < 3) return best;
  for (let m = m0 - 1; m <= m0 + 1; m++) {
    const slope = m * DB_PER_OCTAVE_STEP;
    for (const p of TAIL_POWERS) {
      // Through the end point: y = level - le - slope (u - ue) = b g, g = 2^(-side p (u - ue)) - 1.
      let sgy = 0;
      let sgg = 0;
      for (let i = 0; i < fit.xs.length; i++) {
        const g = Math.pow(2, -side * p * (fit.xs[i] - ue)) - 1;
        const y = fit.ys[i] - le - slope * (fit.xs[i] - ue);
        sgy += g * y;
        sgg += g * g;
      }
      const b = sgg > 0 ? sgy / sgg : 0;
      let r = 0;
      for (let i = 0; i < fit.xs.length; i++) {
        const g = Math.pow(2, -side * p * (fit.xs[i] - ue)) - 1;
        const d = fit.ys[i] - le - slope * (fit.xs[i] - ue) - b * g;
        r += d * d;
      }
      if (r < bestResidual) {
        bestResidual = r;
        best = { ue, le, slope, b, p, side };
      }
    }
  }
  return best;
}

let cachedFft: FFT | null = null;
function fft(): FFT {
  if (!cachedFft) cachedFft = new FFT(MINPHASE_FFT_SIZE);
  return cachedFft;
}

/**
 * The minimum phase (degrees, unwrapped, 0 at 0 Hz) at each frequency of a magnitude response.
 * Needs at least 2 points at strictly increasing frequencies > 0.
 */
export function minimumPhaseDeg(frequencyHz: readonly number[], magnitudeDb: readonly number[]): number[] {
  const n = frequencyHz.length;
  if (n < 2) throw new RangeError('minimum phase needs at least 2 points');
  const N = MINPHASE_FFT_SIZE;
  const half = N / 2;
  const u = new Float64Array(n);
  for (let i = 0; i < n; i++) u[i] = Math.log2(frequencyHz[i]);
  const c = Math.sqrt(frequencyHz[0] * frequencyHz[n - 1]);
  const low = fitTail(u, magnitudeDb, -1);
  const high = fitTail(u, magnitudeDb, 1);
  const dTheta = (2 * Math.PI) / N;

  // ln|H| on the full circle (even), bins 0 .. N-1.
  const lnMag = new Float64Array(N);
  let j = 0;
  for (let k = 0; k <= half; k++) {
    const theta = k === 0 ? dTheta / 4 : k === half ? Math.PI - dTheta / 2 : k * dTheta;
    const uk = Math.log2(c * Math.tan(theta / 2));
    let level: number;
    if (uk <= u[0]) level = tailLevel(low, uk);
    else if (uk >= u[n - 1]) level = tailLevel(high, uk);
    else {
      while (u[j + 1] < uk) j++;
      level = magnitudeDb[j] + ((magnitudeDb[j + 1] - magnitudeDb[j]) * (uk - u[j])) / (u[j + 1] - u[j]);
    }
    lnMag[k] = level / DB_PER_NEPER;
    if (k > 0 && k < half) lnMag[N - k] = lnMag[k];
  }

  // Real cepstrum: the transform of an even real sequence is real, and the forward transform is
  // N times the inverse one.
  const f = fft();
  const spectrum = new Float64Array(2 * N);
  f.realTransform(spectrum, lnMag);
  const folded = new Float64Array(N);
  folded[0] = spectrum[0] / N;
  for (let k = 1; k < half; k++) folded[k] = (2 * spectrum[2 * k]) / N;
  folded[half] = spectrum[2 * half] / N;
  // ln H = sum over n of chat[n] e^(-j theta n): the phase is its imaginary part.
  f.realTransform(spectrum, folded);

  const out: number[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const x = (2 * Math.atan(frequencyHz[i] / c)) / dTheta;
    const k = Math.min(Math.floor(x), half - 1);
    const t = x - k;
    const phase = spectrum[2 * k + 1] + t * (spectrum[2 * k + 3] - spectrum[2 * k + 1]);
    out[i] = (phase * 180) / Math.PI;
  }
  return out;
}

/**
 * The measurement with its phase replaced by the minimum-phase estimate from its magnitude
 * (`phaseEstimated` true). The delay is kept: the result is minimum phase after that delay, so a
 * measurement with phase loses its excess phase but keeps its arrival time.
 */
export function withMinimumPhase(m: MeasuredResponse): MeasuredResponse {
  return {
    ...m,
    frequencyHz: m.frequencyHz.slice(),
    magnitudeDb: m.magnitudeDb.slice(),
    phaseDeg: minimumPhaseDeg(m.frequencyHz, m.magnitudeDb),
    phaseEstimated: true,
    notes: m.notes.slice(),
  };
}
