/**
 * Cramping: how far each band's and edge's digital magnitude departs from its analog prototype
 * (src/design/analog.ts) over a frequency range. The figure is the largest |digital dB - analog
 * dB| on a log grid, with both clamped at CRAMPING_FLOOR_DB (a deep stop band or a notch's zero
 * is not a shape error), and where it occurs.
 */
import { analogComplex, analogMagnitudeDb, bandPrototype, edgeAnalogPrototype, type AnalogPrototype } from '../design/analog';
import { bandDesignMethod, designBandBy } from '../design/band';
import { designEdge } from '../design/crossover';
import type { Section } from '../design/section';
import type { Band, Crossover, DesignMethod, EdgeKind, Plan } from '../plan/types';
import { cascadeWithGainDelay, logFrequencies } from '../response/chain-response';
import { normalizedOmega } from '../response/kernel';
import { CRAMPING_FLOOR_DB, CRAMPING_LOW_HZ, CRAMPING_POINTS, crampingTopHz } from './thresholds';

export interface Deviation {
  /** Digital minus analog (dB) where |difference| is largest; 0 when they agree everywhere. */
  deviationDb: number;
  frequencyHz: number;
}

/** The largest deviation of two magnitude curves (dB) on the same grid, both clamped at the floor. */
export function largestDeviation(digitalDb: ArrayLike<number>, analogDb: ArrayLike<number>, frequenciesHz: ArrayLike<number>): Deviation {
  let best: Deviation = { deviationDb: 0, frequencyHz: frequenciesHz[0] ?? 0 };
  for (let i = 0; i < frequenciesHz.length; i++) {
    const d = Math.max(digitalDb[i], CRAMPING_FLOOR_DB) - Math.max(analogDb[i], CRAMPING_FLOOR_DB);
    if (Math.abs(d) > Math.abs(best.deviationDb)) best = { deviationDb: d, frequencyHz: frequenciesHz[i] };
  }
  return best;
}

/** The cramping range's grid at a sample rate (or from..to when given). */
export function crampingGrid(sampleRateHz: number, fromHz = CRAMPING_LOW_HZ, toHz = crampingTopHz(sampleRateHz)): Float64Array {
  return logFrequencies(CRAMPING_POINTS, fromHz, Math.max(fromHz, toHz));
}

/** Magnitude (dB) of sections on a grid. */
export function sectionsMagnitudeDb(sections: readonly Section[], frequenciesHz: Float64Array, sampleRateHz: number): Float64Array {
  return cascadeWithGainDelay(sections, 1, 0, normalizedOmega(frequenciesHz, sampleRateHz), sampleRateHz).magnitudeDb;
}

function deviationOf(sections: Section[], proto: AnalogPrototype, grid: Float64Array, sampleRateHz: number): Deviation {
  return largestDeviation(sectionsMagnitudeDb(sections, grid, sampleRateHz), analogMagnitudeDb(analogComplex([proto], grid)), grid);
}

/** A band's cramping at a sample rate, by its design method; null for a raw band. */
export function bandCramping(band: Band, sampleRateHz: number, defaultMethod: DesignMethod = 'bilinear', grid = crampingGrid(sampleRateHz)): Deviation | null {
  const proto = bandPrototype(band);
  if (!proto) return null;
  return deviationOf(designBandBy(band, sampleRateHz, defaultMethod), proto, grid, sampleRateHz);
}

/** An edge's cramping at a sample rate (edges are always bilinear). */
export function edgeCramping(edge: Crossover, kind: EdgeKind, sampleRateHz: number, grid = crampingGrid(sampleRateHz)): Deviation {
  return deviationOf(designEdge(edge, kind, sampleRateHz), edgeAnalogPrototype(edge, kind), grid, sampleRateHz);
}

export type CrampingTarget = { kind: 'band'; chain: string; bandId: string } | { kind: 'edge'; outputId: string; edge: EdgeKind };

export interface CrampingEntry extends Deviation {
  target: CrampingTarget;
  /** The design method the band runs with ("bilinear" for edges). */
  method: DesignMethod;
  frequencyOfItemHz: number;
}

/**
 * Figures on the default grid, kept per band or edge object and the inputs that change them: an
 * edit replaces only what it touches, so `check` on every keystroke (the status bar) recomputes
 * one band's figure, not a thousand.
 */
const kept = new WeakMap<object, { key: string; value: Deviation | null }>();
function keptFigure(item: object, key: string, compute: () => Deviation | null): Deviation | null {
  const k = kept.get(item);
  if (k && k.key === key) return k.value;
  const value = compute();
  kept.set(item, { key, value });
  return value;
}

/** Cramping of every enabled band (not raw) and every edge of a plan, in plan order. */
export function planCramping(plan: Plan, grid?: Float64Array): CrampingEntry[] {
  const out: CrampingEntry[] = [];
  const onGrid = grid ?? crampingGrid(plan.sampleRate);
  const figure = (item: object, method: string, compute: () => Deviation | null) =>
    grid ? compute() : keptFigure(item, `${plan.sampleRate} ${method}`, compute);
  const bands = (chain: string, list: readonly Band[]) => {
    for (const b of list) {
      if (!b.enabled) continue;
      const d = figure(b, plan.defaultDesign ?? 'bilinear', () => bandCramping(b, plan.sampleRate, plan.defaultDesign, onGrid));
      if (d) out.push({ ...d, target: { kind: 'band', chain, bandId: b.id }, method: bandDesignMethod(b, plan.defaultDesign), frequencyOfItemHz: b.frequency });
    }
  };
  bands('input', plan.input.bands);
  for (const o of plan.outputs) {
    for (const kind of ['highPass', 'lowPass'] as const) {
      const e = o[kind];
      if (e) out.push({ ...(figure(e, kind, () => edgeCramping(e, kind, plan.sampleRate, onGrid)) as Deviation), target: { kind: 'edge', outputId: o.id, edge: kind }, method: 'bilinear', frequencyOfItemHz: e.frequency });
    }
    bands(o.id, o.bands);
  }
  return out;
}
