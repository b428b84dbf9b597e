/**
 * The one plot adapter every view draws through: Chart.js lays out and draws the axes, ticks,
 * titles and grid (fixed ranges, `parsing: false`, no animation, no datasets), and this adapter
 * draws the curves itself from Float64Arrays in a Chart.js plugin, at most four points per pixel
 * column (`columnPath`). Chart.js has no typed-array input; converting each curve to an object
 * per point and letting Chart.js build an element per point is what made a redraw of 50 curves
 * cost over 100 ms, so the curves never enter Chart.js at all.
 *
 * Curves are named (`id`), come in any number, and have a style: a plain line, a ghost (a
 * snapshot drawn faded and wide beneath the live curves) or markers (poles and zeros).
 *
 * Three layers: Chart.js's canvas (axes and grid, redrawn only when a range or the size
 * changes), a curves canvas the adapter adds above it (the still curves), and, when the view
 * gives one, a transparent overlay on top (curves listed as "hot", and the owner's marks). A
 * drag frame redraws only the overlay (two polylines, not the whole plot), an edit only the
 * curves; in software rendering, repainting grid and labels with every edit cost more than the
 * curves. Every layer draws through the same `AxisMap`s, built once per layout from the chart's
 * area, so they line up to the pixel.
 */
import type { ChartConfiguration, Plugin, Scale } from 'chart.js';
import { axisMap, columnPath, type AxisKind, type AxisMap } from './mapping';
import { Chart, frequencyTickLabel, installFrequencyTicks, readTheme, Y_AXIS_WIDTH, type Theme } from './setup';

export interface PlotSeries {
  /** Stable across frames; caches the curve's pixel path. */
  id: string;
  label: string;
  color: string;
  width: number;
  dash?: readonly number[];
  /** line (default); ghost: a snapshot, faded beneath the live curves; markers: one mark per point. */
  style?: 'line' | 'ghost' | 'markers';
  marker?: 'circle' | 'cross';
  x: Float64Array;
  y: Float64Array;
  /** Multiplies y as drawn (radians to degrees), without a copy of the data. */
  yScale?: number;
  axis?: 'y' | 'y2';
}

export interface AxisSpec {
  kind: AxisKind;
  title: string;
  /** Frequency ticks (1-2-5 per decade, labelled in Hz/kHz) instead of Chart.js's. */
  frequency?: boolean;
  showTicks?: boolean;
  /** Tick and title colour (the right axis of the quantized chart is the accent colour). */
  color?: (t: Theme) => string;
}

export interface PlotSpec {
  x: AxisSpec;
  y: AxisSpec;
  y2?: AxisSpec;
  /** Width over height, kept when set (the z-plane is square). */
  aspect?: number;
  /** Fixed y axis width so stacked plots line up; null lets Chart.js fit it. */
  yAxisWidth?: number | null;
}

export interface PlotRanges {
  x: [number, number];
  y: [number, number];
  y2?: [number, number];
  /** Tick step of the y axis (undefined: Chart.js picks). */
  yStep?: number;
  xStep?: number;
}

export interface PlotMaps {
  x: AxisMap;
  y: AxisMap;
  y2: AxisMap | null;
  area: { left: number; top: number; right: number; bottom: number; width: number; height: number };
}

/** What a test reads back: every curve in paint order, with its values as drawn. */
export interface PlottedSeries {
  id: string;
  label: string;
  color: string;
  width: number;
  style: 'line' | 'ghost' | 'markers';
  layer: 'base' | 'overlay';
  y: number[];
}

const GHOST_ALPHA = 0.38;

interface PathCache {
  x: Float64Array;
  y: Float64Array;
  scale: number;
  key: string;
  path: Float32Array;
  count: number;
}

export class Plot {
  readonly chart: Chart<'line'>;
  readonly canvas: HTMLCanvasElement;
  readonly overlay: HTMLCanvasElement | null;
  /** The still curves, between Chart.js's canvas and the overlay. */
  readonly curvesCanvas: HTMLCanvasElement;
  #spec: PlotSpec;
  #theme: Theme;
  #series: readonly PlotSeries[] = [];
  #hot: ReadonlySet<string> | null = null;
  #ranges: PlotRanges | null = null;
  #paths = new Map<string, PathCache>();
  #lastBaseKey = '';
  #maps: PlotMaps | null = null;
  #mapsKey = '';
  /** Extra drawing on the overlay (crosshair, handles, clip marks), after the hot curves. */
  overlayExtras: ((ctx: CanvasRenderingContext2D, maps: PlotMaps, theme: Theme) => void) | null = null;
  /** Chart.js layouts (ranges changed), base redraws (curves changed) and overlay redraws. */
  readonly counters = { chartUpdates: 0, baseDraws: 0, overlayDraws: 0 };

