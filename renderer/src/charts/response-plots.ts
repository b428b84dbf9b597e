/**
 * The three stacked response plots (magnitude, phase, group delay) on one log frequency axis:
 * which curves go on which plot, in what order, the y ranges (response-axes.ts), the numbered
 * band handles and the crosshair on the overlays, and the marks of clipped group-delay peaks.
 * Drawing is the plot adapter's (plot.ts); pointer gestures are gestures.ts's.
 *
 * Paint order, bottom to top: snapshot ghosts, band curves, the sum, the outputs, then the rest
 * (phase difference, measurements). The sum is the widest line, in the text colour, beneath the
 * outputs: where one output is all there is, the sum equals it and would hide it if on top.
 */
import type { Response } from '$core/response/chain-response';
import { inkOn } from '../lib/palette';
import { attachGestures, type DragDelta } from './gestures';
import { valueAt } from './mapping';
import { Plot, type PlotMaps, type PlotSeries, type PlottedSeries } from './plot';
import { clippedPeaks, groupDelayRange, magnitudeStep, phaseStep, unwrappedPhaseRange, type ClippedPeak } from './response-axes';
import type { Theme } from './setup';

export type { DragDelta } from './gestures';

export type PlotKind = 'magnitude' | 'phase' | 'groupDelay';
export const PLOT_KINDS: readonly PlotKind[] = ['magnitude', 'phase', 'groupDelay'];

/** What a curve can carry; a curve shows on each plot whose data it has. */
export type CurveData = Partial<Pick<Response, 'magnitudeDb' | 'phaseRad' | 'phaseUnwrappedRad' | 'groupDelayMs'>>;

export interface PlotCurve {
  /** Stable across frames ("sum", "out:<id>", "band:<chain>/<id>", "input", "ghost:...", "phase-difference"). */
  id: string;
  label: string;
  color: string;
  width: number;
  dash: number[];
  data: CurveData;
  /** ghost: a snapshot curve, faded and beneath the live ones. */
  style?: 'line' | 'ghost';
  /** Plots the curve is limited to (band curves: magnitude only). */
  only?: readonly PlotKind[];
}

export interface PlotHandle {
  id: string;
  number: number;
  frequency: number;
  db: number;
  color: string;
  selected: boolean;
  /** The handle's tooltip: its number, the band type in words and its values. */
  title?: string;
}

export interface PlotFrame {
  frequencies: Float64Array;
  range: [number, number];
  magRange: [number, number];
  phaseMode: 'wrapped' | 'unwrapped';
  /** Group delay axis over every value instead of the robust percentile range. */
  groupDelayFull: boolean;
  /** In paint order, bottom first. */
  curves: PlotCurve[];
  handles: PlotHandle[];
  /** Ids of curves that change every frame (during a drag), drawn on the overlay; null when idle. */
  hot: ReadonlySet<string> | null;
}

export interface PlotCallbacks {
  onHover(frequency: number | null): void;
  onRange(lo: number, hi: number): void;
  onResetRange(): void;
  onHandleDown(id: string): void;
  onHandleDrag(id: string, d: DragDelta): void;
  onHandleUp(id: string, moved: boolean): void;
  onHandleWheel(id: string, qRatio: number): void;
  /** A click (no drag) on or near a curve of the magnitude plot. */
  onCurveClick(curveId: string): void;
}

/** A group-delay peak beyond the axis, for the note beside the plot. */
export interface GroupDelayClip extends ClippedPeak {
  curveId: string;
  label: string;
  color: string;
  frequency: number;
}

const HANDLE_RADIUS = 9;
const HIT_RADIUS = 13;
const RAD_TO_DEG = 180 / Math.PI;

/** Short enough to fit beside the shortest plot (the group delay plot at 600 px tall windows). */
const TITLES: Record<PlotKind, string> = { magnitude: 'magnitude dB', phase: 'phase \u00b0', groupDelay: 'delay ms' };

