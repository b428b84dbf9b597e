/**
 * The predicted acoustic response: what arrives at the microphone when each output's driver (as
 * its measurement shows it, alone and through no filter) is driven through that output's whole
 * chain, and the complex sum of those predictions over the unmuted outputs.
 *
 * A measurement is known only at its own frequencies. Between two of them it is interpolated on
 * log frequency: magnitude (dB) and unwrapped phase are each linear in ln f (docs/plan-format.md,
 * "The predicted acoustic response"). Outside its first .. last frequency it has no value: every
 * number derived from it is NaN here (null at the command line), never extrapolated.
 *
 * Everything is built as a `Response` of chain-response.ts (per-sample group delay and log slope
 * at the plan's sample rate), so the sum is `sumResponses`, the same exact complex sum and group
 * delay as for the electrical outputs: for a predicted part P = C D e^{-j w T} (chain C, driver D,
 * offset T), d ln P / dw = d ln C / dw + d ln D / dw - j T.
 */
import { designPlan, type DesignedOutput } from '../design/chain';
import { DEFAULT_AIR_TEMPERATURE_C, type AcousticOffset, type Measurement, type Plan } from '../plan/types';
import { MAGNITUDE_FLOOR_DB, multiplyComplexInto, outputResponse, sumResponses, wrapPi, type Response } from '../response/chain-response';
import { allocateComplexResponse, normalizedOmega, type ComplexResponse } from '../response/kernel';
import type { MeasuredResponse } from './types';

const DEG = Math.PI / 180;
const NEPER_PER_DB = Math.LN10 / 20;

/**
 * Speed of sound in dry air, m/s, at `airTemperatureC` degrees Celsius: c = 331.3 sqrt(1 + T /
 * 273.15), the ideal-gas approximation (docs/references.md, "Measured responses"). 343.2 m/s at
 * 20 degrees C.
 */
export function speedOfSoundMps(airTemperatureC: number = DEFAULT_AIR_TEMPERATURE_C): number {
  return 331.3 * Math.sqrt(1 + airTemperatureC / 273.15);
}

/** An acoustic offset as a time in ms (0 when absent): a distance d mm takes d / c. */
export function acousticOffsetMs(offset: AcousticOffset | undefined, airTemperatureC: number = DEFAULT_AIR_TEMPERATURE_C): number {
  if (!offset) return 0;
  return offset.unit === 'ms' ? offset.value : offset.value / speedOfSoundMps(airTemperatureC); // mm / (m/s) = ms
}

/** A measurement evaluated at other frequencies; NaN where it has no value. */
export interface InterpolatedMeasurement {
  /** dB; NaN outside the measurement's range. */
  magnitudeDb: Float64Array;
  /** Full phase in radians (the measurement's delay included), continuous; NaN outside the range or without phase. */
  phaseRad: Float64Array;
  /** Group delay in ms (delay included); NaN where the phase is. */
  groupDelayMs: Float64Array;
  /** d ln|H| / dw with w = 2 pi f in rad/s; NaN outside the range. */
  logSlopePerRadPerS: Float64Array;
}

/** numpy.unwrap in degrees: removes jumps of more than 180 degrees between neighbours. */
function unwrapDeg(xs: readonly number[]): Float64Array {
  const out = new Float64Array(xs.length);
  let offset = 0;
  for (let i = 0; i < xs.length; i++) {
    if (i > 0) {
      const d = xs[i] - xs[i - 1];
      if (Math.abs(d) > 180) offset -= 360 * Math.round(d / 360);
    }
    out[i] = xs[i] + offset;
  }
  return out;
}

/** The index i of the last frequency <= f (binary search); -1 below the first. */
function segmentOf(freqs: readonly number[], f: number): number {
  let lo = 0;
  let hi = freqs.length - 1;
  if (!(f >= freqs[0])) return -1;
  if (f >= freqs[hi]) return hi;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (freqs[mid] <= f) lo = mid;
    else hi = mid;
  }
  return lo;
}

