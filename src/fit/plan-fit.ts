/**
 * A fit of a plan: what is fitted (an output's predicted acoustic response, or the system's
 * measurement), with which bands kept, within which section budget, and the plan with the fitted
 * bands added (docs/fitting.md, "What is fitted").
 *
 * - An output: its driver measurement times its whole chain (src/measure/acoustic.ts), the chain
 *   without the bands a new fit replaces. Fitted bands go into the output's own bands.
 * - The system: the plan's first system measurement, taken through the plan as it stands, so the
 *   bands a new fit replaces are divided out of it. Fitted bands go into the input chain, shared
 *   by every output.
 * A new fit replaces the chain's earlier fitted bands unless they are locked; every other band
 * stays exactly as it is.
 */
import { designBand } from '../design/cookbook';
import { designInput, designOutputOwn } from '../design/chain';
import { DEFAULT_PROFILE } from '../export/profiles';
import { sectionsNeeded } from '../export/list';
import { interpolateMeasurement, predictAcoustic } from '../measure/acoustic';
import { AUDIO_BAND_TOP_FRACTION } from '../analysis/thresholds';
import { PlanError } from '../plan/error';
import { LIMITS, type Band, type Plan, type Target } from '../plan/types';
import { addSectionDb, gridTrig } from './bands';
import { fitGrid, pointsPerOctave } from './grid';
import { DEFAULT_FIT_OPTIONS, fitBands, startingLevel, type FitHooks, type FitOptions, type FitProblem, type FitResult } from './fitter';
import { targetShapeDb } from './target';

export type FitScope = { kind: 'output'; outputId: string } | { kind: 'system' };

/** The fit's default range, Hz, before it is narrowed to the measurement and the audio band. */
export const DEFAULT_FIT_RANGE_HZ = { from: 20, to: 20000 } as const;

export interface FitSetup {
  problem: FitProblem;
  /** Bands the fit may place: the section budget left (and the plan's band limits). */
  budget: number;
  /** Where the budget comes from, for the report. */
  budgetSource: { profileName: string; sectionBudget: number; sectionsUsed: number; bandsLeft: number };
  /** The bands a new fit replaces (the chain's unlocked fitted bands). */
  replaced: Band[];
  measurementId: string;
  /** The fit's range as used, Hz. */
  fromHz: number;
  toHz: number;
}

/** Is the band the fitter's to replace? */
export function replaceable(b: Band): boolean {
  return b.fitted === true && b.locked !== true;
}

function chainOf(plan: Plan, scope: FitScope): Band[] {
  if (scope.kind === 'system') return plan.input.bands;
  const o = plan.outputs.find((x) => x.id === scope.outputId);
  if (!o) throw new PlanError('outputs', `no output "${scope.outputId}"`);
  return o.bands;
}

/** The plan with the scope's replaceable bands removed. */
function withoutReplaced(plan: Plan, scope: FitScope): Plan {
  if (scope.kind === 'system') return { ...plan, input: { bands: plan.input.bands.filter((b) => !replaceable(b)) } };
  return { ...plan, outputs: plan.outputs.map((o) => (o.id === scope.outputId ? { ...o, bands: o.bands.filter((b) => !replaceable(b)) } : o)) };
}

/**
 * Sections left for new bands in the scope's chain: the board profile's budget (the plan's, else
 * the default) less what every affected output's path already needs, within the plan's limits on
 * bands per chain and sections per path.
 */
export function sectionsLeft(plan: Plan, scope: FitScope): FitSetup['budgetSource'] & { left: number } {
  const kept = withoutReplaced(plan, scope);
  const profile = plan.profile ?? DEFAULT_PROFILE;
  const input = designInput(kept);
  const outputs = scope.kind === 'system' ? kept.outputs : kept.outputs.filter((o) => o.id === scope.outputId);
  let used = 0;
  for (const o of outputs) used = Math.max(used, sectionsNeeded(input.length + designOutputOwn(kept, o).length, profile));
  const bandsLeft = LIMITS.bandsMax - chainOf(kept, scope).length;
  const left = Math.max(0, Math.min(profile.sectionBudget - used, LIMITS.pathSectionsMax - used, bandsLeft));
  return { profileName: profile.name, sectionBudget: profile.sectionBudget, sectionsUsed: used, bandsLeft, left };
}

/**
 * Builds the fit of `scope` in `plan` toward `target`. Throws `PlanError` (with the field path)
 * when there is nothing to fit: no measurement, or a range the measurement does not cover.
 */
