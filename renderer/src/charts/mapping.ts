/**
 * Value <-> pixel mapping of one plot axis, and the reduction of a curve to at most four points
 * per pixel column. Pure (no DOM): the plot adapter draws with it, the drag overlay draws with
 * it, and the gestures turn pointer positions back into values with it, so every layer agrees
 * on where a value sits.
 *
 * The mapper is built once per redraw, outside the drawing loop, as uPlot does: a log axis maps
 * ln(v), a linear axis maps v, both as `p0 + (t(v) - t(min)) * k`.
 */
export type AxisKind = 'log' | 'linear';

export interface AxisMap {
  readonly kind: AxisKind;
  readonly min: number;
  readonly max: number;
  /** Pixel of `min` and of `max` (for a y axis p0 is the bottom: p0 > p1). */
  readonly p0: number;
  readonly p1: number;
  toPixel(v: number): number;
  toValue(px: number): number;
}

export function axisMap(kind: AxisKind, min: number, max: number, p0: number, p1: number): AxisMap {
  const log = kind === 'log';
  const t0 = log ? Math.log(min) : min;
  const span = (log ? Math.log(max) : max) - t0;
  const k = span === 0 ? 0 : (p1 - p0) / span;
  const ik = k === 0 ? 0 : 1 / k;
  return {
    kind,
    min,
    max,
    p0,
    p1,
    toPixel: log ? (v) => p0 + (Math.log(v) - t0) * k : (v) => p0 + (v - t0) * k,
    toValue: log ? (px) => Math.exp(t0 + (px - p0) * ik) : (px) => t0 + (px - p0) * ik,
  };
}

/**
 * A new [min, max] for a wheel zoom about the value under `px`: the window shrinks (factor < 1)
 * or grows about that point in the axis's own space (log for frequency), so the value under the
 * pointer stays under it.
 */
export function zoomAbout(map: AxisMap, px: number, factor: number): [number, number] {
  const at = map.toValue(px);
  if (map.kind === 'log') return [at * Math.pow(map.min / at, factor), at * Math.pow(map.max / at, factor)];
  return [at + (map.min - at) * factor, at + (map.max - at) * factor];
}

/** A new [min, max] after dragging the plot by `dpx` pixels along this axis. */
export function panBy(map: AxisMap, dpx: number): [number, number] {
  return [map.toValue(map.p0 - dpx), map.toValue(map.p1 - dpx)];
}

/**
 * Pixel polyline of a curve, at most four points per pixel column (first, lowest, highest and
 * last sample that land in it, in order), so a curve of 65 536 samples costs about what one of
 * a few hundred does and no peak is lost. A non-finite sample (Chart.js's convention too) breaks
 * the line: it is written as NaN and the drawing lifts the pen there. y pixels are clamped to a
 * band around the plot so a huge value does not overflow the canvas's path arithmetic.
 *
 * Writes into `out` (x, y pairs; grown when too small) and returns it with the point count.
 */