/**
 * A measurement at `frequenciesHz`, interpolated linearly in ln f (magnitude in dB, phase
 * unwrapped). The slopes per unit of ln f give the derivatives: d/dw = (1/w) d/d(ln f), so the
 * group delay is delay - (dphase/dln f) / w and d ln|H|/dw = (dB/dln f)(ln 10 / 20) / w. Between
 * two points the slope is that segment's; exactly at a data point it is the mean of the two
 * segments beside it (the one segment at either end), so the group delay is defined everywhere
 * in the range. The stored phase is unwrapped again first (a no-op for unwrapped data).
 */
export function interpolateMeasurement(m: MeasuredResponse, frequenciesHz: ArrayLike<number>): InterpolatedMeasurement {
  const n = frequenciesHz.length;
  const out: InterpolatedMeasurement = {
    magnitudeDb: new Float64Array(n).fill(NaN),
    phaseRad: new Float64Array(n).fill(NaN),
    groupDelayMs: new Float64Array(n).fill(NaN),
    logSlopePerRadPerS: new Float64Array(n).fill(NaN),
  };
  const fs = m.frequencyHz;
  const last = fs.length - 1;
  const lnF = fs.map(Math.log);
  const phase = m.phaseDeg ? unwrapDeg(m.phaseDeg) : null;
  const delayS = m.delayMs / 1000;
  // Slopes per unit ln f of segment k (from point k to k + 1).
  const slope = (ys: ArrayLike<number>, k: number) => (ys[k + 1] - ys[k]) / (lnF[k + 1] - lnF[k]);
  for (let q = 0; q < n; q++) {
    const f = frequenciesHz[q];
    const i = segmentOf(fs, f);
    if (i < 0 || f > fs[last]) continue; // outside the measured range: no value
    const u = Math.log(f);
    const atPoint = f === fs[i];
    // The segment that holds f (the last point belongs to the last segment).
    const k = Math.min(i, last - 1);
    const t = atPoint ? (i === k ? 0 : 1) : (u - lnF[k]) / (lnF[k + 1] - lnF[k]);
    const lerp = (ys: ArrayLike<number>) => (atPoint ? ys[i] : ys[k] + t * (ys[k + 1] - ys[k]));
    // The slope at f: the segment's, or at a data point the mean of its two segments.
    const slopeAt = (ys: ArrayLike<number>) => {
      if (!atPoint || i === 0 || i === last) return slope(ys, k);
      return 0.5 * (slope(ys, i - 1) + slope(ys, i));
    };
    const w = 2 * Math.PI * f;
    out.magnitudeDb[q] = lerp(m.magnitudeDb);
    out.logSlopePerRadPerS[q] = (slopeAt(m.magnitudeDb) * NEPER_PER_DB) / w;
    if (phase) {
      out.phaseRad[q] = lerp(phase) * DEG - w * delayS;
      out.groupDelayMs[q] = (delayS - (slopeAt(phase) * DEG) / w) * 1000;
    }
  }
  return out;
}

/** One output's predicted acoustic response. */
export interface PredictedOutput {
  id: string;
  mute: boolean;
  measurementId: string;
  /** The output's acoustic offset as a time, ms (0 when it has none). */
  offsetMs: number;
  /** The measurement's phase is a minimum-phase estimate, not measured. */
  phaseEstimated: boolean;
  /** The measurement has a phase: without one only the magnitude is predicted. */
  hasPhase: boolean;
  /** NaN (every field) where the measurement has no value; phase and group delay NaN too without phase. */
  response: Response;
}

export interface AcousticPrediction {
  frequenciesHz: Float64Array;
  speedOfSoundMps: number;
  /** Every output with a driver measurement, muted ones too (flagged), in plan order. */
  outputs: PredictedOutput[];
  /** The ids of the outputs in the sum: unmuted, with a driver measurement. */
  summed: string[];
  /** Unmuted outputs without a driver measurement: their acoustic part is unknown, so left out. */
  unmeasured: string[];
  /** The complex sum of the summed outputs; NaN where any of them has no value; null when none. */
  sum: Response | null;
}

