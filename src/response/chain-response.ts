/**
 * Responses of designed outputs and of their complex (acoustic) sum, on any frequency list.
 *
 * Two layers. The complex core (`chainComplexResponse`, `multiplyComplexInto`, `sumComplex`)
 * carries H = Re H + j Im H (with a power-of-two scale for deep stop bands), the group delay and
 * the log-magnitude slope in caller-owned `ComplexResponse` arrays: a sum is a complex add, a
 * measured response multiplies in. The presentation step (`presentCurves` and the wrappers
 * `cascadeWithGainDelay`, `outputResponse`, `sumResponses`, `designedResponse`) turns them into
 * dB, wrapped and unwrapped phase and group delay in ms, in new arrays.
 *
 * An output is its cascade times its linear gain (polarity included) times a pure delay of
 * D samples, e^{-j w D}: the delay adds D to the group delay and -w D to the phase, unrounded.
 *
 * The sum S = sum_k c_k H_k has dS/dw = sum_k c_k H_k (d ln H_k/dw - j D_k), with
 * d ln H_k / dw = slope_k - j tau_k from the kernel, so its group delay -Im(S'/S) is exact too.
 */
import type { Section } from '../design/section';
import { packSections } from '../design/section';
import type { DesignedOutput } from '../design/chain';
import { allocateComplexResponse, cascadeComplex, complexScaleFactor, normalizedOmega, presentMagnitudePhase, type ComplexResponse } from './kernel';

export type { ComplexResponse } from './kernel';

/** Magnitude below which phase and group delay carry no information (the CLI writes null). */
export const MAGNITUDE_FLOOR_DB = -200;

/** A response presented for plots, tables and the command line (new arrays, one value per point). */
export interface ResponseCurves {
  /** 20 log10 |H|. */
  magnitudeDb: Float64Array;
  /** Wrapped to (-pi, pi]. */
  phaseRad: Float64Array;
  /** Unwrapped along the frequency list (the delay's -w D is added exactly, not unwrapped). */
  phaseUnwrappedRad: Float64Array;
  /** Group delay in ms, delay included; NaN where the magnitude is below MAGNITUDE_FLOOR_DB. */
  groupDelayMs: Float64Array;
  /** d ln|H| / dw (per radian per sample), for sums. */
  logSlope: Float64Array;
  /**
   * Group delay in samples, delay included, not masked below MAGNITUDE_FLOOR_DB: a sum needs the
   * derivative of every part it adds, however small the part.
   */
  groupDelaySamples: Float64Array;
  /**
   * dH/dw (real, imaginary; gain, polarity and delay included) at the points where H is exactly
   * 0 (a notch at its own frequency, a high-pass at 0 Hz), where d ln H / dw does not exist;
   * absent when there is no such point. A sum adds it there.
   */
  derivativeAtZero?: DerivativeAtZero;
  /** The complex response these curves present (gain, polarity and delay included). */
  complex: ComplexResponse;
}

/** dH/dw where H is exactly 0 (0 elsewhere). */
export interface DerivativeAtZero {
  re: Float64Array;
  im: Float64Array;
}

/**
 * The former name of `ResponseCurves`, kept for callers written against it.
 * @deprecated use `ResponseCurves` (the name does not collide with the DOM's `Response`).
 */
export type Response = ResponseCurves;

/** Wraps an angle to (-pi, pi]. */
export function wrapPi(x: number): number {
  let y = x - 2 * Math.PI * Math.floor((x + Math.PI) / (2 * Math.PI)); // [-pi, pi)
  if (y <= -Math.PI) y += 2 * Math.PI;
  return y;
}

/** numpy.unwrap: adds multiples of 2 pi where consecutive points jump by more than pi. */
export function unwrapInto(wrapped: Float64Array, out: Float64Array): void {
  let offset = 0;
  for (let i = 0; i < wrapped.length; i++) {
    if (i > 0) {
      const d = wrapped[i] - wrapped[i - 1];
      if (d > Math.PI) offset -= 2 * Math.PI * Math.round(d / (2 * Math.PI));
      else if (d < -Math.PI) offset += 2 * Math.PI * Math.round(-d / (2 * Math.PI));
    }
    out[i] = wrapped[i] + offset;
  }
}

// ---- the complex core -------------------------------------------------------------------------

/**
 * The complex response of a chain into the caller's `out`: the packed cascade times the linear
 * `gain` (polarity included) times the delay e^{-j w D}, D = `delaySamples`; group delay + D.
 * The entry point for anything that multiplies further responses in (`multiplyComplexInto`).
 */