function dataFor(c: PlotCurve, kind: PlotKind, phaseMode: PlotFrame['phaseMode']): Float64Array | undefined {
  if (c.only && !c.only.includes(kind)) return undefined;
  if (kind === 'magnitude') return c.data.magnitudeDb;
  if (kind === 'groupDelay') return c.data.groupDelayMs;
  return phaseMode === 'wrapped' ? c.data.phaseRad : c.data.phaseUnwrappedRad;
}

export class ResponsePlots {
  readonly plots: Record<PlotKind, Plot>;
  #frame: PlotFrame | null = null;
  #hoverFrequency: number | null = null;
  #cb: PlotCallbacks;
  #detach: (() => void)[] = [];
  #yRanges: Record<'phase' | 'groupDelay', [number, number]> = { phase: [-180, 180], groupDelay: [-1, 5] };
  #clips: GroupDelayClip[] = [];
  /** For the UI benchmark and tests: the timeStamp of the input event behind the pending update. */
  pendingInputTime: number | null = null;

  constructor(canvases: Record<PlotKind, { base: HTMLCanvasElement; overlay: HTMLCanvasElement }>, callbacks: PlotCallbacks) {
    this.#cb = callbacks;
    const make = (kind: PlotKind) =>
      new Plot(canvases[kind].base, canvases[kind].overlay, {
        x: { kind: 'log', title: kind === 'groupDelay' ? 'frequency' : '', frequency: true, showTicks: kind === 'groupDelay' },
        y: { kind: 'linear', title: TITLES[kind] },
      });
    this.plots = { magnitude: make('magnitude'), phase: make('phase'), groupDelay: make('groupDelay') };
    for (const kind of PLOT_KINDS) {
      this.plots[kind].overlayExtras = (ctx, maps, theme) => this.#extras(kind, ctx, maps, theme);
      this.#detach.push(this.#listen(canvases[kind].overlay, kind));
    }
  }

  get frame(): PlotFrame | null {
    return this.#frame;
  }

  /** Group-delay peaks beyond the axis as drawn now (empty with the full range). */
  get clipped(): readonly GroupDelayClip[] {
    return this.#clips;
  }

  get counters(): { chartUpdates: number; baseDraws: number; overlayDraws: number } {
    const c = { chartUpdates: 0, baseDraws: 0, overlayDraws: 0 };
    for (const k of PLOT_KINDS) for (const key of Object.keys(c) as (keyof typeof c)[]) c[key] += this.plots[k].counters[key];
    return c;
  }

  refreshTheme(): void {
    for (const k of PLOT_KINDS) this.plots[k].refreshTheme();
  }

  update(frame: PlotFrame): void {
    this.#frame = frame;
    const hot = frame.hot;
    for (const kind of PLOT_KINDS) {
      const series: PlotSeries[] = [];
      for (const c of frame.curves) {
        const y = dataFor(c, kind, frame.phaseMode);
        if (!y) continue;
        series.push({ id: c.id, label: c.label, color: c.color, width: c.width, dash: c.dash, style: c.style ?? 'line', x: frame.frequencies, y, yScale: kind === 'phase' ? RAD_TO_DEG : 1 });
      }
      let y: [number, number];
      let yStep: number | undefined;
      if (kind === 'magnitude') {
        y = frame.magRange;
        yStep = magnitudeStep(y);
      } else if (kind === 'phase') {
        // Ranges follow the data when idle and hold still during a drag.
        if (!hot) this.#yRanges.phase = frame.phaseMode === 'wrapped' ? [-180, 180] : unwrappedPhaseRange(series.map((s) => s.y));
        y = this.#yRanges.phase;
        yStep = phaseStep(y, frame.phaseMode === 'wrapped');
      } else {
        if (!hot) this.#yRanges.groupDelay = groupDelayRange(series.filter((s) => s.style !== 'ghost').map((s) => s.y), frame.groupDelayFull);
        y = this.#yRanges.groupDelay;
        // Marks follow the data when idle, like the range (a drag frame draws two curves, no more).
        if (!hot)
          this.#clips = series
          .filter((s) => s.style !== 'ghost')
          .flatMap((s) => clippedPeaks(s.y, y[0], y[1]).map((p) => ({ ...p, curveId: s.id, label: s.label, color: s.color, frequency: frame.frequencies[p.index] })));
      }
      this.plots[kind].set({ x: frame.range, y, yStep }, series, hot);
    }
  }

