/**
 * The band fitter: places peaking bands (and, when allowed, a shelf at each end of the range) so
 * that the smoothed predicted response meets a target, within bounds (docs/fitting.md).
 *
 * Error. At each grid point inside the range, e = S - T - L: S the 1/N-octave smoothed level of
 * the predicted response with the fitted bands (smoothing the product, so a narrow band is judged
 * as the smoothed plot shows it), T the target's shape, L its level. The points are uniform in
 * log f with trapezoid weights, so the sum of w e^2 is the error integrated per octave. Points
 * whose smoothing window touches a declined null (the response more than `nullDepthDb` below its
 * own 1/3-octave smoothed level, where a boost would be needed) weigh nothing: EQ cannot fill a
 * cancellation, and boosting into one only spends headroom.
 *
 * Method. A deterministic start, then all band parameters refined together:
 * 1. Greedy: the largest weighted deviation of the smoothed error gets a band of the opposite
 *    gain at its frequency, its Q from the deviation's width at half its height (the cookbook's
 *    bandwidth relation), refined alone for a few iterations (every fourth band, all of them
 *    together), and the next largest deviation is taken, until the band count is reached or no
 *    deviation exceeds half the tolerance (or `minDeviationDb`, if larger).
 * 2. Levenberg-Marquardt (K. Levenberg 1944, D. W. Marquardt 1963; docs/references.md,
 *    "Fitting") on every parameter at once, with the kept `ml-levenberg-marquardt` library:
 *    parameters log2 f, gain dB, log2 Q, held inside their bounds by projection (the library's
 *    minValues / maxValues). The Jacobian is given to it: each band's level derivative by central
 *    differences (only that band changes), carried exactly through the smoothing.
 * 3. Toward the tolerance: a few rounds of reweighting (Lawson), keeping the best candidate.
 * 4. The added gain limit (headroom): a penalty while the bands' summed level passes it, then the
 *    boosts at the worst frequency lowered in proportion, so the result never exceeds it.
 *
 * The same problem and options give the same bands: no randomness, no clock.
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { designBand } from '../design/cookbook';
import type { Band } from '../plan/types';
import { addSectionDb, gridTrig, type GridTrig } from './bands';
import { smoothDb, smoothingOperator, type FitGrid, type SmoothingOperator } from './grid';

/** What a fit works on: the grid, the response without the fitter's bands, the target's shape. */
export interface FitProblem {
  sampleRateHz: number;
  grid: FitGrid;
  /** The predicted level (dB) at each grid point without the bands being fitted. */
  baseDb: Float64Array;
  /** The target's shape (dB) at each grid point, before its level. */
  targetDb: Float64Array;
}

export interface FitOptions {
  /** The most bands to place (the section budget left, unless fewer are asked for). */
  bands: number;
  /** dB, the largest boost of one band (default 6). */
  maxBoostDb: number;
  /** dB, the deepest cut of one band, positive (default 15). */
  maxCutDb: number;
  qMin: number;
  qMax: number;
  /** 1/N octave smoothing of the error (default 6). */
  smoothingN: number;
  /** dB below the 1/3-octave smoothed level that makes a null nobody boosts (default 6). */
  nullDepthDb: number;
  /** dB, the most the bands together may raise the level anywhere (headroom they may spend; default 6). */
  maxAddedGainDb: number;
  alignment: 'mean' | 'median';
  /** The target's level in dB; absent: found by `alignment`. */
  levelDb?: number;
  /** A low shelf at the range's low end and a high shelf at its high end, besides the peaking bands. */
  shelves: boolean;
  /** dB: no more bands once the largest deviation is below this or half the tolerance (default 0.25). */
  minDeviationDb: number;
  /** dB, the tolerance the report measures the result against (default 1). */
  toleranceDb: number;
}

export const DEFAULT_FIT_OPTIONS: Omit<FitOptions, 'bands'> = {
  maxBoostDb: 6,
  maxCutDb: 15,
  qMin: 0.5,
  qMax: 12,
  smoothingN: 6,
  nullDepthDb: 6,
  maxAddedGainDb: 6,
  alignment: 'mean',
  shelves: false,
  minDeviationDb: 0.25,
  toleranceDb: 1,
};

export interface FitHooks {
  /** Called between iterations with the fraction done (0..1). */
  progress?: (fraction: number) => void;
  /** Checked between iterations: true stops the fit, which then returns nothing. */
  aborted?: () => boolean;
}