export function chainComplexResponse(
  packed: Float64Array,
  sectionCount: number,
  gain: number,
  delaySamples: number,
  omega: Float64Array,
  out: ComplexResponse,
): void {
  cascadeComplex(packed, sectionCount, omega, out);
  applyGainDelay(out, gain, delaySamples, omega, out);
}

/** `into` = `from` times gain e^{-j w D} (from and into may be the same). */
function applyGainDelay(from: ComplexResponse, gain: number, delaySamples: number, omega: Float64Array, into: ComplexResponse): void {
  const n = omega.length;
  for (let i = 0; i < n; i++) {
    const r = from.re[i];
    const m = from.im[i];
    if (delaySamples === 0) {
      into.re[i] = gain * r;
      into.im[i] = gain * m;
    } else {
      const wd = omega[i] * delaySamples;
      const c = Math.cos(wd);
      const sn = Math.sin(wd);
      into.re[i] = gain * (r * c + m * sn);
      into.im[i] = gain * (m * c - r * sn);
    }
    into.log2Scale[i] = from.log2Scale[i];
    into.groupDelaySamples[i] = from.groupDelaySamples[i] + delaySamples;
    into.logSlope[i] = from.logSlope[i];
  }
}

/**
 * `into` = `into` times `by`, point by point: H multiplies, and since d ln(AB) = d ln A + d ln B
 * the group delays and the log-magnitude slopes add. For a measured response (brought to the
 * same frequency list) multiplied into a chain.
 */
export function multiplyComplexInto(into: ComplexResponse, by: ComplexResponse, points = into.re.length): void {
  for (let i = 0; i < points; i++) {
    const r = into.re[i] * by.re[i] - into.im[i] * by.im[i];
    into.im[i] = into.re[i] * by.im[i] + into.im[i] * by.re[i];
    into.re[i] = r;
    into.log2Scale[i] += by.log2Scale[i];
    into.groupDelaySamples[i] += by.groupDelaySamples[i];
    into.logSlope[i] += by.logSlope[i];
  }
}

/** One part of a sum: its complex response and, where it is exactly 0, its derivative. */
export interface SumPart {
  complex: ComplexResponse;
  derivativeAtZero?: DerivativeAtZero;
}

/**
 * The complex sum of `parts` into `out` (a complex add, with the parts' power-of-two scales
 * aligned), and its exact group delay and slope from S' = sum_k H_k (slope_k - j tau_k).
 * An empty sum is 0 (group delay NaN).
 */
export function sumComplex(parts: readonly SumPart[], points: number, out: ComplexResponse): void {
  for (let i = 0; i < points; i++) {
    // The largest scale among the nonzero parts (0 unless some part is beyond 1e+/-150).
    let top = -Infinity;
    let anyScaled = false;
    for (const p of parts) {
      const c = p.complex;
      if (c.log2Scale[i] !== 0) anyScaled = true;
      if ((c.re[i] !== 0 || c.im[i] !== 0) && c.log2Scale[i] > top) top = c.log2Scale[i];
    }
    if (!anyScaled || top === -Infinity) top = 0;
    let sr = 0;
    let si = 0;
    let dr = 0;
    let di = 0;
    for (const p of parts) {
      const c = p.complex;
      const f = anyScaled ? complexScaleFactor(c.log2Scale[i] - top) : 1;
      const hr = c.re[i] * f;
      const hi = c.im[i] * f;
      if (c.re[i] === 0 && c.im[i] === 0) {
        // An exact zero adds nothing to the sum but still its derivative.
        if (p.derivativeAtZero) {
          const g = anyScaled ? complexScaleFactor(-top) : 1;
          dr += p.derivativeAtZero.re[i] * g;
          di += p.derivativeAtZero.im[i] * g;
        }
        continue;
      }
      sr += hr;
      si += hi;
      // d(c H)/dw = c H (slope - j tau), tau in samples including the delay (a part far below
      // the magnitude floor still adds its derivative, as it adds its value).
      const tau = c.groupDelaySamples[i];
      const a = c.logSlope[i];
      if (!Number.isFinite(tau)) continue;
      dr += hr * a + hi * tau;
      di += hi * a - hr * tau;
    }
    const s2 = sr * sr + si * si;
    out.re[i] = sr;
    out.im[i] = si;
    out.log2Scale[i] = top;
    // S'/S = (dr + j di)(sr - j si) / |S|^2; tau = -Im(S'/S), slope = Re(S'/S).
    out.groupDelaySamples[i] = -(di * sr - dr * si) / s2;
    out.logSlope[i] = (dr * sr + di * si) / s2;
  }
}