  constructor(canvas: HTMLCanvasElement, overlay: HTMLCanvasElement | null, spec: PlotSpec) {
    this.canvas = canvas;
    this.overlay = overlay;
    this.#spec = spec;
    this.#theme = readTheme();
    const layer = document.createElement('canvas');
    layer.setAttribute('aria-hidden', 'true');
    layer.style.cssText = 'position:absolute;left:0;top:0;pointer-events:none;';
    canvas.insertAdjacentElement('afterend', layer);
    this.curvesCanvas = layer;
    this.chart = new Chart(canvas, this.#config());
  }

  #config(): ChartConfiguration<'line'> {
    const self = this;
    const spec = this.#spec;
    const theme = () => this.#theme;
    const curves: Plugin<'line'> = {
      id: 'typed-curves',
      afterDraw() {
        // The layout may have moved: the curve layers follow every Chart.js draw.
        self.#drawCurves();
        self.drawOverlay();
      },
    };
    const font = { size: 12 };
    const titleFont = { size: 12, weight: 600 as const };
    const axis = (a: AxisSpec, position: 'bottom' | 'left' | 'right', grid: boolean) => ({
      type: a.kind === 'log' ? ('logarithmic' as const) : ('linear' as const),
      position,
      ...(a.frequency ? { afterBuildTicks: installFrequencyTicks } : {}),
      ...(position !== 'bottom' && spec.yAxisWidth !== null
        ? {
            afterFit(scale: Scale) {
              scale.width = spec.yAxisWidth ?? Y_AXIS_WIDTH;
            },
          }
        : {}),
      ticks: {
        display: a.showTicks !== false,
        autoSkip: !a.frequency,
        maxRotation: 0,
        color: () => (a.color ? a.color(theme()) : theme().muted),
        font,
        ...(a.frequency
          ? {
              callback(this: Scale, value: number | string) {
                return frequencyTickLabel(this, Number(value));
              },
            }
          : {}),
      },
      grid: grid
        ? { color: (ctx: { tick?: { value: number; major?: boolean } }) => ((a.frequency ? ctx.tick?.major : ctx.tick?.value === 0) ? theme().gridMajor : theme().grid) }
        : { display: false },
      border: { display: false },
      title: { display: a.title !== '' && a.showTicks !== false, text: a.title, color: () => (a.color ? a.color(theme()) : theme().muted), font: titleFont, padding: 1 },
    });
    const scales: Record<string, unknown> = { x: axis(spec.x, 'bottom', true), y: axis(spec.y, 'left', true) };
    if (spec.y2) scales.y2 = axis(spec.y2, 'right', false);
    return {
      type: 'line',
      data: { datasets: [] },
      options: {
        parsing: false,
        normalized: true,
        animation: false,
        responsive: true,
        maintainAspectRatio: spec.aspect !== undefined,
        ...(spec.aspect !== undefined ? { aspectRatio: spec.aspect } : {}),
        events: [],
        layout: { padding: { top: 6, right: spec.y2 ? 2 : 10, bottom: 0, left: 0 } },
        plugins: { legend: { display: false }, tooltip: { enabled: false } } as never,
        scales: scales as never,
      },
      plugins: [curves],
    };
  }

  /** Re-reads the theme colours (after a light/dark switch) and redraws. */
  refreshTheme(): void {
    this.#theme = readTheme();
    this.chart.update('none');
  }

  get series(): readonly PlotSeries[] {
    return this.#series;
  }

  get ranges(): PlotRanges | null {
    return this.#ranges;
  }

  /**
   * New ranges and curves. Chart.js lays out again only when a range or step changed; when only
   * curves changed it repaints (grid and curves, no layout); when only hot curves changed just
   * the overlay is redrawn.
   */
  set(ranges: PlotRanges, series: readonly PlotSeries[], hot: ReadonlySet<string> | null = null): void {
    const prev = this.#ranges;
    const rangesChanged =
      !prev ||
      prev.x[0] !== ranges.x[0] ||
      prev.x[1] !== ranges.x[1] ||
      prev.y[0] !== ranges.y[0] ||
      prev.y[1] !== ranges.y[1] ||
      prev.yStep !== ranges.yStep ||
      prev.xStep !== ranges.xStep ||
      String(prev.y2) !== String(ranges.y2);
    const key = this.#baseKey(series, hot && this.overlay ? hot : null);
    const baseChanged = rangesChanged || key !== this.#lastBaseKey;
    this.#lastBaseKey = key;
    this.#ranges = ranges;
    this.#series = series;
    this.#hot = hot && this.overlay ? hot : null;
    if (rangesChanged) {
      const s = this.chart.options.scales!;
      [s.x!.min, s.x!.max] = ranges.x;
      [s.y!.min, s.y!.max] = ranges.y;
      (s.y!.ticks as { stepSize?: number }).stepSize = ranges.yStep;
      (s.x!.ticks as { stepSize?: number }).stepSize = ranges.xStep;
      if (s.y2 && ranges.y2) [s.y2.min, s.y2.max] = ranges.y2;
      this.chart.update('none'); // lays out, draws, and the plugins draw the curves and overlay
      this.counters.chartUpdates++;
    } else if (baseChanged) {
      this.#drawCurves();
      this.drawOverlay();
    } else {
      this.drawOverlay();
    }
  }

