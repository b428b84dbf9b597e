// The pixel mapping shared by the plot adapter, its overlay and the gestures, and the reduction of
// a curve to at most four points per pixel column (the approach of uPlot's line paths: first,
// lowest, highest and last sample per column).
import { describe, expect, it } from 'vitest';
import { axisMap, columnPath, nearestIndex, niceRange, panBy, valueAt, zoomAbout } from '../../../renderer/src/charts/mapping';
import { clippedPeaks, groupDelayRange } from '../../../renderer/src/charts/response-axes';
import { dragDelta, nudgeForKey } from '../../../renderer/src/charts/gestures';

describe('axisMap', () => {
  it('puts each decade of a log axis on the same number of pixels (20 Hz..20 kHz over 900 px: 300 px a decade)', () => {
    const m = axisMap('log', 20, 20000, 100, 1000);
    expect(m.toPixel(20)).toBeCloseTo(100, 9);
    expect(m.toPixel(200)).toBeCloseTo(400, 9);
    expect(m.toPixel(2000)).toBeCloseTo(700, 9);
    expect(m.toValue(850)).toBeCloseTo(20 * Math.pow(10, 2.5), 6);
  });
  it('maps a y axis bottom-up and inverts exactly', () => {
    const m = axisMap('linear', -30, 12, 400, 8);
    expect(m.toPixel(-30)).toBe(400);
    expect(m.toPixel(12)).toBeCloseTo(8, 12);
    for (const v of [-29.5, -3, 0, 11.9]) expect(m.toValue(m.toPixel(v))).toBeCloseTo(v, 12);
  });
  it('zooms about the value under the pointer and pans by whole pixels', () => {
    const m = axisMap('log', 20, 20000, 0, 900);
    const [a, b] = zoomAbout(m, 300, 0.8);
    // 200 Hz sat at 300 px and stays there in the new window.
    expect(axisMap('log', a, b, 0, 900).toPixel(200)).toBeCloseTo(300, 9);
    expect(Math.log(b / a)).toBeCloseTo(0.8 * Math.log(1000), 12);
    const [c, d] = panBy(m, 300); // dragged right one decade: the window moves down one decade
    expect(c).toBeCloseTo(2, 9);
    expect(d).toBeCloseTo(2000, 6);
  });
});

describe('columnPath', () => {
  const xMap = axisMap('linear', 0, 100, 0, 100);
  const yMap = axisMap('linear', -1, 1, 100, 0);
  it('keeps every point when there is at most one a column', () => {
    const xs = Float64Array.from({ length: 101 }, (_, i) => i);
    const ys = Float64Array.from(xs, (x) => Math.sin(x / 10));
    const { path, count } = columnPath(xs, ys, 1, xMap, yMap);
    expect(count).toBe(101);
    for (let i = 0; i < 101; i++) expect(path[2 * i + 1]).toBeCloseTo(yMap.toPixel(ys[i]), 4);
  });
  it('reduces 100 000 samples to at most four a column and keeps every peak', () => {
    const n = 100_000;
    const xs = Float64Array.from({ length: n }, (_, i) => (i / (n - 1)) * 100);
    // A fast oscillation with one spike: a decimation by striding would miss the spike.
    const ys = Float64Array.from(xs, (_, i) => (i === 54_321 ? 0.99 : 0.5 * Math.sin(i * 0.37)));
    const { path, count } = columnPath(xs, ys, 1, xMap, yMap);
    expect(count).toBeLessThanOrEqual(4 * 101);
    let top = Infinity;
    for (let i = 0; i < count; i++) top = Math.min(top, path[2 * i + 1]);
    expect(top).toBeCloseTo(yMap.toPixel(0.99), 3);
  });
  it('lifts the pen at a non-finite value (an exact zero in dB) instead of drawing through it', () => {
    const xs = Float64Array.of(10, 20, 30, 40);
    const ys = Float64Array.of(0, -Infinity, NaN, 0.5);
    const { path, count } = columnPath(xs, ys, 1, xMap, yMap);
    expect(count).toBe(3);
    expect(Number.isNaN(path[2])).toBe(true);
    expect(path[4]).toBeCloseTo(40, 5);
  });
  it('applies the scale (radians drawn as degrees) without a copy', () => {
    const { path } = columnPath(Float64Array.of(50), Float64Array.of(Math.PI / 2), 180 / Math.PI, xMap, axisMap('linear', -180, 180, 360, 0));
    expect(path[1]).toBeCloseTo(90, 4);
  });
});

