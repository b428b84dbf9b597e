/**
 * The three stacked response plots (magnitude, phase, group delay) on one log frequency axis,
 * the band handles on the magnitude plot, and the pointer gestures (drag a handle, wheel for Q,
 * drag or wheel the background to pan and zoom, hover for the readout).
 *
 * Chart.js is fed in its internal data shape (`parsing: false`, `normalized: true`), without
 * animation and with fixed axis limits; Chart.js's own event handling is off (`events: []`)
 * because the gestures here are handled directly. Curves arrive as Float64Arrays on a grid of
 * about one point per pixel column; a curve is converted to points only when its response
 * object changed (responses are immutable, so identity is enough).
 *
 * Each plot has a transparent overlay canvas above the Chart.js canvas. It carries the crosshair,
 * the band handles and, during a drag, the "hot" curves (the dragged output's and the sum): the
 * Chart.js canvas then keeps the still curves, axes and grid untouched, and a drag frame redraws
 * two polylines per plot instead of every dataset (Chart.js redraws whole charts; measured in
 * headless Chromium, that alone overran the 16 ms frame budget). The overlay uses the chart's
 * own scales, so both layers line up; at the end of the drag the curves go back to Chart.js.
 */
import type { ChartConfiguration, Plugin, Scale } from 'chart.js';
import type { Response } from '../../../src/response/chain-response';
import { inkOn } from '../lib/palette';
import { Chart, frequencyTickLabel, installFrequencyTicks, readTheme, STATIC_PLOT_OPTIONS, Y_AXIS_WIDTH, type Theme } from './setup';

export type PlotKind = 'magnitude' | 'phase' | 'groupDelay';
export const PLOT_KINDS: readonly PlotKind[] = ['magnitude', 'phase', 'groupDelay'];

export interface PlotCurve {
  /** Stable across frames ("sum", "out:<id>", "band:<chain>/<id>", "input"). */
  id: string;
  label: string;
  color: string;
  width: number;
  dash: number[];
  response: Response;
  /** Drawn on the magnitude plot only (band curves). */
  magnitudeOnly?: boolean;
}

export interface PlotHandle {
  id: string;
  number: number;
  frequency: number;
  db: number;
  color: string;
  selected: boolean;
}

export interface PlotFrame {
  frequencies: Float64Array;
  range: [number, number];
  magRange: [number, number];
  phaseMode: 'wrapped' | 'unwrapped';
  curves: PlotCurve[];
  handles: PlotHandle[];
  /** Ids of curves that change every frame (during a drag), drawn on the overlay; null when idle. */
  hot: ReadonlySet<string> | null;
}

export interface DragDelta {
  /** New frequency / frequency at grab. */
  freqRatio: number;
  /** dB moved vertically since the grab. */
  deltaDb: number;
  /** Q factor change when dragging with Alt or Ctrl held (vertical motion), else 1. */
  qRatio: number;
  qMode: boolean;
}

export interface PlotCallbacks {
  onHover(frequency: number | null): void;
  onRange(lo: number, hi: number): void;
  onResetRange(): void;
  onHandleDown(id: string): void;
  onHandleDrag(id: string, d: DragDelta): void;
  onHandleUp(id: string): void;
  onHandleWheel(id: string, qRatio: number): void;
  /** A click (no drag) on or near a curve of the magnitude plot. */
  onCurveClick(curveId: string): void;
}

type XY = { x: number; y: number };
interface DatasetMeta {
  curveId: string;
  source: Float64Array | null;
}

const HANDLE_RADIUS = 9;
const HIT_RADIUS = 13;
const RAD_TO_DEG = 180 / Math.PI;

function points(f: Float64Array, y: Float64Array, scale = 1): XY[] {
  const out: XY[] = new Array(f.length);
  for (let i = 0; i < f.length; i++) {
    const v = y[i] * scale;
    // Chart.js leaves a gap at NaN; +-Infinity (an exact zero) is drawn as a gap too.
    out[i] = { x: f[i], y: Number.isFinite(v) ? v : NaN };
  }
  return out;
}

