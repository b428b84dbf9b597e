/**
 * The true peak of |H(e^jw)| of a cascade over 0 Hz .. Nyquist, whatever its sharpness.
 *
 * A fixed grid misses a narrow resonance: a Q 1000 peaking band is about f0 / Q wide (1.2 Hz at
 * 1.2 kHz), so a 1024-point log grid over the audio band steps over it and reports a shelf's gain
 * instead. The resonances of a rational H sit near its poles' angles, so the search evaluates
 *   - both ends, 0 Hz and Nyquist, exactly;
 *   - a log grid from 1e-7 fs to Nyquist and a linear grid over 0 .. Nyquist;
 *   - around every pole angle theta (radius r), points at theta +- (1 - r) k for k from 1/8 to 64
 *     (a pole at radius r makes a peak about 2 (1 - r) radians wide);
 *   - around every frequency the caller names (band centres, crossover edges) likewise;
 * then refines the best local maxima by golden-section search between their neighbouring points.
 * A non-finite value (a pole on the unit circle) is the peak: the gain there is unbounded.
 */
import { packSections, type Section } from '../design/section';
import { allocateKernelOutput, cascadeResponse } from '../response/kernel';
import { sectionPoles } from './poles';

export interface Peak {
  /** Largest 20 log10 |H| in dB (gain included); +Infinity where a pole lies on the unit circle. */
  peakDb: number;
  /** Where, in Hz (0 .. Nyquist). */
  frequencyHz: number;
}

/** The audio band a peak is reported against ("outside 20 Hz - 20 kHz"). */
export const AUDIO_BAND_HZ: readonly [number, number] = [20, 20000];

const LOG_POINTS = 1024;
const LIN_POINTS = 512;
const LOG_LOWEST_FRACTION = 1e-7;
/** Offsets around a pole or named frequency, in units of its width (1 - r, or a relative 1e-4). */
const LOCAL_STEPS = [0.125, 0.25, 0.5, 1, 2, 4, 8, 16, 64];
/** How many of the best local maxima are refined, and how far below the best one they may lie. */
const REFINED = 6;
/**
 * Near a pole the candidates lie 1/8 of the peak's width apart, where a resonance is within
 * 10 log10(1 + 1/256) = 0.017 dB of its top; away from poles |H| changes slowly. A local maximum
 * more than 0.5 dB below the best candidate cannot rise above it when refined.
 */
const REFINE_WITHIN_DB = 0.5;
/** Golden-section search stops at this bracket width relative to w (1e-11: 1e-14 dB at a Q 1000 peak). */
const REFINE_RELATIVE_WIDTH = 1e-11;

/** True when `frequencyHz` lies outside 20 Hz .. 20 kHz. */
export function outsideAudioBand(frequencyHz: number): boolean {
  return !(frequencyHz >= AUDIO_BAND_HZ[0] && frequencyHz <= AUDIO_BAND_HZ[1]);
}

/** The angles (radians per sample, 0 .. pi) where |H| is evaluated before refinement. */
export function candidateOmegas(sections: readonly Section[], sampleRateHz: number, hintsHz: readonly number[] = []): Float64Array {
  const w: number[] = [0, Math.PI];
  const lo = Math.log(2 * Math.PI * LOG_LOWEST_FRACTION);
  const step = (Math.log(Math.PI) - lo) / (LOG_POINTS - 1);
  for (let i = 0; i < LOG_POINTS; i++) w.push(Math.exp(lo + i * step));
  for (let i = 1; i < LIN_POINTS; i++) w.push((Math.PI * i) / LIN_POINTS);
  const around = (theta: number, width: number) => {
    w.push(theta);
    for (const k of LOCAL_STEPS) w.push(theta - k * width, theta + k * width);
  };
  for (const s of sections) {
    for (const p of sectionPoles(s)) {
      const r = Math.hypot(p.re, p.im);
      if (!Number.isFinite(r)) continue;
      around(Math.abs(Math.atan2(p.im, p.re)), Math.max(Math.abs(1 - r), 1e-12));
    }
  }
  for (const f of hintsHz) {
    const theta = (2 * Math.PI * f) / sampleRateHz;
    if (Number.isFinite(theta)) around(theta, Math.max(theta * 1e-4, 1e-12));
  }
  const inRange = w.filter((x) => x >= 0 && x <= Math.PI).sort((a, b) => a - b);
  const out: number[] = [];
  for (const x of inRange) if (out.length === 0 || x > out[out.length - 1]) out.push(x);
  return Float64Array.from(out);
}

