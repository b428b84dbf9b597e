/**
 * The worst-case peak: the largest output of a chain for ANY input bounded by full scale,
 * |x[n]| <= 1. The tight bound is the L1 norm of the impulse response, max |y| = sum |h[n]|
 * (bounded-input, bounded-output stability; A. V. Oppenheim and R. W. Schafer, "Discrete-Time
 * Signal Processing", section on stability; docs/references.md, "Headroom and the worst-case
 * peak"), reached by the input x[n] = sign(h[N - n]). It is never below the sine peak: a
 * Linkwitz-Riley high-pass whose sine gain never exceeds 0 dB still rings above full scale on a
 * square wave or a kick drum.
 *
 * The impulse response is run through the cascade's difference equations (transposed direct form
 * II, as time.ts) in blocks; the sum stops when a whole block adds less than TAIL_FRACTION of the
 * total after the slowest pole's time constant has passed, or at MAX_SAMPLES (or MAX_WORK samples times
 * sections; then `complete` is false and the figure is a lower bound, printed "at least").
 */
import type { Section } from '../design/section';
import { largestPoleRadius } from './poles';

export interface WorstCase {
  /** 20 log10 (sum |h|), gain included; +Infinity for an unstable chain. */
  peakDb: number;
  /** sum |h[n]| (linear). */
  l1: number;
  /** Samples summed. */
  samples: number;
  /** False when the sum stopped at its limit before the tail died out (a lower bound). */
  complete: boolean;
}

/** A block adding less than this fraction of the sum ends it (1e-8: the figure within 1e-7 dB). */
export const TAIL_FRACTION = 1e-8;
export const MAX_SAMPLES = 1 << 22;
/** Samples times sections summed at most (some 10 ms): a long cascade stops sooner, its figure then a lower bound. */
export const MAX_WORK = 1 << 23;

export function worstCasePeak(sections: readonly Section[], gain: number): WorstCase {
  const g = Math.abs(gain);
  if (sections.length === 0) return { peakDb: 20 * Math.log10(g), l1: g, samples: 1, complete: true };
  const r = largestPoleRadius(sections);
  if (!(r < 1)) return { peakDb: Infinity, l1: Infinity, samples: 0, complete: true };
  // Time constant of the slowest pole in samples; a block is at least that long.
  const tau = Math.min(MAX_SAMPLES, Math.ceil(1 / Math.max(1 - r, 1 / MAX_SAMPLES)));
  const block = Math.max(256, Math.min(tau, 65536));
  const n = sections.length;
  const s1 = new Float64Array(n);
  const s2 = new Float64Array(n);
  const coef = new Float64Array(5 * n);
  sections.forEach((s, k) => coef.set([s.b0, s.b1, s.b2, s.a1, s.a2], 5 * k));
  let total = 0;
  let t = 0;
  let complete = false;
  const limit = Math.max(block, Math.min(MAX_SAMPLES, Math.floor(MAX_WORK / n)));
  while (t < limit) {
    let part = 0;
    for (let i = 0; i < block; i++, t++) {
      let x = t === 0 ? 1 : 0;
      for (let k = 0; k < n; k++) {
        const o = 5 * k;
        const y = coef[o] * x + s1[k];
        s1[k] = coef[o + 1] * x - coef[o + 3] * y + s2[k];
        s2[k] = coef[o + 2] * x - coef[o + 4] * y;
        x = y;
      }
      part += Math.abs(x);
    }
    total += part;
    if (!Number.isFinite(total)) break;
    if (t >= 2 * tau && part <= TAIL_FRACTION * total) {
      complete = true;
      break;
    }
  }
  const l1 = total * g;
  return { peakDb: 20 * Math.log10(l1), l1, samples: t, complete: complete && Number.isFinite(l1) };
}