export function columnPath(
  xs: Float64Array,
  ys: Float64Array,
  yScale: number,
  xMap: AxisMap,
  yMap: AxisMap,
  out?: Float32Array,
): { path: Float32Array; count: number } {
  const n = Math.min(xs.length, ys.length);
  let path = out ?? new Float32Array(2 * Math.min(4 * n + 2, 4 * Math.ceil(Math.abs(xMap.p1 - xMap.p0) + 2) + 16));
  let count = 0;
  const yLo = Math.min(yMap.p0, yMap.p1) - 4000;
  const yHi = Math.max(yMap.p0, yMap.p1) + 4000;
  const push = (x: number, y: number) => {
    if (2 * count + 2 > path.length) {
      const bigger = new Float32Array(path.length * 2);
      bigger.set(path);
      path = bigger;
    }
    path[2 * count] = x;
    path[2 * count + 1] = y;
    count++;
  };
  let col = NaN;
  let firstY = 0;
  let minY = 0;
  let maxY = 0;
  let lastY = 0;
  let colX = 0;
  let open = false;
  const flush = () => {
    if (!open) return;
    // First, the extremes, then last: the line enters and leaves the column where the data does
    // and covers every value in between (the order of the two extremes inside one pixel column
    // does not show).
    push(colX, firstY);
    if (minY !== firstY && minY !== lastY) push(colX, minY);
    if (maxY !== firstY && maxY !== lastY && maxY !== minY) push(colX, maxY);
    if (lastY !== firstY) push(colX, lastY);
    open = false;
  };
  for (let i = 0; i < n; i++) {
    const v = ys[i] * yScale;
    if (!Number.isFinite(v) || !Number.isFinite(xs[i])) {
      flush();
      if (count > 0 && !Number.isNaN(path[2 * count - 1])) push(NaN, NaN);
      col = NaN;
      continue;
    }
    const x = xMap.toPixel(xs[i]);
    const y = Math.min(yHi, Math.max(yLo, yMap.toPixel(v)));
    const c = Math.round(x);
    if (open && c === col) {
      if (y < minY) minY = y;
      if (y > maxY) maxY = y;
      lastY = y;
      continue;
    }
    flush();
    col = c;
    // Within one column the points keep the first sample's x: the column is one pixel wide.
    colX = x;
    firstY = minY = maxY = lastY = y;
    open = true;
  }
  flush();
  return { path, count };
}

/** Whole steps of 1, 2, 2.5 or 5 × 10^k, about `target` of them across `span`. */
export function niceStep(span: number, target = 6): number {
  const raw = span / target;
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

/**
 * The finite extent of curves (each times its scale), rounded out to whole nice steps; a flat or
 * empty set gets `fallback`. Used for axes that follow their data (Time view, quantized chart).
 */
export function niceRange(curves: readonly { y: Float64Array; yScale?: number }[], fallback: [number, number], limit = Infinity): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const c of curves) {
    const s = c.yScale ?? 1;
    for (let i = 0; i < c.y.length; i++) {
      const v = c.y[i] * s;
      if (Number.isFinite(v) && Math.abs(v) <= limit) {
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    }
  }
  if (!Number.isFinite(lo)) return fallback;
  if (hi - lo < 1e-12) {
    const pad = Math.max(Math.abs(hi) * 0.1, 0.1);
    lo -= pad;
    hi += pad;
  }
  const step = niceStep((hi - lo) * 1.06);
  return [Math.floor(lo / step - 0.03) * step, Math.ceil(hi / step + 0.03) * step];
}

/** Linear interpolation of `y` at `f` on a log-frequency grid. */
export function valueAt(freqs: Float64Array, y: Float64Array, f: number): number {
  const n = freqs.length;
  if (n === 0) return NaN;
  if (f <= freqs[0]) return y[0];
  if (f >= freqs[n - 1]) return y[n - 1];
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (freqs[mid] <= f) lo = mid;
    else hi = mid;
  }
  const t = Math.log(f / freqs[lo]) / Math.log(freqs[hi] / freqs[lo]);
  return y[lo] + t * (y[hi] - y[lo]);
}

/** The index of the grid point nearest to `f` (in log frequency). */
export function nearestIndex(freqs: Float64Array, f: number): number {
  const n = freqs.length;
  if (n < 2) return 0;
  const lf = Math.log(f);
  // Grids are log-spaced: a direct estimate, then a local check.
  const est = Math.round(((lf - Math.log(freqs[0])) / (Math.log(freqs[n - 1]) - Math.log(freqs[0]))) * (n - 1));
  let best = 0;
  let bestD = Infinity;
  for (let i = Math.max(0, est - 2); i <= Math.min(n - 1, est + 2); i++) {
    const d = Math.abs(Math.log(freqs[i]) - lf);
    if (d < bestD) {
      bestD = d;
      best = i;
    }
  }
  return best;
}