// ---- presentation -----------------------------------------------------------------------------

/** Curves of a complex response: dB, wrapped and unwrapped phase, group delay in ms. */
export function presentCurves(c: ComplexResponse, sampleRateHz: number, points = c.re.length): ResponseCurves {
  const magnitudeDb = new Float64Array(points);
  const phaseRad = new Float64Array(points);
  const groupDelayMs = new Float64Array(points);
  const msPerSample = 1000 / sampleRateHz;
  presentMagnitudePhase(c, magnitudeDb, phaseRad, 0, points);
  for (let i = 0; i < points; i++) {
    phaseRad[i] = wrapPi(phaseRad[i]);
    groupDelayMs[i] = magnitudeDb[i] < MAGNITUDE_FLOOR_DB ? NaN : c.groupDelaySamples[i] * msPerSample;
  }
  const phaseUnwrappedRad = new Float64Array(points);
  unwrapInto(phaseRad, phaseUnwrappedRad);
  return {
    magnitudeDb,
    phaseRad,
    phaseUnwrappedRad,
    groupDelayMs,
    logSlope: c.logSlope.slice(0, points),
    groupDelaySamples: c.groupDelaySamples.slice(0, points),
    complex: c,
  };
}

/**
 * The response of a cascade with a linear gain and a delay of `delaySamples` at sample rate fs.
 * `omega` is 2 pi f / fs for each frequency (see `normalizedOmega`). The magnitude is the
 * cascade's plus the gain's dB, the phase the cascade's (plus pi for a negative gain) unwrapped
 * before the delay's -w D is added exactly.
 */
export function cascadeWithGainDelay(
  sections: readonly Section[],
  gain: number,
  delaySamples: number,
  omega: Float64Array,
  sampleRateHz: number,
): ResponseCurves {
  const n = omega.length;
  const filter = allocateComplexResponse(n);
  cascadeComplex(packSections(sections), sections.length, omega, filter);
  const magnitudeDb = new Float64Array(n);
  const filterPhase = new Float64Array(n);
  presentMagnitudePhase(filter, magnitudeDb, filterPhase);
  const gainDb = 20 * Math.log10(Math.abs(gain));
  const flip = gain < 0 ? Math.PI : 0;
  const phaseRad = new Float64Array(n);
  const groupDelayMs = new Float64Array(n);
  const groupDelaySamples = new Float64Array(n);
  const msPerSample = 1000 / sampleRateHz;
  for (let i = 0; i < n; i++) {
    magnitudeDb[i] += gainDb; // -Infinity for a gain of 0
    filterPhase[i] = wrapPi(filterPhase[i] + flip);
    phaseRad[i] = wrapPi(filterPhase[i] - omega[i] * delaySamples);
    groupDelaySamples[i] = filter.groupDelaySamples[i] + delaySamples;
    groupDelayMs[i] = magnitudeDb[i] < MAGNITUDE_FLOOR_DB ? NaN : groupDelaySamples[i] * msPerSample;
  }
  const phaseUnwrappedRad = new Float64Array(n);
  unwrapInto(filterPhase, phaseUnwrappedRad);
  for (let i = 0; i < n; i++) phaseUnwrappedRad[i] -= omega[i] * delaySamples;
  const complex = allocateComplexResponse(n);
  applyGainDelay(filter, gain, delaySamples, omega, complex);
  const r: ResponseCurves = { magnitudeDb, phaseRad, phaseUnwrappedRad, groupDelayMs, logSlope: filter.logSlope, groupDelaySamples, complex };
  for (let i = 0; i < n; i++) {
    if (magnitudeDb[i] !== -Infinity || gain === 0) continue;
    r.derivativeAtZero ??= { re: new Float64Array(n), im: new Float64Array(n) };
    const [dr, di] = cascadeDerivative(sections, omega[i]);
    // d/dw (g H e^{-j w D}) = g H' e^{-j w D} where H = 0.
    const c = Math.cos(omega[i] * delaySamples);
    const s = -Math.sin(omega[i] * delaySamples);
    r.derivativeAtZero.re[i] = gain * (dr * c - di * s);
    r.derivativeAtZero.im[i] = gain * (dr * s + di * c);
  }
  return r;
}

/**
 * dH/dw of a cascade at one w by the product rule, sum over k of H_k' times the other sections
 * (no logarithmic derivative, so it holds where a section is exactly 0). Used only at such points.
 */