export type FitLimit = 'budget' | 'max-boost' | 'max-cut' | 'q-min' | 'q-max' | 'range' | 'added-gain';

export interface FittedBand {
  type: 'peaking' | 'lowShelf' | 'highShelf';
  frequency: number;
  gainDb: number;
  q: number;
  /** Limits this band sits on after the fit. */
  bound: FitLimit[];
}

export interface ErrorFigures {
  /** dB, the per-octave weighted RMS of the smoothed error over the range (declined nulls left out). */
  rmsDb: number;
  /** dB, the largest |error| there, and where. */
  maxDb: number;
  maxAtHz: number;
}

export interface Shortfall {
  fromHz: number;
  toHz: number;
  /** dB, the worst signed error in this stretch (positive: above the target). */
  worstDb: number;
  reason: 'null' | 'max-boost' | 'max-cut' | 'budget' | 'added-gain' | 'shape';
}

export interface FitResult {
  bands: FittedBand[];
  levelDb: number;
  before: ErrorFigures;
  after: ErrorFigures;
  /** Stretches of declined nulls (Hz), where the error is not counted. */
  nulls: { fromHz: number; toHz: number; depthDb: number }[];
  /** Every limit that bound somewhere. */
  bound: FitLimit[];
  /** Where the result stays outside the tolerance, and why. */
  shortfalls: Shortfall[];
  /** dB, the largest level the bands together add. */
  addedGainDb: number;
  iterations: number;
  /** The smoothed error after the fit at every grid point (NaN outside the range). */
  errorDb: Float64Array;
}

export class FitAborted extends Error {
  constructor() {
    super('the fit was cancelled');
    this.name = 'FitAborted';
  }
}

interface Slot {
  type: FittedBand['type'];
}

/** Parameter layout: per band [log2 f, gain dB, log2 Q]. */
const P = 3;
/** Shelves keep Q at 1/sqrt(2) (S near 1: monotonic). */
const SHELF_Q = Math.SQRT1_2;
/** Central-difference steps for log2 f, gain, log2 Q (the level is smooth in each). */
const STEP = [1e-4, 1e-3, 1e-4];

class Model {
  readonly n: number;
  readonly trig: GridTrig;
  readonly op: SmoothingOperator;
  readonly halfWindow: number;
  readonly basePower: Float64Array;
  readonly shape: Float64Array;
  /** The target's level, dB: fixed, or refined with the bands when `freeLevel`. */
  level: number;
  freeLevel: boolean;
  readonly weight: Float64Array;
  /** Sqrt of the per-octave weight of the added-gain penalty at each grid point. */
  readonly penaltyWeight: number;
  iterations = 0;

  constructor(
    readonly problem: FitProblem,
    readonly options: FitOptions,
    levelDb: number,
    weight: Float64Array,
    freeLevel: boolean,
  ) {
    const g = problem.grid;
    this.n = g.frequenciesHz.length;
    this.trig = gridTrig(g.frequenciesHz, problem.sampleRateHz);
    this.op = smoothingOperator(this.n, g.perOctave, options.smoothingN);
    this.halfWindow = Math.round(g.perOctave / (2 * options.smoothingN));
    this.basePower = problem.baseDb.map((d) => Math.pow(10, d / 10));
    this.shape = problem.targetDb;
    this.level = levelDb;
    this.freeLevel = freeLevel;
    this.weight = weight;
    this.penaltyWeight = Math.sqrt(1000 / g.perOctave);
  }

  bandDb(slot: Slot, p: ArrayLike<number>, off: number, into: Float64Array, sign = 1): void {
    const band: Band = { id: 'fit', type: slot.type, frequency: Math.pow(2, p[off]), gainDb: p[off + 1], q: Math.pow(2, p[off + 2]), enabled: true };
    for (const s of designBand(band, this.problem.sampleRateHz)) addSectionDb(s, this.trig, into, sign);
  }

  /** The bands' summed level at each grid point. */
  /** The summed level of bands held fixed while others are refined (none: null). */
  fixedDb: Float64Array | null = null;

  bandsDb(slots: readonly Slot[], p: ArrayLike<number>): Float64Array {
    const sum = this.fixedDb ? this.fixedDb.slice() : new Float64Array(this.n);
    slots.forEach((s, k) => this.bandDb(s, p, k * P, sum));
    return sum;
  }