export function fitSetup(plan: Plan, scope: FitScope, target: Target, smoothingN: number, range: { fromHz?: number; toHz?: number } = {}): FitSetup {
  const fs = plan.sampleRate;
  const kept = withoutReplaced(plan, scope);
  const replaced = chainOf(plan, scope).filter(replaceable);
  let measurement;
  let output;
  if (scope.kind === 'output') {
    const index = plan.outputs.findIndex((o) => o.id === scope.outputId);
    output = plan.outputs[index];
    const id = output.driverMeasurementId;
    if (id === undefined) throw new PlanError(`outputs[${index}].driverMeasurementId`, 'is not set: the output has no driver measurement to fit (attach one first)');
    measurement = (plan.measurements ?? []).find((m) => m.id === id);
  } else {
    const id = plan.systemMeasurementIds?.[0];
    if (id === undefined) throw new PlanError('systemMeasurementIds', 'is empty: the plan has no system measurement to fit (attach one with --system first)');
    measurement = (plan.measurements ?? []).find((m) => m.id === id);
  }
  if (!measurement) throw new PlanError('measurements', 'the measurement to fit is missing');

  const dataFrom = measurement.frequencyHz[0];
  const dataTo = Math.min(measurement.frequencyHz[measurement.frequencyHz.length - 1], AUDIO_BAND_TOP_FRACTION * fs);
  const fromHz = Math.max(range.fromHz ?? target.fromHz ?? DEFAULT_FIT_RANGE_HZ.from, dataFrom);
  const toHz = Math.min(range.toHz ?? target.toHz ?? DEFAULT_FIT_RANGE_HZ.to, dataTo);
  const perOctave = pointsPerOctave(smoothingN);
  if (!(Math.log2(toHz / fromHz) * perOctave >= 2)) {
    throw new PlanError(
      target.fromHz !== undefined || target.toHz !== undefined ? 'targets' : 'measurements',
      `the fit's range (${fromHz} to ${toHz} Hz) holds no span of the measurement "${measurement.id}" (${dataFrom} to ${measurement.frequencyHz[measurement.frequencyHz.length - 1]} Hz) below ${AUDIO_BAND_TOP_FRACTION} of the sample rate`,
    );
  }
  const grid = fitGrid(fromHz, toHz, dataFrom, dataTo, perOctave, 1 / (2 * smoothingN));
  const freqs = grid.frequenciesHz;

  let baseDb: Float64Array;
  if (scope.kind === 'output') {
    const prediction = predictAcoustic(kept, freqs);
    const mine = prediction.outputs.find((o) => o.id === scope.outputId);
    baseDb = Float64Array.from(mine ? mine.response.magnitudeDb : freqs.map(() => NaN));
  } else {
    baseDb = Float64Array.from(interpolateMeasurement(measurement, freqs).magnitudeDb);
    // Measured through the plan as it stands: divide out the bands the fit replaces.
    const trig = gridTrig(freqs, fs);
    for (const b of replaced) if (b.enabled) for (const s of designBand(b, fs)) addSectionDb(s, trig, baseDb, -1);
  }
  // A response of exactly nothing (an exact zero, -300 dB) is a null like any other, but finite.
  for (let i = 0; i < baseDb.length; i++) if (!Number.isFinite(baseDb[i])) baseDb[i] = -300;

  const targetDb = targetShapeDb(target.parts, freqs, { sampleRateHz: fs, output });
  const { left, ...budgetSource } = sectionsLeft(plan, scope);
  return { problem: { sampleRateHz: fs, grid, baseDb, targetDb }, budget: left, budgetSource, replaced, measurementId: measurement.id, fromHz, toHz };
}

/** Round to `digits` significant digits by `how` (toward zero, up or down). */
function roundDigits(x: number, digits: number, how: (y: number) => number = Math.trunc): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  const scale = Math.pow(10, digits - 1 - Math.floor(Math.log10(Math.abs(x))));
  return how(x * scale) / scale;
}
const roundTowardZero = (x: number, digits: number) => roundDigits(x, digits);

/** A frequency rounded to 6 significant digits without leaving [lo, hi] by the rounding. */
function roundInside(f: number, lo: number, hi: number): number {
  const r = roundDigits(f, 6, Math.round);
  if (r < lo) return Math.min(hi, roundDigits(f, 6, Math.ceil));
  if (r > hi) return Math.max(lo, roundDigits(f, 6, Math.floor));
  return r;
}

/**
 * The plan with the fit's bands in the scope's chain (its replaceable bands removed, the new ones
 * marked `fitted`, ids fit1, fit2, ... not taken by a kept band) and the target stored for the
 * scope. A new plan; the one given is not changed.
 */