function cascadeDerivative(sections: readonly Section[], w: number): [number, number] {
  const c1 = Math.cos(w);
  const s1 = Math.sin(w);
  const c2 = c1 * c1 - s1 * s1;
  const s2 = 2 * s1 * c1;
  // Running product P of the sections so far and its derivative Q.
  let pr = 1;
  let pi = 0;
  let qr = 0;
  let qi = 0;
  for (const x of sections) {
    const nr = x.b0 + x.b1 * c1 + x.b2 * c2;
    const ni = -(x.b1 * s1 + x.b2 * s2);
    const dr = 1 + x.a1 * c1 + x.a2 * c2;
    const di = -(x.a1 * s1 + x.a2 * s2);
    // dN/dw = -j (b1 z^-1 + 2 b2 z^-2), dD/dw likewise.
    const npr = -(x.b1 * s1 + 2 * x.b2 * s2);
    const npi = -(x.b1 * c1 + 2 * x.b2 * c2);
    const dpr = -(x.a1 * s1 + 2 * x.a2 * s2);
    const dpi = -(x.a1 * c1 + 2 * x.a2 * c2);
    const d2 = dr * dr + di * di;
    // H = N / D, H' = (N' D - N D') / D^2
    const hr = (nr * dr + ni * di) / d2;
    const hi = (ni * dr - nr * di) / d2;
    const ur = npr * dr - npi * di - (nr * dpr - ni * dpi);
    const ui = npr * di + npi * dr - (nr * dpi + ni * dpr);
    const d4 = d2 * d2;
    const cr = dr * dr - di * di; // conj(D)^2 = (dr - j di)^2
    const ci = -2 * dr * di;
    const hpr = (ur * cr - ui * ci) / d4;
    const hpi = (ur * ci + ui * cr) / d4;
    // (P H)' = Q H + P H'
    const nqr = qr * hr - qi * hi + pr * hpr - pi * hpi;
    const nqi = qr * hi + qi * hr + pr * hpi + pi * hpr;
    const npr2 = pr * hr - pi * hi;
    pi = pr * hi + pi * hr;
    pr = npr2;
    qr = nqr;
    qi = nqi;
  }
  return [qr, qi];
}

export function outputResponse(out: DesignedOutput, omega: Float64Array, sampleRateHz: number): ResponseCurves {
  return cascadeWithGainDelay(out.sections, out.gain, out.delaySamplesExact, omega, sampleRateHz);
}

/**
 * The complex sum of responses (all already including gain, polarity and delay), with its exact
 * group delay, presented. Returns a response of -Infinity dB everywhere when `parts` is empty.
 */
export function sumResponses(parts: readonly ResponseCurves[], omega: Float64Array, sampleRateHz: number): ResponseCurves {
  const sum = allocateComplexResponse(omega.length);
  sumComplex(parts, omega.length, sum);
  return presentCurves(sum, sampleRateHz);
}

export interface PlanResponse {
  frequenciesHz: Float64Array;
  outputs: { id: string; mute: boolean; response: ResponseCurves }[];
  sum: ResponseCurves;
}

/** Every output's response (muted ones too, flagged) and the sum of the unmuted ones. */
export function designedResponse(outputs: readonly DesignedOutput[], frequenciesHz: ArrayLike<number>, sampleRateHz: number): PlanResponse {
  const freqs = Float64Array.from(frequenciesHz);
  const omega = normalizedOmega(freqs, sampleRateHz);
  const rs = outputs.map((o) => ({ id: o.id, mute: o.mute, response: outputResponse(o, omega, sampleRateHz) }));
  const sum = sumResponses(
    rs.filter((r) => !r.mute).map((r) => r.response),
    omega,
    sampleRateHz,
  );
  return { frequenciesHz: freqs, outputs: rs, sum };
}

/** n log-spaced frequencies from `fromHz` to `toHz` inclusive. */
export function logFrequencies(n: number, fromHz: number, toHz: number): Float64Array {
  const out = new Float64Array(n);
  if (n === 1) {
    out[0] = fromHz;
    return out;
  }
  const l0 = Math.log(fromHz);
  const step = (Math.log(toHz) - l0) / (n - 1);
  for (let i = 0; i < n; i++) out[i] = Math.exp(l0 + i * step);
  // Both ends exactly as asked (exp(log(50)) is 49.99999999999999).
  out[0] = fromHz;
  out[n - 1] = toHz;
  return out;
}