  /** The smoothed predicted level (dB) with bands of summed level `bands`, and the linear power behind it. */
  smoothed(bands: Float64Array): { level: Float64Array; power: Float64Array } {
    const power = new Float64Array(this.n);
    for (let i = 0; i < this.n; i++) power[i] = this.basePower[i] * Math.pow(10, bands[i] / 10);
    const level = new Float64Array(this.n);
    const op = this.op;
    for (let i = 0; i < this.n; i++) {
      let s = 0;
      for (let e = op.start[i]; e < op.start[i + 1]; e++) s += op.w[e] * power[op.cols[e]];
      level[i] = 10 * Math.log10(s);
    }
    return { level, power };
  }

  /**
   * Grid points watched for the added-gain penalty in one refinement: those where the bands
   * already come within 6 dB of the limit. A step that jumps further is caught afterwards: the
   * candidates are scored with any excess, and the limit is repaired exactly at the end.
   */
  watched: Int32Array = new Int32Array(0);

  /** The weighted residuals: per grid point the error, then per watched point the added-gain penalty. */
  residuals(slots: readonly Slot[], p: ArrayLike<number>): Float64Array {
    const bands = this.bandsDb(slots, p);
    const { level } = this.smoothed(bands);
    // A parameter past the bands' is the target's level.
    const L = p.length > slots.length * P ? p[slots.length * P] : this.level;
    const r = new Float64Array(this.n + this.watched.length);
    for (let i = 0; i < this.n; i++) r[i] = this.weight[i] > 0 ? Math.sqrt(this.weight[i]) * (level[i] - this.shape[i] - L) : 0;
    this.watched.forEach((i, w) => {
      const over = bands[i] - this.options.maxAddedGainDb;
      r[this.n + w] = over > 0 ? this.penaltyWeight * over : 0;
    });
    return r;
  }

  /** d residual / d parameter for every residual (rows) and parameter (columns). */
  jacobian(slots: readonly Slot[], p: number[]): Float64Array[] {
    const n = this.n;
    const bands = this.bandsDb(slots, p);
    const { power } = this.smoothed(bands);
    const op = this.op;
    const denom = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let e = op.start[i]; e < op.start[i + 1]; e++) s += op.w[e] * power[op.cols[e]];
      denom[i] = s;
    }
    const rows: Float64Array[] = Array.from({ length: n + this.watched.length }, () => new Float64Array(p.length));
    const plus = new Float64Array(n);
    const minus = new Float64Array(n);
    const q = p.slice();
    slots.forEach((slot, k) => {
      for (let j = 0; j < P; j++) {
        const idx = k * P + j;
        const h = STEP[j];
        plus.fill(0);
        minus.fill(0);
        q[idx] = p[idx] + h;
        this.bandDb(slot, q, k * P, plus);
        q[idx] = p[idx] - h;
        this.bandDb(slot, q, k * P, minus);
        q[idx] = p[idx];
        // d(band level)/dp at each point, then through the smoothing:
        // dS_i/dp = sum_j W_ij P_j dD_j/dp / sum_j W_ij P_j (levels in dB, powers linear).
        // Only where the band's level moves at all: far from a band its derivative underflows.
        let a = n;
        let b = -1;
        for (let i = 0; i < n; i++) {
          plus[i] = (plus[i] - minus[i]) / (2 * h);
          if (Math.abs(plus[i]) > 1e-12) {
            if (a === n) a = i;
            b = i;
          }
        }
        a = Math.max(0, a - this.halfWindow);
        b = Math.min(n - 1, b + this.halfWindow);
        for (let i = a; i <= b; i++) {
          if (this.weight[i] > 0) {
            let s = 0;
            for (let e = op.start[i]; e < op.start[i + 1]; e++) s += op.w[e] * power[op.cols[e]] * plus[op.cols[e]];
            rows[i][idx] = (Math.sqrt(this.weight[i]) * s) / denom[i];
          }
        }
        this.watched.forEach((i, w) => {
          if (bands[i] > this.options.maxAddedGainDb) rows[n + w][idx] = this.penaltyWeight * plus[i];
        });
      }
    });
    if (p.length > slots.length * P) for (let i = 0; i < n; i++) if (this.weight[i] > 0) rows[i][slots.length * P] = -Math.sqrt(this.weight[i]);
    return rows;
  }

  /** Refines every parameter together with Levenberg-Marquardt within [lo, hi]. */
  refine(slots: readonly Slot[], p0: number[], lo0: number[], hi0: number[], maxIterations: number, tick: () => void): number[] {
    if (slots.length === 0) return p0;
    // The level rides along as one more parameter when it is free (and no bands are held).
    const withLevel = this.freeLevel && this.fixedDb === null;
    const start = this.bandsDb(slots, p0);
    const watched: number[] = [];
    for (let i = this.problem.grid.first; i <= this.problem.grid.last; i++) if (start[i] > this.options.maxAddedGainDb - 6) watched.push(i);
    this.watched = Int32Array.from(watched);
    const p = withLevel ? [...p0, this.level] : p0;
    const lo = withLevel ? [...lo0, this.level - 40] : lo0;
    const hi = withLevel ? [...hi0, this.level + 40] : hi0;
    const m = this.n + this.watched.length;
    const x = new Float64Array(m);
    for (let i = 0; i < m; i++) x[i] = i;
    const y = new Float64Array(m);
    let cache: { key: string; r: Float64Array } | null = null;
    const model = (params: number[]) => {
      const key = params.join(',');
      if (!cache || cache.key !== key) cache = { key, r: this.residuals(slots, params) };
      const r = cache.r;
      return (i: number) => r[i];
    };
    const jac = (params: number[]) => {
      // Called once per iteration, before its step: the place to report and to stop.
      tick();
      this.iterations++;
      const rows = this.jacobian(slots, params);
      // The library only indexes the partials: the row itself serves, uncopied.
      return (i: number) => rows[i] as unknown as number[];
    };
    const result = levenbergMarquardt({ x, y }, model, {
      initialValues: p,
      minValues: lo,
      maxValues: hi,
      jacobianFunction: jac,
      maxIterations,
      damping: 1e-2,
      errorTolerance: 1e-12,
    });
    const out = result.parameterValues;
    if (withLevel) this.level = out[out.length - 1];
    return withLevel ? out.slice(0, -1) : out;
  }
}