export function applyFit(plan: Plan, scope: FitScope, result: FitResult, target: Target, options: { qMin: number; qMax: number; fromHz: number; toHz: number }): Plan {
  const kept = withoutReplaced(plan, scope);
  const keptBands = chainOf(kept, scope);
  const taken = new Set(keptBands.map((b) => b.id));
  let next = 1;
  const fresh = () => {
    while (taken.has(`fit${next}`)) next++;
    taken.add(`fit${next}`);
    return `fit${next}`;
  };
  const sorted = [...result.bands].sort((a, b) => a.frequency - b.frequency);
  const added: Band[] = sorted.map((b) => ({
    id: fresh(),
    type: b.type,
    frequency: roundInside(b.frequency, options.fromHz, options.toHz),
    gainDb: roundTowardZero(b.gainDb, 6),
    q: Math.min(options.qMax, Math.max(options.qMin, roundTowardZero(b.q, 4))),
    enabled: true,
    fitted: true,
  }));
  const bands = [...keptBands, ...added];
  const out: Plan =
    scope.kind === 'system'
      ? { ...kept, input: { bands } }
      : { ...kept, outputs: kept.outputs.map((o) => (o.id === scope.outputId ? { ...o, bands } : o)) };
  const others = (plan.targets ?? []).filter((t) => (scope.kind === 'system' ? t.scope !== 'system' : !(t.scope === 'output' && t.outputId === scope.outputId)));
  out.targets = [...others, target];
  return out;
}

/** The limits a caller may set; the band count defaults to the budget left. */
export type PlanFitOptions = Partial<FitOptions>;

export interface PlanFit {
  /** The plan with the fitted bands and the target (a new plan). */
  plan: Plan;
  setup: FitSetup;
  result: FitResult;
  options: FitOptions;
  /** More bands were asked for than the budget leaves. */
  askedBeyondBudget: boolean;
}

/**
 * Fits `scope` of `plan` toward `target` and returns the new plan with its report. Throws
 * `PlanError` when there is nothing to fit, `FitAborted` when `hooks.aborted` says so.
 */
export function fitPlan(plan: Plan, scope: FitScope, target: Target, options0: PlanFitOptions = {}, hooks: FitHooks = {}): PlanFit {
  // An option given as undefined means "the default", not "undefined".
  const given = Object.fromEntries(Object.entries(options0).filter(([, v]) => v !== undefined)) as PlanFitOptions;
  const base = { ...DEFAULT_FIT_OPTIONS, alignment: target.alignment, toleranceDb: target.toleranceDb, ...given };
  if (target.levelDb !== undefined && given.levelDb === undefined) base.levelDb = target.levelDb;
  const setup = fitSetup(plan, scope, target, base.smoothingN);
  const asked = given.bands ?? setup.budget;
  const options: FitOptions = { ...base, bands: Math.min(asked, setup.budget) };
  const result = fitBands(setup.problem, options, hooks);
  if (asked > setup.budget && !result.bound.includes('budget')) result.bound.push('budget');
  return { plan: applyFit(plan, scope, result, target, { ...options, fromHz: setup.fromHz, toHz: setup.toHz }), setup, result, options, askedBeyondBudget: asked > setup.budget };
}

/** The scope a chain of the app stands for: the input chain is the system's. */
export function scopeOfChain(chain: string, inputChain: string): FitScope {
  return chain === inputChain ? { kind: 'system' } : { kind: 'output', outputId: chain };
}

/** The scope's stored target, or null. */
export function targetOf(plan: Plan, scope: FitScope): Target | null {
  return (plan.targets ?? []).find((t) => (scope.kind === 'system' ? t.scope === 'system' : t.scope === 'output' && t.outputId === scope.outputId)) ?? null;
}

/** The plan with `target` stored for its scope (replacing the scope's earlier one), or without it when null. */
export function withTarget(plan: Plan, scope: FitScope, target: Target | null): Plan {
  const others = (plan.targets ?? []).filter((t) => (scope.kind === 'system' ? t.scope !== 'system' : !(t.scope === 'output' && t.outputId === scope.outputId)));
  const targets = target ? [...others, target] : others;
  const next: Plan = { ...plan, targets };
  if (targets.length === 0) delete next.targets;
  return next;
}

/**
 * The target as drawn: its shape on `frequenciesHz` at its level (the level set, else found as
 * a fit would start from it), and the range it applies to. Null when the scope has no measurement.
 */
export function targetCurve(plan: Plan, scope: FitScope, target: Target, frequenciesHz: ArrayLike<number>): { levelDb: number; db: Float64Array; fromHz: number; toHz: number } | null {
  let setup: FitSetup;
  try {
    setup = fitSetup(plan, scope, target, DEFAULT_FIT_OPTIONS.smoothingN);
  } catch (e) {
    if (e instanceof PlanError) return null;
    throw e;
  }
  const levelDb = startingLevel(setup.problem, { ...DEFAULT_FIT_OPTIONS, alignment: target.alignment, levelDb: target.levelDb });
  const output = scope.kind === 'output' ? plan.outputs.find((o) => o.id === scope.outputId) : undefined;
  const db = targetShapeDb(target.parts, frequenciesHz, { sampleRateHz: plan.sampleRate, output });
  for (let i = 0; i < db.length; i++) db[i] += levelDb;
  return { levelDb, db, fromHz: setup.fromHz, toHz: setup.toHz };
}