describe('grid helpers', () => {
  const f = Float64Array.from({ length: 301 }, (_, i) => 20 * Math.pow(1000, i / 300));
  it('finds the nearest grid point and interpolates along log frequency', () => {
    expect(nearestIndex(f, 200)).toBe(100);
    const y = Float64Array.from(f, (x) => Math.log10(x));
    expect(valueAt(f, y, 1000)).toBeCloseTo(3, 9);
  });
  it('niceRange rounds a curve out to whole steps and survives an empty set', () => {
    const [a, b] = niceRange([{ y: Float64Array.of(-0.31, 0.93) }], [-1, 1]);
    expect(a).toBeLessThanOrEqual(-0.31);
    expect(b).toBeGreaterThanOrEqual(0.93);
    expect(niceRange([{ y: Float64Array.of(NaN) }], [-1, 1])).toEqual([-1, 1]);
  });
});

describe('group delay axis', () => {
  it('marks each spike beyond the robust range once, at its farthest point', () => {
    const y = new Float64Array(200).fill(1);
    for (let i = 50; i < 53; i++) y[i] = 10 + i; // a notch's spike, 3 points wide (1.5 % of the curve)
    y[120] = -40;
    const [lo, hi] = groupDelayRange([y]);
    expect(hi).toBeLessThan(60);
    const peaks = clippedPeaks(y, lo, hi);
    expect(peaks).toEqual([
      { index: 52, value: 62, side: 'above' },
      { index: 120, value: -40, side: 'below' },
    ]);
    const [flo, fhi] = groupDelayRange([y], true);
    expect(clippedPeaks(y, flo, fhi)).toEqual([]);
  });
});

describe('gestures', () => {
  it('maps keys to nudges: arrows frequency and gain, Page Up/Down Q, Shift for the large step', () => {
    expect(nudgeForKey({ key: 'ArrowRight', shiftKey: false })).toEqual({ what: 'frequency', direction: 1, large: false });
    expect(nudgeForKey({ key: 'ArrowDown', shiftKey: true })).toEqual({ what: 'gain', direction: -1, large: true });
    expect(nudgeForKey({ key: 'PageUp', shiftKey: false })).toEqual({ what: 'q', direction: 1, large: false });
    expect(nudgeForKey({ key: 'a', shiftKey: false })).toBeNull();
  });
  it('turns a handle drag into a frequency ratio and a dB change, clamped at the plot edges', () => {
    const m = { x: axisMap('log', 20, 20000, 0, 900), y: axisMap('linear', -30, 12, 420, 0), y2: null, area: { left: 0, top: 0, right: 900, bottom: 420, width: 900, height: 420 } };
    const d = dragDelta(m, { x: 300, y: 300 }, { x: 600, y: 200 }, false);
    expect(d.freqRatio).toBeCloseTo(10, 9);
    expect(d.deltaDb).toBeCloseTo(10, 9);
    const past = dragDelta(m, { x: 300, y: 300 }, { x: 5000, y: -5000 }, false);
    expect(past.freqRatio).toBeCloseTo(100, 6);
    expect(past.deltaDb).toBeCloseTo(12 - m.y.toValue(300), 9);
    const q = dragDelta(m, { x: 300, y: 300 }, { x: 300, y: 240 }, true);
    expect(q.qRatio).toBeCloseTo(2, 12);
    expect(q.deltaDb).toBe(0);
  });
});
