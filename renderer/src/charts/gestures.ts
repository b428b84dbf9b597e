/**
 * Pointer and key gestures on a plot, apart from drawing: drag a handle (frequency and gain, or
 * Q with Alt/Ctrl held), wheel on a handle (Q), wheel on the plot (zoom about the pointer), drag
 * the background (pan), double-click (reset), hover (readout), a click without a move, and the
 * keys that nudge the selected band. Pointer positions become values through the plot's own
 * `AxisMap`s, the ones it draws with.
 */
import { panBy, zoomAbout, type AxisMap } from './mapping';
import type { PlotMaps } from './plot';

export interface DragDelta {
  /** New frequency / frequency at grab. */
  freqRatio: number;
  /** dB moved vertically since the grab. */
  deltaDb: number;
  /** Q factor change when dragging with Alt or Ctrl held (vertical motion), else 1. */
  qRatio: number;
  qMode: boolean;
}

export interface GestureOptions {
  /** The pixel mappers of the plot as drawn now (null before its first layout). */
  maps(): PlotMaps | null;
  /** Which axes wheel and background drag move; none when absent. */
  zoom?: 'x' | 'xy';
  onView?(x: [number, number], y: [number, number] | null): void;
  onReset?(): void;
  /** The x (and y) value under the pointer, or null when it leaves the plot. */
  onHover?(x: number | null, y: number | null): void;
  /** Handle under a canvas-relative pixel, or null. */
  hitHandle?(x: number, y: number): string | null;
  /** The tooltip of a handle (what band it is), shown while the pointer rests on it. */
  handleTitle?(id: string): string | null;
  onHandleDown?(id: string): void;
  onHandleDrag?(id: string, d: DragDelta): void;
  onHandleUp?(id: string, moved: boolean): void;
  onHandleWheel?(id: string, qRatio: number): void;
  /** A click (press and release without a move) on the background. */
  onClick?(x: number, y: number): void;
  /** Called with the input event's timeStamp before a drag frame's callbacks (frame timing). */
  onInput?(timeStamp: number): void;
}

/** Pixels of slack around the plot area where a handle drawn on the edge can still be grabbed. */
export const EDGE_SLACK = 9;
/** Vertical pixels of an Alt-drag that double (or halve) Q. */
const Q_DOUBLING_PX = 60;

function inArea(m: PlotMaps | null, x: number, y: number): boolean {
  const a = m?.area;
  return !!a && x >= a.left - EDGE_SLACK && x <= a.right + EDGE_SLACK && y >= a.top - EDGE_SLACK && y <= a.bottom + EDGE_SLACK;
}

/**
 * The change a handle drag stands for, from the grab pixel to the pointer. The pointer counts
 * only as far as the plot's edges: a drag past them does not run on to the +-60 dB or 1 Hz
 * limits unseen (a big boost can destroy a driver).
 */
export function dragDelta(m: PlotMaps, grab: { x: number; y: number }, at: { x: number; y: number }, qMode: boolean): DragDelta {
  const a = m.area;
  const px = Math.min(a.right, Math.max(a.left, at.x));
  const py = Math.min(a.bottom, Math.max(a.top, at.y));
  return {
    freqRatio: m.x.toValue(px) / m.x.toValue(grab.x),
    deltaDb: qMode ? 0 : m.y.toValue(py) - m.y.toValue(grab.y),
    qRatio: qMode ? Math.pow(2, -(at.y - grab.y) / Q_DOUBLING_PX) : 1,
    qMode,
  };
}

/** Wheel steps from a wheel event (lines or pixels), limited so one flick does not jump far. */
function wheelSteps(e: WheelEvent): number {
  return Math.max(-4, Math.min(4, e.deltaY / (e.deltaMode === 1 ? 3 : 100)));
}