/** The per-octave weighted mean or median of xs where w > 0. */
function weightedLevel(xs: Float64Array, w: Float64Array, how: 'mean' | 'median'): number {
  const idx: number[] = [];
  for (let i = 0; i < xs.length; i++) if (w[i] > 0 && Number.isFinite(xs[i])) idx.push(i);
  if (idx.length === 0) return 0;
  if (how === 'mean') {
    let s = 0;
    let sw = 0;
    for (const i of idx) {
      s += w[i] * xs[i];
      sw += w[i];
    }
    return s / sw;
  }
  idx.sort((a, b) => xs[a] - xs[b] || a - b);
  const total = idx.reduce((s, i) => s + w[i], 0);
  let acc = 0;
  for (const i of idx) {
    acc += w[i];
    if (acc >= total / 2) return xs[i];
  }
  return xs[idx[idx.length - 1]];
}

function figures(err: Float64Array, w: Float64Array, freqs: Float64Array): ErrorFigures {
  let s = 0;
  let sw = 0;
  let max = 0;
  let at = NaN;
  for (let i = 0; i < err.length; i++) {
    if (!(w[i] > 0)) continue;
    s += w[i] * err[i] * err[i];
    sw += w[i];
    if (Math.abs(err[i]) > max || Number.isNaN(at)) {
      max = Math.abs(err[i]);
      at = freqs[i];
    }
  }
  return { rmsDb: sw > 0 ? Math.sqrt(s / sw) : 0, maxDb: max, maxAtHz: at };
}

/** Nulls, the points they decline, and the target's starting level (docs/fitting.md, "The error"). */
function prepare(problem: FitProblem, options: Pick<FitOptions, 'nullDepthDb' | 'smoothingN' | 'levelDb' | 'alignment'>) {
  const g = problem.grid;
  const n = g.frequenciesHz.length;
  // Nulls: the response more than nullDepthDb below its own 1/3-octave smoothed level.
  const third = smoothDb(smoothingOperator(n, g.perOctave, 3), problem.baseDb);
  const nullPoint = new Uint8Array(n);
  for (let i = 0; i < n; i++) if (problem.baseDb[i] < third[i] - options.nullDepthDb) nullPoint[i] = 1;
  // A null takes in its shoulders: as far as the response stays a quarter of that depth below the
  // level (a boost there would spill into the null).
  const shoulder = options.nullDepthDb / 4;
  for (let i = 1; i < n; i++) if (nullPoint[i - 1] && problem.baseDb[i] < third[i] - shoulder) nullPoint[i] = 1;
  for (let i = n - 2; i >= 0; i--) if (nullPoint[i + 1] && problem.baseDb[i] < third[i] - shoulder) nullPoint[i] = 1;
  // A smoothed point whose window touches a null point is judged by the null: left out.
  const k = Math.round(g.perOctave / (2 * options.smoothingN));
  const declined = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    if (!nullPoint[i]) continue;
    for (let j = Math.max(0, i - k); j <= Math.min(n - 1, i + k); j++) declined[j] = 1;
  }

  const op = smoothingOperator(n, g.perOctave, options.smoothingN);
  const smoothedBase = smoothDb(op, problem.baseDb);
  const weightAll = g.weights;
  const levelWeight = new Float64Array(n);
  for (let i = 0; i < n; i++) levelWeight[i] = declined[i] ? 0 : weightAll[i];
  const diff = smoothedBase.map((s, i) => s - problem.targetDb[i]);
  const levelDb = options.levelDb ?? weightedLevel(diff, levelWeight, options.alignment);

  return { nullPoint, declined, third, diff, levelDb };
}