export interface PredictOptions {
  /** Applied to each driver measurement before use (for example smoothing); the plan is not changed. */
  measurement?: (m: Measurement) => MeasuredResponse;
}

/**
 * The predicted acoustic response of every output that has a driver measurement, and their sum
 * over the unmuted ones, at `frequenciesHz` (each in 0 .. Nyquist of the plan).
 */
export function predictAcoustic(plan: Plan, frequenciesHz: ArrayLike<number>, options: PredictOptions = {}): AcousticPrediction {
  const fs = plan.sampleRate;
  const freqs = Float64Array.from(frequenciesHz);
  const omega = normalizedOmega(freqs, fs);
  const temperature = plan.airTemperatureC ?? DEFAULT_AIR_TEMPERATURE_C;
  const byId = new Map((plan.measurements ?? []).map((m) => [m.id, m]));
  const designed = designPlan(plan);
  const outputs: PredictedOutput[] = [];
  const unmeasured: string[] = [];
  plan.outputs.forEach((out, index) => {
    const stored = out.driverMeasurementId === undefined ? undefined : byId.get(out.driverMeasurementId);
    if (!stored) {
      if (!out.mute) unmeasured.push(out.id);
      return;
    }
    const m = options.measurement ? options.measurement(stored) : stored;
    const offsetMs = acousticOffsetMs(out.acousticOffset, temperature);
    outputs.push({
      id: out.id,
      mute: out.mute,
      measurementId: stored.id,
      offsetMs,
      phaseEstimated: m.phaseDeg !== null && m.phaseEstimated,
      hasPhase: m.phaseDeg !== null,
      response: predictedResponse(designed[index], interpolateMeasurement(m, freqs), offsetMs, omega, fs),
    });
  });
  const parts = outputs.filter((o) => !o.mute);
  return {
    frequenciesHz: freqs,
    speedOfSoundMps: speedOfSoundMps(temperature),
    outputs,
    summed: parts.map((o) => o.id),
    unmeasured,
    sum: parts.length === 0 ? null : sumResponses(parts.map((o) => o.response), omega, fs),
  };
}

/** Chain x driver x offset delay, as a `Response` at sample rate fs (NaN where the driver has no value). */
function predictedResponse(chainOf: DesignedOutput, d: InterpolatedMeasurement, offsetMs: number, omega: Float64Array, fs: number): Response {
  return predictedFromChain(outputResponse(chainOf, omega, fs), d, offsetMs, omega, fs);
}

/**
 * The predicted response from an output's chain response already computed on the same grid
 * (`omega` = 2 pi f / fs, as `normalizedOmega` gives), its driver measurement interpolated on that
 * grid, and its acoustic offset in ms. For callers that cache chain responses (the app).
 */