/** Attaches the gestures to `el` (the plot's top canvas); returns the function that detaches them. */
export function attachGestures(el: HTMLElement, o: GestureOptions): () => void {
  type Drag =
    | { kind: 'handle'; id: string; x0: number; y0: number; moved: boolean }
    | { kind: 'pan'; x0: number; y0: number; mx: AxisMap; my: AxisMap; moved: boolean }
    | null;
  let drag: Drag = null;
  const off: (() => void)[] = [];
  const on = <K extends keyof HTMLElementEventMap>(type: K, fn: (e: HTMLElementEventMap[K]) => void, opts?: AddEventListenerOptions) => {
    el.addEventListener(type, fn as EventListener, opts);
    off.push(() => el.removeEventListener(type, fn as EventListener, opts));
  };

  on('pointerdown', (e) => {
    if (e.button !== 0) return;
    const m = o.maps();
    if (!m || !inArea(m, e.offsetX, e.offsetY)) return;
    const hit = o.hitHandle?.(e.offsetX, e.offsetY) ?? null;
    el.setPointerCapture?.(e.pointerId);
    if (hit) {
      drag = { kind: 'handle', id: hit, x0: e.offsetX, y0: e.offsetY, moved: false };
      el.style.cursor = 'grabbing';
      o.onHandleDown?.(hit);
    } else {
      drag = { kind: 'pan', x0: e.offsetX, y0: e.offsetY, mx: m.x, my: m.y, moved: false };
    }
    e.preventDefault();
  });

  on('pointermove', (e) => {
    const m = o.maps();
    const d = drag;
    if (d?.kind === 'handle' && m) {
      d.moved = true;
      o.onInput?.(e.timeStamp);
      o.onHandleDrag?.(d.id, dragDelta(m, { x: d.x0, y: d.y0 }, { x: e.offsetX, y: e.offsetY }, e.altKey || e.ctrlKey || e.metaKey));
    } else if (d?.kind === 'pan') {
      const dx = e.offsetX - d.x0;
      const dy = e.offsetY - d.y0;
      if (Math.hypot(dx, dy) > 2) d.moved = true;
      if (d.moved && o.zoom) o.onView?.(panBy(d.mx, dx), o.zoom === 'xy' ? panBy(d.my, dy) : null);
    } else {
      const inside = inArea(m, e.offsetX, e.offsetY);
      o.onHover?.(inside && m ? m.x.toValue(e.offsetX) : null, inside && m ? m.y.toValue(e.offsetY) : null);
      const over = inside ? (o.hitHandle?.(e.offsetX, e.offsetY) ?? null) : null;
      el.style.cursor = over ? 'grab' : 'crosshair';
      const title = over ? (o.handleTitle?.(over) ?? '') : '';
      if (el.title !== title) el.title = title;
    }
  });

  const end = (e: PointerEvent) => {
    const d = drag;
    drag = null;
    el.releasePointerCapture?.(e.pointerId);
    if (d?.kind === 'handle') {
      el.style.cursor = 'grab';
      o.onHandleUp?.(d.id, d.moved);
    } else if (d?.kind === 'pan' && !d.moved && e.type === 'pointerup') {
      o.onClick?.(e.offsetX, e.offsetY);
    }
  };
  on('pointerup', end);
  on('pointercancel', end);
  on('pointerleave', () => {
    if (!drag) o.onHover?.(null, null);
  });

  on(
    'wheel',
    (e) => {
      const m = o.maps();
      if (!m || !inArea(m, e.offsetX, e.offsetY)) return;
      const steps = wheelSteps(e);
      const hit = o.hitHandle?.(e.offsetX, e.offsetY) ?? null;
      if (hit && o.onHandleWheel) {
        e.preventDefault();
        o.onHandleWheel(hit, Math.pow(1.1, -steps));
        return;
      }
      if (!o.zoom) return;
      e.preventDefault();
      const k = Math.pow(1.25, steps);
      o.onView?.(zoomAbout(m.x, e.offsetX, k), o.zoom === 'xy' ? zoomAbout(m.y, e.offsetY, k) : null);
    },
    { passive: false },
  );

  on('dblclick', (e) => {
    if (o.hitHandle?.(e.offsetX, e.offsetY)) return;
    o.onReset?.();
  });

  return () => {
    for (const f of off) f();
  };
}

export type NudgeTarget = 'frequency' | 'gain' | 'q';

/**
 * The nudge a key stands for on the selected band: arrows left/right move frequency (1/24 octave,
 * Shift 1/3), up/down gain (0.1 dB, Shift 1 dB), Page Up/Down Q (5 %, Shift 25 %). Null for
 * any other key.
 */
export function nudgeForKey(e: Pick<KeyboardEvent, 'key' | 'shiftKey'>): { what: NudgeTarget; direction: 1 | -1; large: boolean } | null {
  const large = e.shiftKey;
  switch (e.key) {
    case 'ArrowLeft':
    case 'ArrowRight':
      return { what: 'frequency', direction: e.key === 'ArrowRight' ? 1 : -1, large };
    case 'ArrowUp':
    case 'ArrowDown':
      return { what: 'gain', direction: e.key === 'ArrowUp' ? 1 : -1, large };
    case 'PageUp':
    case 'PageDown':
      return { what: 'q', direction: e.key === 'PageUp' ? 1 : -1, large };
    default:
      return null;
  }
}