function niceStep(span: number): number {
  const raw = span / 6;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

/** A y range for group delay: robust to the spikes of notches (2nd and 98th percentiles). */
export function groupDelayRange(curves: readonly Float64Array[]): [number, number] {
  let n = 0;
  for (const c of curves) n += c.length;
  const all = new Float64Array(n);
  let k = 0;
  for (const c of curves) for (let i = 0; i < c.length; i++) if (Number.isFinite(c[i])) all[k++] = c[i];
  if (k === 0) return [-1, 5];
  const v = all.subarray(0, k).sort();
  const lo = Math.min(0, v[Math.floor(0.02 * (k - 1))]);
  const hi = Math.max(1, v[Math.ceil(0.98 * (k - 1))]);
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
  let best = 0;
  let bestD = Infinity;
  const lf = Math.log(f);
  // Grids are log-spaced: a direct estimate, then a local check.
  const n = freqs.length;
  if (n < 2) return 0;
  const est = Math.round(((lf - Math.log(freqs[0])) / (Math.log(freqs[n - 1]) - Math.log(freqs[0]))) * (n - 1));
  for (let i = Math.max(0, est - 2); i <= Math.min(n - 1, est + 2); i++) {
    const d = Math.abs(Math.log(freqs[i]) - lf);
    if (d < bestD) {
      bestD = d;
      best = i;
    }
  }
  return best;
}

export class ResponsePlots {
  readonly charts: Record<PlotKind, Chart<'line', XY[]>>;
  #theme: Theme;
  #frame: PlotFrame | null = null;
  #hoverFrequency: number | null = null;
  #cb: PlotCallbacks;
  #drag:
    | { kind: 'handle'; id: string; x0: number; y0: number; f0: number; db0: number; moved: boolean }
    | { kind: 'pan'; chart: PlotKind; x0: number; lo: number; hi: number; moved: boolean }
    | null = null;
  #cleanup: (() => void)[] = [];
  /** For the UI benchmark and tests: the timeStamp of the input event behind the pending update. */
  pendingInputTime: number | null = null;

  #overlays: Record<PlotKind, HTMLCanvasElement>;
  /** Per plot: the chart-side state that decides whether Chart.js must redraw. */
  #chartKey: Record<PlotKind, string> = { magnitude: '', phase: '', groupDelay: '' };
  #xPixels: Record<PlotKind, { key: string; px: Float64Array }> = {
    magnitude: { key: '', px: new Float64Array(0) },
    phase: { key: '', px: new Float64Array(0) },
    groupDelay: { key: '', px: new Float64Array(0) },
  };
  #yRanges: Record<'phase' | 'groupDelay', [number, number]> = { phase: [-180, 180], groupDelay: [-1, 5] };
  /** Counts of Chart.js updates and overlay redraws (tests check a drag skips Chart.js). */
  readonly counters = { chartUpdates: 0, overlayDraws: 0 };

  constructor(canvases: Record<PlotKind, { base: HTMLCanvasElement; overlay: HTMLCanvasElement }>, callbacks: PlotCallbacks) {
    this.#cb = callbacks;
    this.#theme = readTheme();
    this.#overlays = { magnitude: canvases.magnitude.overlay, phase: canvases.phase.overlay, groupDelay: canvases.groupDelay.overlay };
    this.charts = {
      magnitude: this.#create(canvases.magnitude.base, 'magnitude'),
      phase: this.#create(canvases.phase.base, 'phase'),
      groupDelay: this.#create(canvases.groupDelay.base, 'groupDelay'),
    };
    for (const kind of PLOT_KINDS) this.#listen(canvases[kind].overlay, kind);
  }

  #create(canvas: HTMLCanvasElement, kind: PlotKind): Chart<'line', XY[]> {
    const theme = () => this.#theme;
    const self = this;
    const overlay: Plugin<'line'> = {
      id: `overlay-${kind}`,
      afterDraw() {
        // The scales may have moved: the overlay follows every Chart.js draw.
        self.#drawOverlay(kind);
      },
    };
    const yTitle = kind === 'magnitude' ? 'dB' : kind === 'phase' ? 'phase \u00b0' : 'delay ms';
    const config: ChartConfiguration<'line', XY[]> = {
      type: 'line',
      data: { datasets: [] },
      options: {
        ...STATIC_PLOT_OPTIONS,
        layout: { padding: { top: 6, right: 10, bottom: 0, left: 0 } },
        elements: { point: { radius: 0, hitRadius: 0, hoverRadius: 0 }, line: { tension: 0, borderCapStyle: 'round', borderJoinStyle: 'round' } },
        scales: {
          x: {
            type: 'logarithmic',
            min: 20,
            max: 20000,
            afterBuildTicks: installFrequencyTicks,
            ticks: {
              autoSkip: false,
              maxRotation: 0,
              display: kind === 'groupDelay',
              color: () => theme().muted,
              font: { size: 11 },
              callback(this: Scale, value: number | string) {
                return frequencyTickLabel(this, Number(value));
              },
            },
            grid: {
              color: (ctx) => (ctx.tick?.major ? theme().gridMajor : theme().grid),
            },
            border: { display: false },
          },
          y: {
            type: 'linear',
            min: -30,
            max: 12,
            afterFit(scale) {
              scale.width = Y_AXIS_WIDTH;
            },
            ticks: { color: () => theme().muted, font: { size: 11 }, maxTicksLimit: 9 },
            grid: {
              color: (ctx) => (ctx.tick?.value === 0 ? theme().gridMajor : theme().grid),
            },
            border: { display: false },
            title: { display: true, text: yTitle, color: this.#theme.muted, font: { size: 11 }, padding: 2 },
          },
        },
      },
      plugins: [overlay],
    };
    return new Chart(canvas, config);
  }

  /** Re-reads theme colours (after a light/dark switch). */
  refreshTheme(): void {
    this.#theme = readTheme();
    for (const k of PLOT_KINDS) this.charts[k].options.scales!.y!.title!.color = this.#theme.muted;
    for (const k of PLOT_KINDS) this.charts[k].update('none');
  }

  get frame(): PlotFrame | null {
    return this.#frame;
  }

  update(frame: PlotFrame): void {
    const prev = this.#frame;
    this.#frame = frame;
    const gridChanged = !prev || prev.frequencies !== frame.frequencies;
    const hot = frame.hot;
    for (const kind of PLOT_KINDS) {
      const chart = this.charts[kind];
      const all = kind === 'magnitude' ? frame.curves : frame.curves.filter((c) => !c.magnitudeOnly);
      const curves = hot ? all.filter((c) => !hot.has(c.id)) : all;
      const arrays = curves.map((c) => this.#source(c, kind, frame.phaseMode));
      const x = chart.options.scales!.x!;
      const y = chart.options.scales!.y!;
      const ticks = y.ticks as { stepSize?: number };
      if (kind === 'magnitude') {
        [y.min, y.max] = frame.magRange;
        const span = frame.magRange[1] - frame.magRange[0];
        ticks.stepSize = [1, 2, 3, 6, 12, 24, 48].find((s) => span / s <= 8) ?? 48;
      } else if (kind === 'phase') {
        // Ranges follow the data when idle and hold still during a drag.
        if (!hot) this.#yRanges.phase = frame.phaseMode === 'wrapped' ? [-180, 180] : unwrappedPhaseRange(all.map((c) => this.#source(c, kind, frame.phaseMode)));
        [y.min, y.max] = this.#yRanges.phase;
        const span = y.max - y.min;
        ticks.stepSize = frame.phaseMode === 'wrapped' ? 90 : [180, 360, 720, 1440, 2880, 5760].find((s) => span / s <= 6) ?? 11520;
      } else {
        if (!hot) this.#yRanges.groupDelay = groupDelayRange(all.map((c) => this.#source(c, kind, frame.phaseMode)));
        [y.min, y.max] = this.#yRanges.groupDelay;
        ticks.stepSize = undefined;
      }
      const old = chart.data.datasets as (typeof chart.data.datasets[number] & { _meta?: DatasetMeta })[];
      const byId = new Map(old.map((d) => [d._meta!.curveId, d]));
      let changed = gridChanged || old.length !== curves.length || x.min !== frame.range[0] || x.max !== frame.range[1];
      x.min = frame.range[0];
      x.max = frame.range[1];
      const datasets = curves.map((c, i) => {
        const src = arrays[i];
        const scale = kind === 'phase' ? RAD_TO_DEG : 1;
        let d = byId.get(c.id);
        if (!d) {
          d = { data: [], borderColor: c.color, borderWidth: c.width, borderDash: c.dash, pointRadius: 0, label: c.label, _meta: { curveId: c.id, source: null } } as never;
          changed = true;
        }
        const meta = d!._meta!;
        if (meta.source !== src || gridChanged) {
          d!.data = points(frame.frequencies, src, scale);
          meta.source = src;
          changed = true;
        }
        if (old[i] !== d || d!.borderColor !== c.color || d!.borderWidth !== c.width || String(d!.borderDash) !== String(c.dash) || d!.label !== c.label) changed = true;
        d!.borderColor = c.color;
        d!.borderWidth = c.width;
        d!.borderDash = c.dash;
        d!.label = c.label;
        return d!;
      });
      const key = `${y.min}|${y.max}|${ticks.stepSize}|${frame.phaseMode}`;
      if (key !== this.#chartKey[kind]) changed = true;
      this.#chartKey[kind] = key;
      if (changed) {
        chart.data.datasets = datasets;
        chart.update('none'); // draws, and the overlay follows (afterDraw)
        this.counters.chartUpdates++;
      } else {
        this.#drawOverlay(kind);
      }
    }
  }

  #source(c: PlotCurve, kind: PlotKind, phaseMode: PlotFrame['phaseMode']): Float64Array {
    if (kind === 'magnitude') return c.response.magnitudeDb;
    if (kind === 'groupDelay') return c.response.groupDelayMs;
    return phaseMode === 'wrapped' ? c.response.phaseRad : c.response.phaseUnwrappedRad;
  }

  setHover(frequency: number | null): void {
    if (frequency === this.#hoverFrequency) return;
    this.#hoverFrequency = frequency;
    for (const k of PLOT_KINDS) this.#drawOverlay(k);
  }

  /** Pixel x of every grid frequency for the chart's current x scale (rebuilt when it moves). */
  #gridPixels(kind: PlotKind, freqs: Float64Array): Float64Array {
    const chart = this.charts[kind];
    const xs = chart.scales.x;
    const a = chart.chartArea;
    const key = `${xs.min}|${xs.max}|${a.left}|${a.width}|${freqs.length}|${freqs[0]}|${freqs[freqs.length - 1]}`;
    const cached = this.#xPixels[kind];
    if (cached.key === key && cached.px.length === freqs.length) return cached.px;
    // Log axis: px = left + width * log(f / min) / log(max / min), built once outside the loop.
    const px = new Float64Array(freqs.length);
    const l0 = Math.log(xs.min);
    const k = a.width / (Math.log(xs.max) - l0);
    for (let i = 0; i < freqs.length; i++) px[i] = a.left + (Math.log(freqs[i]) - l0) * k;
    this.#xPixels[kind] = { key, px };
    return px;
  }

  #drawOverlay(kind: PlotKind): void {
    // Chart.js draws once inside its constructor, before `charts` is set.
    const chart = this.charts?.[kind];
    if (!chart) return;
    const canvas = this.#overlays[kind];
    const area = chart.chartArea;
    if (!area) return;
    // A low-latency hint: the overlay may reach the screen without waiting for the page's commit
    // (npm run bench:ui: median 12 -> 10 ms, p95 25 -> 19 ms per drag frame in headless Chromium).
    const ctx = canvas.getContext('2d', { desynchronized: true });
    if (!ctx) return;
    this.counters.overlayDraws++;
    const base = chart.canvas;
    if (canvas.width !== base.width || canvas.height !== base.height) {
      canvas.width = base.width;
      canvas.height = base.height;
    }
    const dpr = chart.currentDevicePixelRatio || 1;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.clearRect(0, 0, canvas.width, canvas.height);
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    const xs = chart.scales.x;
    const ys = chart.scales.y;
    const t = this.#theme;
    const frame = this.#frame;

    if (frame?.hot) {
      const hot = frame.hot;
      const px = this.#gridPixels(kind, frame.frequencies);
      const y0 = ys.getPixelForValue(0);
      const y1 = ys.getPixelForValue(1) - y0;
      const scale = kind === 'phase' ? RAD_TO_DEG : 1;
      ctx.save();
      ctx.beginPath();
      ctx.rect(area.left, area.top, area.width, area.height);
      ctx.clip();
      ctx.lineJoin = 'round';
      ctx.lineCap = 'round';
      const list = frame.curves.filter((c) => hot.has(c.id) && (kind === 'magnitude' || !c.magnitudeOnly));
      // Same stacking as Chart.js: the first curve (the sum) on top.
      for (let j = list.length - 1; j >= 0; j--) {
        const c = list[j];
        const v = this.#source(c, kind, frame.phaseMode);
        ctx.strokeStyle = c.color;
        ctx.lineWidth = c.width;
        ctx.setLineDash(c.dash);
        ctx.beginPath();
        let pen = false;
        const lo = area.top - 2000;
        const hi = area.bottom + 2000;
        for (let i = 0; i < v.length; i++) {
          const val = v[i] * scale;
          if (!Number.isFinite(val)) {
            pen = false;
            continue;
          }
          const yp = Math.min(hi, Math.max(lo, y0 + val * y1));
          if (pen) ctx.lineTo(px[i], yp);
          else ctx.moveTo(px[i], yp);
          pen = true;
        }
        ctx.stroke();
      }
      ctx.restore();
    }

    const f = this.#hoverFrequency;
    if (f !== null && f >= xs.min && f <= xs.max) {
      const x = xs.getPixelForValue(f);
      ctx.save();
      ctx.strokeStyle = t.muted;
      ctx.lineWidth = 1;
      ctx.setLineDash([3, 3]);
      ctx.beginPath();
      ctx.moveTo(x, area.top);
      ctx.lineTo(x, area.bottom);
      ctx.stroke();
      ctx.restore();
    }
    if (kind !== 'magnitude' || !frame) return;
    ctx.save();
    ctx.beginPath();
    ctx.rect(area.left - HANDLE_RADIUS - 3, area.top - HANDLE_RADIUS - 3, area.width + 2 * HANDLE_RADIUS + 6, area.height + 2 * HANDLE_RADIUS + 6);
    ctx.clip();
    ctx.font = '600 11px system-ui, sans-serif';
    ctx.textAlign = 'center';
    ctx.textBaseline = 'middle';
    const handles = [...frame.handles].sort((a, b) => Number(a.selected) - Number(b.selected));
    for (const h of handles) {
      if (h.frequency < xs.min || h.frequency > xs.max) continue;
      const x = xs.getPixelForValue(h.frequency);
      const y = Math.min(area.bottom, Math.max(area.top, ys.getPixelForValue(h.db)));
      const r = h.selected ? HANDLE_RADIUS + 2 : HANDLE_RADIUS;
      if (h.selected) {
        ctx.strokeStyle = h.color;
        ctx.lineWidth = 1;
        ctx.globalAlpha = 0.6;
        ctx.setLineDash([2, 3]);
        ctx.beginPath();
        ctx.moveTo(x, area.top);
        ctx.lineTo(x, area.bottom);
        ctx.stroke();
        ctx.setLineDash([]);
        ctx.globalAlpha = 1;
      }
      ctx.beginPath();
      ctx.arc(x, y, r, 0, 2 * Math.PI);
      ctx.fillStyle = h.selected ? h.color : t.surface;
      ctx.fill();
      ctx.lineWidth = h.selected ? 2.5 : 2;
      ctx.strokeStyle = h.selected ? t.text : h.color;
      ctx.stroke();
      ctx.fillStyle = h.selected ? inkOn(h.color) : t.text;
      ctx.fillText(String(h.number), x, y + 0.5);
    }
    ctx.restore();
  }

  /** Canvas-relative pixel of a handle, or null when off the plot. */
  handlePixel(id: string): { x: number; y: number } | null {
    const h = this.#frame?.handles.find((k) => k.id === id);
    const chart = this.charts.magnitude;
    if (!h || !chart.chartArea) return null;
    const xs = chart.scales.x;
    const ys = chart.scales.y;
    if (h.frequency < xs.min || h.frequency > xs.max) return null;
    const area = chart.chartArea;
    return { x: xs.getPixelForValue(h.frequency), y: Math.min(area.bottom, Math.max(area.top, ys.getPixelForValue(h.db))) };
  }

  #hitHandle(x: number, y: number): string | null {
    let best: string | null = null;
    let bestD = HIT_RADIUS;
    const handles = this.#frame?.handles ?? [];
    // Selected handle first wins ties (it is drawn on top).
    for (const h of [...handles].sort((a, b) => Number(b.selected) - Number(a.selected))) {
      const p = this.handlePixel(h.id);
      if (!p) continue;
      const d = Math.hypot(p.x - x, p.y - y);
      if (d < bestD) {
        bestD = d;
        best = h.id;
      }
    }
    return best;
  }

  /** Canvas-relative pixel of (Hz, dB) on the magnitude plot. */
  magnitudePixel(frequencyHz: number, db: number): { x: number; y: number } | null {
    const chart = this.charts.magnitude;
    if (!chart.chartArea) return null;
    return { x: chart.scales.x.getPixelForValue(frequencyHz), y: chart.scales.y.getPixelForValue(db) };
  }

  /** The magnitude curve passing within a few pixels of (x, y), nearest first; the sum last. */
  #curveAt(x: number, y: number): string | null {
    const frame = this.#frame;
    const chart = this.charts.magnitude;
    if (!frame || !chart.chartArea) return null;
    const f = chart.scales.x.getValueForPixel(x)!;
    const ys = chart.scales.y;
    let best: string | null = null;
    let bestD = 7;
    for (const c of frame.curves) {
      if (c.magnitudeOnly || c.id === 'sum') continue;
      const v = valueAt(frame.frequencies, c.response.magnitudeDb, f);
      if (!Number.isFinite(v)) continue;
      const d = Math.abs(ys.getPixelForValue(v) - y);
      if (d < bestD) {
        bestD = d;
        best = c.id;
      }
    }
    return best;
  }

  #inArea(chart: Chart<'line', XY[]>, x: number, y: number): boolean {
    const a = chart.chartArea;
    return !!a && x >= a.left - HANDLE_RADIUS && x <= a.right + HANDLE_RADIUS && y >= a.top - HANDLE_RADIUS && y <= a.bottom + HANDLE_RADIUS;
  }

  #listen(canvas: HTMLCanvasElement, kind: PlotKind): void {
    const chart = () => this.charts[kind];
    const on = <K extends keyof HTMLElementEventMap>(type: K, fn: (e: HTMLElementEventMap[K]) => void, opts?: AddEventListenerOptions) => {
      canvas.addEventListener(type, fn as EventListener, opts);
      this.#cleanup.push(() => canvas.removeEventListener(type, fn as EventListener, opts));
    };
    on('pointerdown', (e) => {
      if (e.button !== 0) return;
      const c = chart();
      if (!this.#inArea(c, e.offsetX, e.offsetY)) return;
      const hit = kind === 'magnitude' ? this.#hitHandle(e.offsetX, e.offsetY) : null;
      canvas.setPointerCapture?.(e.pointerId);
      if (hit) {
        const h = this.#frame!.handles.find((k) => k.id === hit)!;
        this.#drag = { kind: 'handle', id: hit, x0: e.offsetX, y0: e.offsetY, f0: h.frequency, db0: h.db, moved: false };
        canvas.style.cursor = 'grabbing';
        this.#cb.onHandleDown(hit);
      } else {
        const [lo, hi] = this.#frame?.range ?? [20, 20000];
        this.#drag = { kind: 'pan', chart: kind, x0: e.offsetX, lo, hi, moved: false };
      }
      e.preventDefault();
    });
    on('pointermove', (e) => {
      const c = chart();
      const d = this.#drag;
      if (d?.kind === 'handle') {
        const xs = c.scales.x;
        const ys = c.scales.y;
        // The pointer counts only as far as the plot's edges: a drag past them does not run on
        // to the +-60 dB or 1 Hz limits unseen (a big boost can destroy a driver). Typed values
        // and a wider magnitude range reach further.
        const a = c.chartArea;
        const px = a ? Math.min(a.right, Math.max(a.left, e.offsetX)) : e.offsetX;
        const py = a ? Math.min(a.bottom, Math.max(a.top, e.offsetY)) : e.offsetY;
        const fNow = xs.getValueForPixel(px)!;
        const fGrab = xs.getValueForPixel(d.x0)!;
        const qMode = e.altKey || e.ctrlKey || e.metaKey;
        const dy = e.offsetY - d.y0;
        d.moved = true;
        this.pendingInputTime = e.timeStamp;
        this.#cb.onHandleDrag(d.id, {
          freqRatio: fNow / fGrab,
          deltaDb: qMode ? 0 : ys.getValueForPixel(py)! - ys.getValueForPixel(d.y0)!,
          qRatio: qMode ? Math.pow(2, -dy / 60) : 1,
          qMode,
        });
      } else if (d?.kind === 'pan') {
        const a = c.chartArea;
        const dx = e.offsetX - d.x0;
        if (Math.abs(dx) > 2) d.moved = true;
        if (d.moved && a) {
          const k = Math.log(d.hi / d.lo) / a.width;
          const shift = Math.exp(-dx * k);
          this.#cb.onRange(d.lo * shift, d.hi * shift);
        }
      } else {
        const inside = this.#inArea(c, e.offsetX, e.offsetY);
        this.#cb.onHover(inside ? c.scales.x.getValueForPixel(e.offsetX)! : null);
        if (kind === 'magnitude') canvas.style.cursor = inside && this.#hitHandle(e.offsetX, e.offsetY) ? 'grab' : 'crosshair';
        else canvas.style.cursor = 'crosshair';
      }
    });
    const end = (e: PointerEvent) => {
      const d = this.#drag;
      this.#drag = null;
      canvas.releasePointerCapture?.(e.pointerId);
      if (d?.kind === 'handle') {
        canvas.style.cursor = 'grab';
        this.#cb.onHandleUp(d.id);
      } else if (d?.kind === 'pan' && !d.moved && e.type === 'pointerup' && kind === 'magnitude') {
        const id = this.#curveAt(e.offsetX, e.offsetY);
        if (id) this.#cb.onCurveClick(id);
      }
    };
    on('pointerup', end);
    on('pointercancel', end);
    on('pointerleave', () => {
      if (!this.#drag) this.#cb.onHover(null);
    });
    on(
      'wheel',
      (e) => {
        const c = chart();
        if (!this.#inArea(c, e.offsetX, e.offsetY)) return;
        e.preventDefault();
        const steps = Math.max(-4, Math.min(4, e.deltaY / (e.deltaMode === 1 ? 3 : 100)));
        const hit = kind === 'magnitude' ? this.#hitHandle(e.offsetX, e.offsetY) : null;
        if (hit) {
          this.#cb.onHandleWheel(hit, Math.pow(1.1, -steps));
          return;
        }
        const [lo, hi] = this.#frame?.range ?? [20, 20000];
        const at = c.scales.x.getValueForPixel(e.offsetX)!;
        const k = Math.pow(1.25, steps);
        this.#cb.onRange(at * Math.pow(lo / at, k), at * Math.pow(hi / at, k));
      },
      { passive: false },
    );
    on('dblclick', (e) => {
      if (kind === 'magnitude' && this.#hitHandle(e.offsetX, e.offsetY)) return;
      this.#cb.onResetRange();
    });
  }

  destroy(): void {
    for (const f of this.#cleanup) f();
    for (const k of PLOT_KINDS) this.charts[k].destroy();
  }
}
