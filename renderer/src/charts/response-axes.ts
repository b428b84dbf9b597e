/**
 * The y-axis policy of the three response plots: which range each shows for a set of curves,
 * and, for group delay, which peaks fall outside that range (drawn as marks at the edge, so a
 * clipped spike is never silent).
 */
import { niceStep } from './mapping';

const RAD_TO_DEG = 180 / Math.PI;

/** Tick step of the magnitude axis: at most 8 steps over the shown span. */
export function magnitudeStep(range: [number, number]): number {
  const span = range[1] - range[0];
  return [1, 2, 3, 6, 12, 24, 48].find((s) => span / s <= 8) ?? 48;
}

/** Tick step of the phase axis: quarter turns when wrapped, whole half-turns multiples when not. */
export function phaseStep(range: [number, number], wrapped: boolean): number {
  if (wrapped) return 90;
  const span = range[1] - range[0];
  return [180, 360, 720, 1440, 2880, 5760].find((s) => span / s <= 6) ?? 11520;
}

/**
 * A y range for group delay. Robust (default): the 2nd to 98th percentile, so the spikes of
 * notches and narrow cuts do not squash every other curve (the clipped peaks are marked). Full:
 * every finite value.
 */
export function groupDelayRange(curves: readonly Float64Array[], full = false): [number, number] {
  let n = 0;
  for (const c of curves) n += c.length;
  const all = new Float64Array(n);
  let k = 0;
  for (const c of curves) for (let i = 0; i < c.length; i++) if (Number.isFinite(c[i])) all[k++] = c[i];
  if (k === 0) return [-1, 5];
  const v = all.subarray(0, k).sort();
  const lo = Math.min(0, full ? v[0] : v[Math.floor(0.02 * (k - 1))]);
  const hi = Math.max(1, full ? v[k - 1] : v[Math.ceil(0.98 * (k - 1))]);
  const step = niceStep(hi - lo);
  // Whole steps, so the axis ends on labelled ticks; a step below zero keeps 0 ms off the edge.
  const min = Math.floor(lo / step) * step;
  return [min === 0 ? -step : min, Math.ceil((hi * 1.08) / step) * step];
}

export function unwrappedPhaseRange(curves: readonly Float64Array[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const c of curves)
    for (let i = 0; i < c.length; i++) {
      const d = c[i] * RAD_TO_DEG;
      if (Number.isFinite(d)) {
        if (d < lo) lo = d;
        if (d > hi) hi = d;
      }
    }
  if (!Number.isFinite(lo)) return [-180, 180];
  // Whole half-turns, so the ends are labelled ticks.
  const a = Math.floor(lo / 180) * 180;
  const b = Math.ceil(hi / 180) * 180;
  return b - a < 360 ? [a - 180, b + 180] : [a, b];
}

export interface ClippedPeak {
  /** Index of the grid point of the peak. */
  index: number;
  value: number;
  side: 'above' | 'below';
}

/**
 * The peaks of `y` outside [lo, hi]: one per run of points beyond an edge (the farthest point of
 * the run), so a narrow notch's spike gives one mark, not dozens.
 */
export function clippedPeaks(y: Float64Array, lo: number, hi: number): ClippedPeak[] {
  const out: ClippedPeak[] = [];
  let run: ClippedPeak | null = null;
  for (let i = 0; i < y.length; i++) {
    const v = y[i];
    const side = !Number.isFinite(v) ? null : v > hi ? 'above' : v < lo ? 'below' : null;
    if (side === null || (run && run.side !== side)) {
      if (run) out.push(run);
      run = null;
    }
    if (side === null) continue;
    if (!run) run = { index: i, value: v, side };
    else if (side === 'above' ? v > run.value : v < run.value) {
      run.index = i;
      run.value = v;
    }
  }
  if (run) out.push(run);
  return out;
}