/** The largest |H| of `sections` times |gain| over 0 Hz .. Nyquist; `hintsHz` are frequencies worth a close look. */
export function peakSearch(sections: readonly Section[], gain: number, sampleRateHz: number, hintsHz: readonly number[] = []): Peak {
  const gainDb = 20 * Math.log10(Math.abs(gain));
  if (sections.length === 0) return { peakDb: gainDb, frequencyHz: 0 };
  const omega = candidateOmegas(sections, sampleRateHz, hintsHz);
  const k = allocateKernelOutput(omega.length);
  const packed = packSections(sections);
  cascadeResponse(packed, sections.length, omega, k);
  const p = refine(packed, sections.length, omega, k.magnitudeDb, sampleRateHz);
  return { peakDb: p.peakDb + gainDb, frequencyHz: p.frequencyHz };
}

/**
 * The peak of every partial cascade: sections 1, 1..2, ..., 1..N (the nodes of a board's
 * cascade). One candidate set for all (every section's poles: a superset never hurts) and one
 * pass per section, the partial cascades' dB summed as they grow; each is then refined alone.
 */
export function prefixPeakSearch(sections: readonly Section[], sampleRateHz: number): Peak[] {
  const omega = candidateOmegas(sections, sampleRateHz);
  const k = allocateKernelOutput(omega.length);
  const acc = new Float64Array(omega.length);
  const packed = packSections(sections);
  const out: Peak[] = [];
  for (let s = 0; s < sections.length; s++) {
    cascadeResponse(packed.subarray(s * 5, s * 5 + 5), 1, omega, k);
    for (let i = 0; i < omega.length; i++) acc[i] += k.magnitudeDb[i];
    out.push(refine(packed, s + 1, omega, acc, sampleRateHz));
  }
  return out;
}

/** The best candidate of `m` (dB at `omega`), refined by golden-section search around the best local maxima. */
function refine(packed: Float64Array, n: number, omega: Float64Array, m: Float64Array, sampleRateHz: number): Peak {
  const toHz = (w: number) => (w * sampleRateHz) / (2 * Math.PI);
  // A NaN (0/0 at a pole-zero pair exactly on the circle) says nothing; +Infinity is a pole on the circle.
  const value = (i: number) => (Number.isNaN(m[i]) ? -Infinity : m[i]);
  let best = 0;
  for (let i = 1; i < omega.length; i++) if (value(i) > value(best)) best = i;
  if (value(best) === Infinity) return { peakDb: Infinity, frequencyHz: toHz(omega[best]) };

  const one = allocateKernelOutput(1);
  const w1 = new Float64Array(1);
  const at = (w: number): number => {
    w1[0] = w;
    cascadeResponse(packed, n, w1, one);
    return Number.isNaN(one.magnitudeDb[0]) ? -Infinity : one.magnitudeDb[0];
  };
  // Local maxima, best first.
  const maxima: number[] = [];
  for (let i = 0; i < omega.length; i++) {
    const v = value(i);
    if ((i === 0 || v >= value(i - 1)) && (i === omega.length - 1 || v >= value(i + 1))) maxima.push(i);
  }
  maxima.sort((a, b) => value(b) - value(a));
  let peak = value(best);
  let where = omega[best];
  const g = (Math.sqrt(5) - 1) / 2;
  const worthRefining = maxima.slice(0, REFINED).filter((i) => value(i) >= value(best) - REFINE_WITHIN_DB);
  for (const i of worthRefining) {
    let a = omega[Math.max(0, i - 1)];
    let b = omega[Math.min(omega.length - 1, i + 1)];
    let c = b - g * (b - a);
    let d = a + g * (b - a);
    let fc = at(c);
    let fd = at(d);
    for (let it = 0; it < 80 && b - a > REFINE_RELATIVE_WIDTH * Math.max(b, 1e-9); it++) {
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
    for (const [x, v] of [
      [c, fc],
      [d, fd],
    ]) {
      if (v > peak) {
        peak = v;
        where = x;
      }
    }
  }
  // The grid value came from summed dB (prefix search) or the cascade: report the cascade's own.
  if (where === omega[best] && Number.isFinite(peak)) peak = at(where);
  return { peakDb: peak, frequencyHz: toHz(where) };
}