/**
 * The target's level (dB) before a fit: `levelDb` when set, else the per-octave mean or median
 * of the smoothed response minus the target's shape over the range, outside the declined nulls.
 */
export function startingLevel(problem: FitProblem, options: Pick<FitOptions, 'nullDepthDb' | 'smoothingN' | 'levelDb' | 'alignment'>): number {
  return prepare(problem, options).levelDb;
}

/**
 * Fits up to `options.bands` bands to `problem`. Throws `FitAborted` when `hooks.aborted` says so
 * between iterations; otherwise always returns a result within every bound.
 */
export function fitBands(problem: FitProblem, options: FitOptions, hooks: FitHooks = {}): FitResult {
  const g = problem.grid;
  const freqs = g.frequenciesHz;
  const n = freqs.length;
  const fromHz = freqs[g.first];
  const toHz = freqs[g.last];

  const { nullPoint, declined, third, diff, levelDb } = prepare(problem, options);
  const weightAll = g.weights;

  // Declined points weigh nothing only where the response is below the target there (a boost
  // would be needed); a peak beside a null is still cut.
  const weight = new Float64Array(n);
  for (let i = 0; i < n; i++) weight[i] = declined[i] && diff[i] - levelDb < 0 ? 0 : weightAll[i];

  // Aligned by the mean and not set: the level that minimises the error is the mean of the
  // corrected response, so it is refined with the bands (it starts at the mean before the fit).
  const model = new Model(problem, options, levelDb, weight.slice(), options.levelDb === undefined && options.alignment === 'mean');
  const before = figures(
    diff.map((d) => d - levelDb),
    weight,
    freqs,
  );

  const lf = Math.log2(fromHz);
  const hf = Math.log2(toHz);
  const lq = Math.log2(options.qMin);
  const hq = Math.log2(options.qMax);
  const slots: Slot[] = [];
  let p: number[] = [];
  let lo: number[] = [];
  let hi: number[] = [];
  const budget = Math.max(0, Math.floor(options.bands));
  const totalIterations = Math.max(1, budget * 10 + 85);
  const tick = () => {
    if (hooks.aborted?.()) throw new FitAborted();
    hooks.progress?.(Math.min(0.99, model.iterations / totalIterations));
  };

  const errorNow = (): Float64Array => {
    const { level } = model.smoothed(model.bandsDb(slots, p));
    return level.map((s, i) => s - model.shape[i] - model.level);
  };

  // Shelves first, at the ends of the range, from the mean error of the outer octave.
  if (options.shelves && budget >= 2) {
    const e = errorNow();
    const outer = (from: number, to: number) => {
      let s = 0;
      let c = 0;
      for (let i = from; i <= to; i++) if (weight[i] > 0) (s += e[i]), c++;
      return c > 0 ? s / c : 0;
    };
    const oct = g.perOctave;
    const lowMean = outer(g.first, Math.min(g.last, g.first + oct));
    const highMean = outer(Math.max(g.first, g.last - oct), g.last);
    const clampGain = (x: number) => Math.min(options.maxBoostDb, Math.max(-options.maxCutDb, x));
    slots.push({ type: 'lowShelf' }, { type: 'highShelf' });
    p.push(lf + 1, clampGain(-lowMean), Math.log2(SHELF_Q), hf - 1, clampGain(-highMean), Math.log2(SHELF_Q));
    lo.push(lf, -options.maxCutDb, Math.log2(SHELF_Q), Math.max(lf, hf - 2), -options.maxCutDb, Math.log2(SHELF_Q));
    hi.push(Math.min(hf, lf + 2), options.maxBoostDb, Math.log2(SHELF_Q), hf, options.maxBoostDb, Math.log2(SHELF_Q));
    p = model.refine(slots, p, lo, hi, 10, tick);
  }

  // Greedy start, each new band refined with those before it.
  while (slots.length < budget) {
    const e = errorNow();
    let best = -1;
    // No band for a deviation already within half the tolerance (or minDeviationDb, if larger).
    let bestAbs = Math.max(options.minDeviationDb, options.toleranceDb / 2);
    const used = model.bandsDb(slots, p);
    for (let i = g.first; i <= g.last; i++) {
      if (!(weight[i] > 0)) continue;
      if (declined[i] && e[i] < 0) continue; // no boost into a null
      if (e[i] < 0 && used[i] > options.maxAddedGainDb - 0.5) continue; // no boost left to give here
      if (Math.abs(e[i]) > bestAbs) {
        bestAbs = Math.abs(e[i]);
        best = i;
      }
    }
    if (best < 0) break;
    const dev = e[best];
    // The deviation's width at half its height: its bandwidth in octaves.
    let a = best;
    while (a > g.first && Math.sign(e[a - 1]) === Math.sign(dev) && Math.abs(e[a - 1]) > Math.abs(dev) / 2) a--;
    let b = best;
    while (b < g.last && Math.sign(e[b + 1]) === Math.sign(dev) && Math.abs(e[b + 1]) > Math.abs(dev) / 2) b++;
    const bw = Math.max(1 / g.perOctave, Math.log2(freqs[b] / freqs[a]));
    const q = 1 / (2 * Math.sinh((Math.LN2 / 2) * bw));
    slots.push({ type: 'peaking' });
    p.push(Math.log2(freqs[best]), Math.min(options.maxBoostDb, Math.max(-options.maxCutDb, -dev)), Math.min(hq, Math.max(lq, Math.log2(q))));
    lo.push(lf, -options.maxCutDb, lq);
    hi.push(hf, options.maxBoostDb, hq);
    // The new band alone first (the others held), then every band together now and then: the
    // cost of a joint step grows with the square of the band count.
    const k = slots.length - 1;
    model.fixedDb = model.bandsDb(slots.slice(0, k), p.slice(0, k * P));
    const mine = model.refine([slots[k]], p.slice(k * P), lo.slice(k * P), hi.slice(k * P), 8, tick);
    model.fixedDb = null;
    p.splice(k * P, P, ...mine);
    if (slots.length % 4 === 0) p = model.refine(slots, p, lo, hi, 6, tick);
  }

  // Every parameter together.
  const greedy = { p: p.slice(), level: model.level };
  p = model.refine(slots, p, lo, hi, 40, tick);

  // Toward the tolerance: least squares lets a few points stay far out while the rest are close.
  // Points still beyond most of the tolerance weigh more, and the bands are refined again
  // (iteratively reweighted least squares toward the minimax fit, as in Lawson's algorithm).
  // The parameters kept are the candidate (the greedy start, the joint refinement, each
  // reweighted round) with the least error beyond the tolerance (then the smallest RMS), on the
  // original weights, any excess of added gain counting heavily against it.
  const near = 0.7 * options.toleranceDb;
  const score = (params: number[], level = model.level) => {
    const sum = model.bandsDb(slots, params);
    const e = model.smoothed(sum).level.map((x, i) => x - model.shape[i] - level);
    let excess = 0;
    for (let i = g.first; i <= g.last; i++) if (weight[i] > 0) excess += weight[i] * Math.pow(Math.max(0, Math.abs(e[i]) - options.toleranceDb), 2);
    let over = 0;
    for (const x of sum) over = Math.max(over, x - options.maxAddedGainDb);
    return [excess + 100 * over * over, figures(e, weight, freqs).rmsDb];
  };
  const better = (a: number[], b: number[]) => a[0] < b[0] - 1e-12 || (Math.abs(a[0] - b[0]) <= 1e-12 && a[1] < b[1]);
  let best = { ...greedy, s: score(greedy.p, greedy.level) };
  const consider = (params: number[]) => {
    const sc = score(params);
    if (better(sc, best.s)) best = { p: params, level: model.level, s: sc };
  };
  consider(p);
  for (let round = 0; round < 3 && slots.length > 0; round++) {
    const e = errorNow();
    let outside = false;
    for (let i = g.first; i <= g.last; i++) {
      if (model.weight[i] > 0 && Math.abs(e[i]) > near) {
        model.weight[i] *= Math.pow(Math.abs(e[i]) / near, 2);
        outside = true;
      }
    }
    if (!outside) break;
    p = model.refine(slots, p, lo, hi, 10, tick);
    consider(p);
  }
  p = best.p.slice();
  model.level = best.level;

  // Bands that ended at (almost) no gain do nothing: drop them.
  const keep = slots.map((_, k) => Math.abs(p[k * P + 1]) >= 0.05);
  const keptSlots = slots.filter((_, k) => keep[k]);
  p = p.filter((_, i) => keep[Math.floor(i / P)]);
  lo = lo.filter((_, i) => keep[Math.floor(i / P)]);
  hi = hi.filter((_, i) => keep[Math.floor(i / P)]);
  slots.length = 0;
  slots.push(...keptSlots);

  // The added-gain limit, enforced exactly: where the bands' summed level passes it most, the
  // boosts that make up that level are lowered in proportion to their share, until nothing passes.
  // After a repair the other parameters are refined once more with those boosts as their upper
  // bounds (cuts, frequencies and Q take up what the boosts gave back), then repaired again.
  let added = maxAddedGain(model, slots, p);
  let headroomBound = added.db > options.maxAddedGainDb - 1e-3;
  const repair = () => {
    let changed = false;
    for (let guard = 0; guard < 200 && added.db > options.maxAddedGainDb; guard++) {
      const shares = slots.map((s, k) => (p[k * P + 1] > 0 ? Math.max(0, levelAt(model, s, p, k, added.hz)) : 0));
      const total = shares.reduce((a, b) => a + b, 0);
      if (!(total > 0)) break;
      const excess = added.db - options.maxAddedGainDb + 1e-3;
      slots.forEach((_, k) => {
        if (shares[k] > 0) p[k * P + 1] *= Math.max(0, 1 - excess / total);
      });
      added = maxAddedGain(model, slots, p);
      changed = true;
    }
    return changed;
  };
  if (repair()) {
    headroomBound = true;
    // Refined on the original weights; kept only if it scores better once repaired in turn.
    const repaired = { p: p.slice(), added, level: model.level };
    model.weight.set(weight);
    const capped = hi.map((h, i) => (i % P === 1 && p[i] > 0 ? Math.min(h, p[i]) : h));
    p = model.refine(slots, p, lo, capped, 15, tick);
    added = maxAddedGain(model, slots, p);
    repair();
    if (!better(score(p), score(repaired.p, repaired.level))) {
      p = repaired.p;
      added = repaired.added;
      model.level = repaired.level;
    }
  }
  let addedGain = added.db;

  let e = errorNow();
  let after = figures(e, weight, freqs);
  // Never worse than no bands at all (a fit the limits leave worse than nothing is no fit).
  if (after.rmsDb > before.rmsDb && slots.length > 0) {
    slots.length = 0;
    p = [];
    lo = [];
    hi = [];
    addedGain = 0;
    headroomBound = false;
    model.level = levelDb;
    e = errorNow();
    after = figures(e, weight, freqs);
  }
  const errorDb = new Float64Array(n).fill(NaN);
  for (let i = g.first; i <= g.last; i++) errorDb[i] = e[i];

  const bands: FittedBand[] = slots.map((s, k) => {
    const bound: FitLimit[] = [];
    const at = (j: number, side: 'lo' | 'hi') => Math.abs(p[k * P + j] - (side === 'lo' ? lo : hi)[k * P + j]) < 1e-6;
    if (at(1, 'hi')) bound.push('max-boost');
    if (at(1, 'lo')) bound.push('max-cut');
    if (s.type === 'peaking') {
      if (at(2, 'lo')) bound.push('q-min');
      if (at(2, 'hi')) bound.push('q-max');
    }
    if (at(0, 'lo') || at(0, 'hi')) bound.push('range');
    return { type: s.type, frequency: Math.pow(2, p[k * P]), gainDb: p[k * P + 1], q: s.type === 'peaking' ? Math.pow(2, p[k * P + 2]) : SHELF_Q, bound };
  });
  const bound = new Set<FitLimit>();
  bands.forEach((b) => b.bound.forEach((x) => bound.add(x)));
  if (headroomBound) bound.add('added-gain');
  const budgetUsed = slots.length >= budget;
  if (budgetUsed && after.maxDb > options.toleranceDb) bound.add('budget');

  hooks.progress?.(1);
  return {
    bands,
    levelDb: model.level,
    before,
    after,
    nulls: nullStretches(nullPoint, problem.baseDb, third, freqs, g.first, g.last),
    bound: [...bound],
    shortfalls: shortfalls(e, weight, declined, freqs, g.first, g.last, options, bands, budgetUsed, headroomBound),
    addedGainDb: addedGain,
    iterations: model.iterations,
    errorDb,
  };
}

