/**
 * Responses of designed outputs and of their complex (acoustic) sum, on any frequency list.
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
import { allocateKernelOutput, cascadeResponse, normalizedOmega } from './kernel';

/** Magnitude below which phase and group delay carry no information (the CLI writes null). */
export const MAGNITUDE_FLOOR_DB = -200;

export interface Response {
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
  derivativeAtZero?: { re: Float64Array; im: Float64Array };
}

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

/**
 * The response of a cascade with a linear gain and a delay of `delaySamples` at sample rate fs.
 * `omega` is 2 pi f / fs for each frequency (see `normalizedOmega`).
 */
export function cascadeWithGainDelay(
  sections: readonly Section[],
  gain: number,
  delaySamples: number,
  omega: Float64Array,
  sampleRateHz: number,
): Response {
  const n = omega.length;
  const k = allocateKernelOutput(n);
  cascadeResponse(packSections(sections), sections.length, omega, k);
  const gainDb = 20 * Math.log10(Math.abs(gain));
  const flip = gain < 0 ? Math.PI : 0;
  const filterPhase = new Float64Array(n);
  const phaseRad = new Float64Array(n);
  const groupDelayMs = new Float64Array(n);
  const groupDelaySamples = new Float64Array(n);
  const msPerSample = 1000 / sampleRateHz;
  for (let i = 0; i < n; i++) {
    k.magnitudeDb[i] += gainDb; // -Infinity for a gain of 0
    filterPhase[i] = wrapPi(k.phaseRad[i] + flip);
    phaseRad[i] = wrapPi(filterPhase[i] - omega[i] * delaySamples);
    groupDelaySamples[i] = k.groupDelaySamples[i] + delaySamples;
    groupDelayMs[i] = k.magnitudeDb[i] < MAGNITUDE_FLOOR_DB ? NaN : groupDelaySamples[i] * msPerSample;
  }
  const phaseUnwrappedRad = new Float64Array(n);
  unwrapInto(filterPhase, phaseUnwrappedRad);
  for (let i = 0; i < n; i++) phaseUnwrappedRad[i] -= omega[i] * delaySamples;
  const r: Response = { magnitudeDb: k.magnitudeDb, phaseRad, phaseUnwrappedRad, groupDelayMs, logSlope: k.logSlope, groupDelaySamples };
  for (let i = 0; i < n; i++) {
    if (k.magnitudeDb[i] !== -Infinity || gain === 0) continue;
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

export function outputResponse(out: DesignedOutput, omega: Float64Array, sampleRateHz: number): Response {
  return cascadeWithGainDelay(out.sections, out.gain, out.delaySamplesExact, omega, sampleRateHz);
}

/**
 * The complex sum of responses (all already including gain, polarity and delay), with its exact
 * group delay. Returns a response of -Infinity dB everywhere when `parts` is empty.
 */
export function sumResponses(parts: readonly Response[], omega: Float64Array, sampleRateHz: number): Response {
  const n = omega.length;
  const magnitudeDb = new Float64Array(n);
  const phaseRad = new Float64Array(n);
  const groupDelayMs = new Float64Array(n);
  const logSlope = new Float64Array(n);
  const groupDelaySamples = new Float64Array(n);
  const msPerSample = 1000 / sampleRateHz;
  for (let i = 0; i < n; i++) {
    let sr = 0;
    let si = 0;
    let dr = 0;
    let di = 0;
    for (const p of parts) {
      const m = Math.pow(10, p.magnitudeDb[i] / 20);
      if (m === 0) {
        // An exact zero adds nothing to the sum but still its derivative.
        if (p.derivativeAtZero) {
          dr += p.derivativeAtZero.re[i];
          di += p.derivativeAtZero.im[i];
        }
        continue;
      }
      const hr = m * Math.cos(p.phaseRad[i]);
      const hi = m * Math.sin(p.phaseRad[i]);
      sr += hr;
      si += hi;
      // d(c H)/dw = c H (slope - j tau), tau in samples including the delay (unmasked: a part
      // below the magnitude floor still adds its derivative, as it adds its value).
      const tauSamples = p.groupDelaySamples[i];
      const a = p.logSlope[i];
      if (!Number.isFinite(tauSamples)) continue;
      dr += hr * a + hi * tauSamples;
      di += hi * a - hr * tauSamples;
    }
    const s2 = sr * sr + si * si;
    magnitudeDb[i] = 10 * Math.log10(s2);
    phaseRad[i] = wrapPi(Math.atan2(si, sr));
    // S'/S = (dr + j di)(sr - j si) / |S|^2; tau = -Im(S'/S), slope = Re(S'/S).
    const tau = -(di * sr - dr * si) / s2;
    logSlope[i] = (dr * sr + di * si) / s2;
    groupDelaySamples[i] = tau;
    groupDelayMs[i] = magnitudeDb[i] < MAGNITUDE_FLOOR_DB ? NaN : tau * msPerSample;
  }
  const phaseUnwrappedRad = new Float64Array(n);
  unwrapInto(phaseRad, phaseUnwrappedRad);
  return { magnitudeDb, phaseRad, phaseUnwrappedRad, groupDelayMs, logSlope, groupDelaySamples };
}

export interface PlanResponse {
  frequenciesHz: Float64Array;
  outputs: { id: string; mute: boolean; response: Response }[];
  sum: Response;
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