  setHover(frequency: number | null): void {
    if (frequency === this.#hoverFrequency) return;
    this.#hoverFrequency = frequency;
    for (const k of PLOT_KINDS) this.plots[k].drawOverlay();
  }

  #extras(kind: PlotKind, ctx: CanvasRenderingContext2D, m: PlotMaps, t: Theme): void {
    const a = m.area;
    const f = this.#hoverFrequency;
    if (f !== null && f >= m.x.min && f <= m.x.max) {
      const x = m.x.toPixel(f);
      ctx.save();
      ctx.strokeStyle = t.muted;
      ctx.lineWidth = 1;
      ctx.setLineDash([3, 3]);
      ctx.beginPath();
      ctx.moveTo(x, a.top);
      ctx.lineTo(x, a.bottom);
      ctx.stroke();
      ctx.restore();
    }
    const frame = this.#frame;
    if (!frame) return;
    if (kind === 'groupDelay') this.#clipMarks(ctx, m);
    if (kind === 'magnitude') this.#handles(ctx, m, t, frame.handles);
  }

  /** A small filled triangle at the edge, in the curve's colour, pointing at each clipped peak. */
  #clipMarks(ctx: CanvasRenderingContext2D, m: PlotMaps): void {
    const a = m.area;
    ctx.save();
    for (const c of this.#clips) {
      const x = m.x.toPixel(c.frequency);
      if (x < a.left || x > a.right) continue;
      const y = c.side === 'above' ? a.top + 1 : a.bottom - 1;
      const s = c.side === 'above' ? 1 : -1;
      ctx.fillStyle = c.color;
      ctx.beginPath();
      ctx.moveTo(x, y);
      ctx.lineTo(x - 5, y + 8 * s);
      ctx.lineTo(x + 5, y + 8 * s);
      ctx.closePath();
      ctx.fill();
    }
    ctx.restore();
  }

  #handles(ctx: CanvasRenderingContext2D, m: PlotMaps, t: Theme, list: readonly PlotHandle[]): void {
    const a = m.area;
    ctx.save();
    ctx.beginPath();
    ctx.rect(a.left - HANDLE_RADIUS - 3, a.top - HANDLE_RADIUS - 3, a.width + 2 * HANDLE_RADIUS + 6, a.height + 2 * HANDLE_RADIUS + 6);
    ctx.clip();
    ctx.font = '600 11px system-ui, sans-serif';
    ctx.textAlign = 'center';
    ctx.textBaseline = 'middle';
    const handles = [...list].sort((p, q) => Number(p.selected) - Number(q.selected));
    for (const h of handles) {
      const p = this.#handleAt(m, h);
      if (!p) continue;
      const { x, y } = p;
      const r = h.selected ? HANDLE_RADIUS + 2 : HANDLE_RADIUS;
      if (h.selected) {
        ctx.strokeStyle = h.color;
        ctx.lineWidth = 1;
        ctx.globalAlpha = 0.6;
        ctx.setLineDash([2, 3]);
        ctx.beginPath();
        ctx.moveTo(x, a.top);
        ctx.lineTo(x, a.bottom);
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

  #handleAt(m: PlotMaps, h: PlotHandle): { x: number; y: number } | null {
    if (h.frequency < m.x.min || h.frequency > m.x.max) return null;
    const a = m.area;
    return { x: m.x.toPixel(h.frequency), y: Math.min(a.bottom, Math.max(a.top, m.y.toPixel(h.db))) };
  }

  /** Canvas-relative pixel of a handle, or null when off the plot. */
  handlePixel(id: string): { x: number; y: number } | null {
    const h = this.#frame?.handles.find((k) => k.id === id);
    const m = this.plots.magnitude.maps();
    return h && m ? this.#handleAt(m, h) : null;
  }

  /** Canvas-relative pixel of (Hz, dB) on the magnitude plot. */
  magnitudePixel(frequencyHz: number, db: number): { x: number; y: number } | null {
    const m = this.plots.magnitude.maps();
    return m ? { x: m.x.toPixel(frequencyHz), y: m.y.toPixel(db) } : null;
  }

  #hitHandle(x: number, y: number): string | null {
    let best: string | null = null;
    let bestD = HIT_RADIUS;
    const m = this.plots.magnitude.maps();
    if (!m) return null;
    // The selected handle wins ties (it is drawn on top).
    for (const h of [...(this.#frame?.handles ?? [])].sort((p, q) => Number(q.selected) - Number(p.selected))) {
      const p = this.#handleAt(m, h);
      if (!p) continue;
      const d = Math.hypot(p.x - x, p.y - y);
      if (d < bestD) {
        bestD = d;
        best = h.id;
      }
    }
    return best;
  }

  /** The output curve of the magnitude plot passing within a few pixels of (x, y), nearest first. */
  #curveAt(x: number, y: number): string | null {
    const frame = this.#frame;
    const m = this.plots.magnitude.maps();
    if (!frame || !m) return null;
    const f = m.x.toValue(x);
    let best: string | null = null;
    let bestD = 7;
    for (const c of frame.curves) {
      if (c.only || c.style === 'ghost' || !(c.id.startsWith('out:') || c.id === 'input') || !c.data.magnitudeDb) continue;
      const v = valueAt(frame.frequencies, c.data.magnitudeDb, f);
      if (!Number.isFinite(v)) continue;
      const d = Math.abs(m.y.toPixel(v) - y);
      if (d < bestD) {
        bestD = d;
        best = c.id;
      }
    }
    return best;
  }

  #listen(canvas: HTMLCanvasElement, kind: PlotKind): () => void {
    const magnitude = kind === 'magnitude';
    return attachGestures(canvas, {
      maps: () => this.plots[kind].maps(),
      zoom: 'x',
      onView: (x) => this.#cb.onRange(x[0], x[1]),
      onReset: () => this.#cb.onResetRange(),
      onHover: (f) => this.#cb.onHover(f),
      hitHandle: magnitude ? (x, y) => this.#hitHandle(x, y) : undefined,
      handleTitle: magnitude ? (id) => this.#frame?.handles.find((h) => h.id === id)?.title ?? null : undefined,
      onHandleDown: (id) => this.#cb.onHandleDown(id),
      onHandleDrag: (id, d) => this.#cb.onHandleDrag(id, d),
      onHandleUp: (id, moved) => this.#cb.onHandleUp(id, moved),
      onHandleWheel: magnitude ? (id, q) => this.#cb.onHandleWheel(id, q) : undefined,
      onClick: magnitude
        ? (x, y) => {
            const id = this.#curveAt(x, y);
            if (id) this.#cb.onCurveClick(id);
          }
        : undefined,
      onInput: (t) => (this.pendingInputTime = t),
    });
  }

  /** Every plot's curves in paint order with the values drawn (tests compare them with the core). */
  plotted(): Record<PlotKind, PlottedSeries[]> {
    return { magnitude: this.plots.magnitude.plotted(), phase: this.plots.phase.plotted(), groupDelay: this.plots.groupDelay.plotted() };
  }

  destroy(): void {
    for (const f of this.#detach) f();
    for (const k of PLOT_KINDS) this.plots[k].destroy();
  }
}