/** One band's level (dB) at one frequency. */
function levelAt(model: Model, s: Slot, p: number[], k: number, hz: number): number {
  const band: Band = { id: 'fit', type: s.type, frequency: Math.pow(2, p[k * P]), gainDb: p[k * P + 1], q: Math.pow(2, p[k * P + 2]), enabled: true };
  const one = new Float64Array(1);
  const trig = gridTrig([hz], model.problem.sampleRateHz);
  for (const sec of designBand(band, model.problem.sampleRateHz)) addSectionDb(sec, trig, one);
  return one[0];
}

/** The largest summed level of the bands and where: on the grid and at each band's own frequency. */
function maxAddedGain(model: Model, slots: readonly Slot[], p: number[]): { db: number; hz: number } {
  let best = { db: 0, hz: NaN };
  if (slots.length === 0) return best;
  const sum = model.bandsDb(slots, p);
  sum.forEach((x, i) => {
    if (x > best.db) best = { db: x, hz: model.problem.grid.frequenciesHz[i] };
  });
  const centres = slots.map((_, k) => Math.pow(2, p[k * P]));
  const trig = gridTrig(centres, model.problem.sampleRateHz);
  const atCentres = new Float64Array(centres.length);
  slots.forEach((s, k) => {
    const band: Band = { id: 'fit', type: s.type, frequency: centres[k], gainDb: p[k * P + 1], q: Math.pow(2, p[k * P + 2]), enabled: true };
    for (const sec of designBand(band, model.problem.sampleRateHz)) addSectionDb(sec, trig, atCentres);
  });
  atCentres.forEach((x, c) => {
    if (x > best.db) best = { db: x, hz: centres[c] };
  });
  return best;
}