export function predictedFromChain(c: Response, d: InterpolatedMeasurement, offsetMs: number, omega: Float64Array, fs: number, driver?: ComplexResponse): Response {
  const n = omega.length;
  const offsetSamples = (offsetMs * fs) / 1000;
  const msPerSample = 1000 / fs;
  // The complex response the sum adds: the chain's H times the driver's (offset delay included).
  const complex = allocateComplexResponse(n);
  complex.re.set(c.complex.re.subarray(0, n));
  complex.im.set(c.complex.im.subarray(0, n));
  complex.log2Scale.set(c.complex.log2Scale.subarray(0, n));
  complex.groupDelaySamples.set(c.complex.groupDelaySamples.subarray(0, n));
  complex.logSlope.set(c.complex.logSlope.subarray(0, n));
  multiplyComplexInto(complex, driver ?? driverComplex(d, omega, offsetSamples, fs), n);
  const r: Response = {
    magnitudeDb: new Float64Array(n),
    phaseRad: new Float64Array(n),
    phaseUnwrappedRad: new Float64Array(n),
    groupDelayMs: new Float64Array(n),
    logSlope: new Float64Array(n),
    groupDelaySamples: new Float64Array(n),
    complex,
  };
  for (let i = 0; i < n; i++) {
    const offsetPhase = omega[i] * offsetSamples;
    r.magnitudeDb[i] = c.magnitudeDb[i] + d.magnitudeDb[i];
    r.phaseUnwrappedRad[i] = c.phaseUnwrappedRad[i] + d.phaseRad[i] - offsetPhase;
    r.phaseRad[i] = Number.isNaN(r.phaseUnwrappedRad[i]) ? NaN : wrapPi(r.phaseUnwrappedRad[i]);
    // Per-sample units (w normalized = 2 pi f / fs): d/dw_normalized = fs d/dw.
    r.logSlope[i] = c.logSlope[i] + d.logSlopePerRadPerS[i] * fs;
    r.groupDelaySamples[i] = c.groupDelaySamples[i] + (d.groupDelayMs[i] / 1000) * fs + offsetSamples;
    r.groupDelayMs[i] = r.magnitudeDb[i] < MAGNITUDE_FLOOR_DB ? NaN : r.groupDelaySamples[i] * msPerSample;
  }
  // Where the chain is exactly 0 (a notch at its own frequency), the sum needs dP/dw = C' D e^{-j w T}.
  if (c.derivativeAtZero) {
    const z = c.derivativeAtZero;
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      if (z.re[i] === 0 && z.im[i] === 0) continue;
      const mag = Math.pow(10, d.magnitudeDb[i] / 20);
      const ph = d.phaseRad[i] - omega[i] * offsetSamples;
      const dr = mag * Math.cos(ph);
      const di = mag * Math.sin(ph);
      re[i] = z.re[i] * dr - z.im[i] * di;
      im[i] = z.re[i] * di + z.im[i] * dr;
    }
    r.derivativeAtZero = { re, im };
  }
  return r;
}

/**
 * A measurement alone on a frequency grid as a `Response` (for plotting beside the predictions):
 * NaN outside its range, and phase and group delay NaN without phase.
 */
export function measurementResponse(d: InterpolatedMeasurement, sampleRateHz: number): Response {
  const n = d.magnitudeDb.length;
  const phaseRad = new Float64Array(n);
  const logSlope = new Float64Array(n);
  const groupDelaySamples = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    phaseRad[i] = Number.isNaN(d.phaseRad[i]) ? NaN : wrapPi(d.phaseRad[i]);
    logSlope[i] = d.logSlopePerRadPerS[i] * sampleRateHz; // per rad/sample, as Response has it
    groupDelaySamples[i] = (d.groupDelayMs[i] / 1000) * sampleRateHz;
  }
  const complex = driverComplex(d, new Float64Array(n), 0, sampleRateHz);
  return { magnitudeDb: d.magnitudeDb, phaseRad, phaseUnwrappedRad: d.phaseRad, groupDelayMs: d.groupDelayMs, logSlope, groupDelaySamples, complex };
}

/** The driver's complex response on the grid with its offset delay, as `predictedFromChain` multiplies it in. */
export function driverOnGrid(d: InterpolatedMeasurement, offsetMs: number, omega: Float64Array, fs: number): ComplexResponse {
  return driverComplex(d, omega, (offsetMs * fs) / 1000, fs);
}

/**
 * A measurement on a frequency grid as a complex response, with an extra delay of `delaySamples`
 * (w = `omega`, radians per sample): H = 10^(dB/20) e^{j (phase - w delay)}; NaN outside its range
 * and, without phase, NaN throughout (a sum cannot be predicted from magnitude alone).
 */
function driverComplex(d: InterpolatedMeasurement, omega: Float64Array, delaySamples: number, fs: number): ComplexResponse {
  const n = d.magnitudeDb.length;
  const c = allocateComplexResponse(n);
  for (let i = 0; i < n; i++) {
    const mag = Math.pow(10, d.magnitudeDb[i] / 20);
    const ph = d.phaseRad[i] - omega[i] * delaySamples;
    c.re[i] = mag * Math.cos(ph);
    c.im[i] = mag * Math.sin(ph);
    c.groupDelaySamples[i] = (d.groupDelayMs[i] / 1000) * fs + delaySamples;
    c.logSlope[i] = d.logSlopePerRadPerS[i] * fs;
  }
  return c;
}