  /** Identity of what the base layer shows: the still curves' data and looks, in order. */
  #baseKey(series: readonly PlotSeries[], hot: ReadonlySet<string> | null): string {
    const ids: unknown[] = [];
    for (const s of series) if (!hot?.has(s.id)) ids.push(s.id, s.color, s.width, String(s.dash ?? ''), s.style, s.yScale ?? 1, this.#dataId(s.y), this.#dataId(s.x));
    return ids.join('|');
  }

  #ids = new WeakMap<Float64Array, number>();
  #nextId = 1;
  #dataId(a: Float64Array): number {
    let id = this.#ids.get(a);
    if (id === undefined) this.#ids.set(a, (id = this.#nextId++));
    return id;
  }

  /** The pixel mappers of the chart's current area and ranges (one object per layout). */
  maps(): PlotMaps | null {
    const c = this.chart;
    // Chart.js draws once inside its constructor, before `chart` is set.
    if (!c) return null;
    const a = c.chartArea;
    const xs = c.scales.x;
    const ys = c.scales.y;
    if (!a || !xs || !ys) return null;
    const y2s = c.scales.y2 as Scale | undefined;
    const key = `${a.left},${a.top},${a.right},${a.bottom},${xs.min},${xs.max},${ys.min},${ys.max},${y2s?.min},${y2s?.max}`;
    if (key !== this.#mapsKey || !this.#maps) {
      this.#mapsKey = key;
      this.#maps = {
        x: axisMap(this.#spec.x.kind, xs.min, xs.max, a.left, a.right),
        y: axisMap(this.#spec.y.kind, ys.min, ys.max, a.bottom, a.top),
        y2: y2s && this.#spec.y2 ? axisMap(this.#spec.y2.kind, y2s.min, y2s.max, a.bottom, a.top) : null,
        area: { left: a.left, top: a.top, right: a.right, bottom: a.bottom, width: a.width, height: a.height },
      };
    }
    return this.#maps;
  }

  /** A layer canvas cleared and sized to the chart's canvas, its context scaled to CSS pixels. */
  #layer(canvas: HTMLCanvasElement, desynchronized: boolean): CanvasRenderingContext2D | null {
    const ctx = canvas.getContext('2d', { desynchronized });
    if (!ctx) return null;
    const base = this.chart.canvas;
    if (canvas.width !== base.width || canvas.height !== base.height) {
      canvas.width = base.width;
      canvas.height = base.height;
    }
    if (canvas === this.curvesCanvas) {
      // Chart.js sizes its canvas in CSS pixels by style; the curves layer follows it.
      if (canvas.style.width !== base.style.width) canvas.style.width = base.style.width;
      if (canvas.style.height !== base.style.height) canvas.style.height = base.style.height;
    }
    const dpr = this.chart.currentDevicePixelRatio || 1;
    ctx.setTransform(1, 0, 0, 1, 0, 0);
    ctx.clearRect(0, 0, canvas.width, canvas.height);
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    return ctx;
  }

  #drawCurves(): void {
    // Chart.js draws once inside its constructor, before `chart` is set.
    if (!this.chart) return;
    const maps = this.maps();
    if (!maps) return;
    const ctx = this.#layer(this.curvesCanvas, false);
    if (!ctx) return;
    this.counters.baseDraws++;
    const hot = this.#hot;
    this.#stroke(ctx, maps, this.#series.filter((s) => !hot?.has(s.id)));
  }

  /** Redraws the overlay alone: hot curves, then the owner's extras. */
  drawOverlay(): void {
    const canvas = this.overlay;
    if (!canvas || !this.chart) return;
    const maps = this.maps();
    if (!maps) return;
    // A low-latency hint: the overlay may reach the screen without waiting for the page's commit.
    const ctx = this.#layer(canvas, true);
    if (!ctx) return;
    this.counters.overlayDraws++;
    const hot = this.#hot;
    if (hot) this.#stroke(ctx, maps, this.#series.filter((s) => hot.has(s.id)));
    this.overlayExtras?.(ctx, maps, this.#theme);
  }

  #stroke(ctx: CanvasRenderingContext2D, maps: PlotMaps, list: readonly PlotSeries[]): void {
    const a = maps.area;
    ctx.save();
    ctx.beginPath();
    ctx.rect(a.left, a.top, a.width, a.height);
    ctx.clip();
    // Bevel joins and butt caps: with about one point per pixel column the joins do not show,
    // and round ones cost several times more to rasterize in software rendering.
    ctx.lineJoin = 'bevel';
    ctx.lineCap = 'butt';
    for (const s of list) {
      const yMap = s.axis === 'y2' && maps.y2 ? maps.y2 : maps.y;
      const { path, count } = this.#path(s, maps.x, yMap);
      ctx.strokeStyle = s.color;
      ctx.setLineDash((s.dash ?? []) as number[]);
      if (s.style === 'markers') {
        this.#markers(ctx, s, path, count);
        continue;
      }
      ctx.globalAlpha = s.style === 'ghost' ? GHOST_ALPHA : 1;
      ctx.lineWidth = s.style === 'ghost' ? s.width + 2 : s.width;
      ctx.beginPath();
      let pen = false;
      for (let i = 0; i < count; i++) {
        const x = path[2 * i];
        if (Number.isNaN(x)) {
          pen = false;
          continue;
        }
        if (pen) ctx.lineTo(x, path[2 * i + 1]);
        else ctx.moveTo(x, path[2 * i + 1]);
        pen = true;
      }
      ctx.stroke();
      ctx.globalAlpha = 1;
    }
    ctx.restore();
  }

  #markers(ctx: CanvasRenderingContext2D, s: PlotSeries, path: Float32Array, count: number): void {
    const r = s.width * 2.6;
    ctx.lineWidth = s.width;
    ctx.setLineDash([]);
    ctx.beginPath();
    for (let i = 0; i < count; i++) {
      const x = path[2 * i];
      const y = path[2 * i + 1];
      if (Number.isNaN(x)) continue;
      if (s.marker === 'cross') {
        const d = r * 0.75;
        ctx.moveTo(x - d, y - d);
        ctx.lineTo(x + d, y + d);
        ctx.moveTo(x - d, y + d);
        ctx.lineTo(x + d, y - d);
      } else {
        ctx.moveTo(x + r, y);
        ctx.arc(x, y, r, 0, 2 * Math.PI);
      }
    }
    ctx.stroke();
  }

  #path(s: PlotSeries, xMap: AxisMap, yMap: AxisMap): { path: Float32Array; count: number } {
    const scale = s.yScale ?? 1;
    const key = `${xMap.min},${xMap.max},${xMap.p0},${xMap.p1},${yMap.min},${yMap.max},${yMap.p0},${yMap.p1}`;
    const c = this.#paths.get(s.id);
    if (c && c.x === s.x && c.y === s.y && c.scale === scale && c.key === key) return c;
    if (s.style === 'markers') {
      // Every point of a marker series stays (no column reduction: two roots one pixel apart are two roots).
      const path = new Float32Array(2 * s.x.length);
      for (let i = 0; i < s.x.length; i++) {
        path[2 * i] = xMap.toPixel(s.x[i]);
        path[2 * i + 1] = yMap.toPixel(s.y[i] * scale);
      }
      const made = { x: s.x, y: s.y, scale, key, path, count: s.x.length };
      this.#paths.set(s.id, made);
      return made;
    }
    const r = columnPath(s.x, s.y, scale, xMap, yMap, c?.path);
    const made = { x: s.x, y: s.y, scale, key, path: r.path, count: r.count };
    this.#paths.set(s.id, made);
    // Forget curves no longer shown (ids of deleted outputs and bands).
    if (this.#paths.size > 4 * this.#series.length + 16) {
      const live = new Set(this.#series.map((k) => k.id));
      for (const id of this.#paths.keys()) if (!live.has(id)) this.#paths.delete(id);
    }
    return made;
  }

  /** Every curve in paint order with its values as drawn (y times its scale; a gap as NaN). */
  plotted(): PlottedSeries[] {
    const hot = this.#hot;
    const item = (s: PlotSeries, layer: 'base' | 'overlay'): PlottedSeries => {
      const k = s.yScale ?? 1;
      return { id: s.id, label: s.label, color: s.color, width: s.width, style: s.style ?? 'line', layer, y: Array.from(s.y, (v) => (Number.isFinite(v * k) ? v * k : NaN)) };
    };
    return [...this.#series.filter((s) => !hot?.has(s.id)).map((s) => item(s, 'base')), ...this.#series.filter((s) => hot?.has(s.id)).map((s) => item(s, 'overlay'))];
  }

  destroy(): void {
    this.chart.destroy();
    this.curvesCanvas.remove();
  }
}