function nullStretches(nullPoint: Uint8Array, base: Float64Array, third: Float64Array, freqs: Float64Array, first: number, last: number) {
  const out: { fromHz: number; toHz: number; depthDb: number }[] = [];
  for (let i = first; i <= last; i++) {
    if (!nullPoint[i]) continue;
    let j = i;
    let depth = 0;
    while (j <= last && nullPoint[j]) {
      depth = Math.max(depth, third[j] - base[j]);
      j++;
    }
    out.push({ fromHz: freqs[i], toHz: freqs[j - 1], depthDb: depth });
    i = j;
  }
  return out;
}

function shortfalls(
  e: Float64Array,
  weight: Float64Array,
  declined: Uint8Array,
  freqs: Float64Array,
  first: number,
  last: number,
  options: FitOptions,
  bands: FittedBand[],
  budgetUsed: boolean,
  headroomBound: boolean,
): Shortfall[] {
  const out: Shortfall[] = [];
  const tol = options.toleranceDb;
  const bad = (i: number) => Math.abs(e[i]) > tol && (weight[i] > 0 || declined[i] === 1);
  for (let i = first; i <= last; i++) {
    if (!bad(i)) continue;
    // A stretch is all inside a declined null or all outside one.
    const inNull = weight[i] === 0;
    let j = i;
    let worst = 0;
    while (j <= last && bad(j) && (weight[j] === 0) === inNull) {
      if (Math.abs(e[j]) > Math.abs(worst)) worst = e[j];
      j++;
    }
    const f0 = freqs[i];
    const f1 = freqs[j - 1];
    const near = bands.filter((b) => b.frequency >= f0 / 1.5 && b.frequency <= f1 * 1.5);
    let reason: Shortfall['reason'];
    if (inNull) reason = 'null';
    else if (worst < 0 && headroomBound) reason = 'added-gain';
    else if (worst < 0 && near.some((b) => b.bound.includes('max-boost'))) reason = 'max-boost';
    else if (worst > 0 && near.some((b) => b.bound.includes('max-cut'))) reason = 'max-cut';
    else if (budgetUsed) reason = 'budget';
    else reason = 'shape';
    out.push({ fromHz: f0, toHz: f1, worstDb: worst, reason });
    i = j - 1;
  }
  return out;
}
