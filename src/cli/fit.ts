/**
 * `fit PLAN (--output ID | --system) [--target flat|tilt:DB_PER_OCT@HZ|FILE] [--from HZ --to HZ]
 * [--bands N] [--max-boost DB] [--max-cut DB] [--q-min Q] [--q-max Q] [--smooth 1/N]
 * [--report json|text]`: the plan with fitted bands (src/fit/, docs/fitting.md) on stdout, the
 * report on stderr. The plan file itself is never changed. The result is read back through the
 * plan reader before it is written, so stdout is always a valid plan. Exit 1 for a bad plan or
 * target (with the field path), 0 with the report when limits bound or the target is not met.
 */
import { MeasurementFileError } from '../measure/errors';
import { parseMeasurementText } from '../measure/text';
import { parseSmoothing } from '../measure/smooth';
import { fitPlan, type FitScope, type PlanFit } from '../fit/plan-fit';
import { FitAborted, type FitLimit, type Shortfall } from '../fit/fitter';
import { flatTarget } from '../fit/target';
import { formatFrequency } from '../format';
import { PlanError } from '../plan/error';
import { readPlanValue, readTarget } from '../plan/read';
import { LIMITS, type Plan, type Target, type TargetPart } from '../plan/types';
import { planToJson, targetToJson, writePlanText } from '../plan/write';
import { printable } from '../export/format';
import { optChoice, optNumber, optString, parseArgs, UsageError } from './args';
import { checkOutputId, InputError, loadPlan, type CliIo, type CliResult } from './io';

const CAUTION =
  'Caution: boosts raise the level a driver must handle and high listening levels damage hearing; check headroom, start quietly, and follow local regulations and qualified professionals.';

/** A number option within [min, max], or a usage error naming it. */
function bounded(args: ReturnType<typeof parseArgs>, name: string, min: number, max: number): number | undefined {
  const x = optNumber(args, name);
  if (x !== undefined && !(x >= min && x <= max)) throw new UsageError(`--${name} must be from ${min} to ${max}, not ${x}`);
  return x;
}

/** The --target value: "flat", "tilt:DB_PER_OCT@HZ", or a file of frequency and dB columns. */
function targetParts(text: string, io: CliIo): TargetPart[] {
  if (text === 'flat') return [{ kind: 'flat' }];
  const tilt = /^tilt:(.*)$/.exec(text);
  if (tilt) {
    const m = /^([+-]?\d+(?:\.\d+)?)@(\d+(?:\.\d+)?)$/.exec(tilt[1]);
    if (!m) throw new InputError(`--target ${printable(text)}: a tilt is tilt:DB_PER_OCT@HZ, for example tilt:-1@1000`);
    return [{ kind: 'tilt', dbPerOctave: Number(m[1]), pivotHz: Number(m[2]) }];
  }
  let fileText: string;
  try {
    fileText = io.readText(text);
  } catch (e) {
    throw new InputError(`--target ${printable(text)}: not flat, not tilt:DB_PER_OCT@HZ, and cannot be read as a file (${printable((e as Error).message)})`);
  }
  try {
    const m = parseMeasurementText(fileText, text);
    if (m.frequencyHz.length > LIMITS.targetPointsMax) throw new InputError(`${printable(text)}: a target holds at most ${LIMITS.targetPointsMax} points (the file has ${m.frequencyHz.length})`);
    return [{ kind: 'points', points: m.frequencyHz.map((f, i): [number, number] => [f, m.magnitudeDb[i]]) }];
  } catch (e) {
    if (e instanceof MeasurementFileError) throw new InputError(`${printable(text)}: ${e.message}`);
    throw e;
  }
}

export function cmdFit(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['output', 'target', 'from', 'to', 'bands', 'max-boost', 'max-cut', 'q-min', 'q-max', 'smooth', 'report'], ['system']);
  const outputId = optString(args, 'output');
  const system = args.options.get('system') === true;
  if ((outputId === undefined) === !system) throw new UsageError('fit needs one of --output ID or --system');
  const report = optChoice(args, 'report', ['text', 'json'] as const, 'text');
  const bands = optNumber(args, 'bands');
  if (bands !== undefined && !(Number.isInteger(bands) && bands >= 0 && bands <= LIMITS.bandsMax)) throw new UsageError(`--bands must be a whole number from 0 to ${LIMITS.bandsMax}, not ${bands}`);
  const maxBoostDb = bounded(args, 'max-boost', 0, 24);
  const maxCutDb = bounded(args, 'max-cut', 0, 60);
  const qMin = bounded(args, 'q-min', LIMITS.qMin, 100);
  const qMax = bounded(args, 'q-max', LIMITS.qMin, 100);
  if (qMin !== undefined && qMax !== undefined && qMax < qMin) throw new UsageError(`--q-max (${qMax}) must not be below --q-min (${qMin})`);
  const fromHz = optNumber(args, 'from');
  const toHz = optNumber(args, 'to');
  if (fromHz !== undefined && !(fromHz > 0)) throw new UsageError('--from must be above 0 Hz');
  if (toHz !== undefined && !(toHz > 0)) throw new UsageError('--to must be above 0 Hz');
  if (fromHz !== undefined && toHz !== undefined && !(toHz > fromHz)) throw new UsageError(`--to (${toHz} Hz) must be above --from (${fromHz} Hz)`);
  const smoothText = optString(args, 'smooth');
  let smoothingN: number | undefined;
  if (smoothText !== undefined) {
    const s = parseSmoothing(smoothText);
    if (!s || s.kind !== 'octave' || s.n < 1 || s.n > 48) throw new UsageError(`--smooth must be 1/N with N from 1 to 48, not "${smoothText}"`);
    smoothingN = s.n;
  }
  const { plan, path } = loadPlan(args, io);
  checkOutputId(plan, outputId);
  const scope: FitScope = outputId !== undefined ? { kind: 'output', outputId } : { kind: 'system' };

  // The target: the one given, else the plan's own for this scope, else flat; the range given wins.
  const stored = (plan.targets ?? []).find((t) => (scope.kind === 'system' ? t.scope === 'system' : t.scope === 'output' && t.outputId === scope.outputId));
  const targetText = optString(args, 'target');
  const target: Target = stored && targetText === undefined ? { ...stored } : { ...(stored ?? flatTarget(scope.kind, outputId)), parts: targetText === undefined ? [{ kind: 'flat' }] : targetParts(targetText, io) };
  if (scope.kind === 'output') target.outputId = scope.outputId;
  if (fromHz !== undefined) target.fromHz = fromHz;
  if (toHz !== undefined) target.toHz = toHz;
  let checkedTarget: Target;
  try {
    checkedTarget = readTarget(targetToJson(target), 'target', plan.sampleRate);
  } catch (e) {
    if (e instanceof PlanError) throw new InputError(`the target: ${e.message}`);
    throw e;
  }

  let fit: PlanFit;
  try {
    fit = fitPlan(plan, scope, checkedTarget, { bands, maxBoostDb, maxCutDb, qMin, qMax, smoothingN });
  } catch (e) {
    if (e instanceof PlanError) throw new InputError(`${printable(path)}: ${e.message}`);
    if (e instanceof FitAborted) throw new InputError('the fit was cancelled');
    throw e;
  }
  const read = readPlanValue(planToJson(fit.plan));
  if (!read.ok) throw new InputError(`the fitted plan is not valid: ${read.error.message}`);
  const text = report === 'json' ? JSON.stringify(fitReportJson(fit, scope, plan), null, 2) + '\n' : fitReportText(fit, scope) + '\n';
  return { code: 0, stdout: writePlanText(read.plan), stderr: text };
}

/** The fitted bands as the plan now holds them (their ids), in frequency order. */
function addedBands(fit: PlanFit, scope: FitScope) {
  const chain = scope.kind === 'system' ? fit.plan.input.bands : (fit.plan.outputs.find((o) => o.id === scope.outputId)?.bands ?? []);
  return chain.filter((b) => b.fitted === true && b.locked !== true);
}

const LIMIT_WORDS: Record<FitLimit, string> = {
  budget: 'the section budget',
  'max-boost': 'the largest boost',
  'max-cut': 'the deepest cut',
  'q-min': 'the lowest Q',
  'q-max': 'the highest Q',
  range: 'the edge of the range',
  'added-gain': 'the added gain (headroom) limit',
};

const REASON_WORDS: Record<Shortfall['reason'], string> = {
  null: 'a null: the response there is a cancellation that boosting cannot fill, so it was declined',
  'max-boost': 'the largest boost allowed is not enough',
  'max-cut': 'the deepest cut allowed is not enough',
  budget: 'every band of the budget is in use',
  'added-gain': 'the added gain (headroom) limit stops the boost',
  shape: 'the bands cannot follow the target this closely here',
};

function signedDb(x: number): string {
  return `${x >= 0 ? '+' : ''}${x.toFixed(2)} dB`;
}

function targetWords(t: Target): string {
  if (t.parts.length === 0) return 'flat';
  return t.parts
    .map((p) => {
      switch (p.kind) {
        case 'flat':
          return 'flat';
        case 'tilt':
          return `tilt ${signedDb(p.dbPerOctave)} per octave about ${formatFrequency(p.pivotHz)}`;
        case 'lowShelf':
        case 'highShelf':
          return `${p.kind === 'lowShelf' ? 'low' : 'high'} shelf ${signedDb(p.gainDb)} at ${formatFrequency(p.frequency)}`;
        case 'points':
          return `${p.points.length} points`;
        case 'crossover':
          return "the output's crossover shape";
      }
    })
    .join(' + ');
}

export function fitReportText(fit: PlanFit, scope: FitScope): string {
  const r = fit.result;
  const s = fit.setup;
  const target = fit.plan.targets?.find((t) => (scope.kind === 'system' ? t.scope === 'system' : t.outputId === scope.outputId));
  const lines: string[] = [];
  lines.push(
    `fit of ${scope.kind === 'system' ? 'the system (bands in the input chain)' : `output "${scope.outputId}"`}, measurement "${s.measurementId}", toward ${target ? targetWords(target) : 'flat'}, ${formatFrequency(s.fromHz)} to ${formatFrequency(s.toHz)}, 1/${fit.options.smoothingN} octave`,
  );
  lines.push(`target level: ${signedDb(r.levelDb)} (${fit.options.levelDb !== undefined ? 'as set' : fit.options.alignment})`);
  const b = s.budgetSource;
  lines.push(`budget: ${s.budget} section(s) left (profile "${b.profileName}": ${b.sectionBudget} per output, ${b.sectionsUsed} in use); bands placed: ${r.bands.length}${fit.askedBeyondBudget ? ' (more were asked for than the budget leaves)' : ''}`);
  lines.push(`error before: RMS ${r.before.rmsDb.toFixed(2)} dB, largest ${r.before.maxDb.toFixed(2)} dB at ${formatFrequency(r.before.maxAtHz)}`);
  lines.push(`error after:  RMS ${r.after.rmsDb.toFixed(2)} dB, largest ${r.after.maxDb.toFixed(2)} dB at ${formatFrequency(r.after.maxAtHz)}`);
  lines.push(`added gain: ${signedDb(r.addedGainDb)} at most (limit ${signedDb(fit.options.maxAddedGainDb)})`);
  const ids = addedBands(fit, scope);
  if (ids.length > 0) lines.push('bands:');
  for (const band of ids) {
    const fitted = r.bands.find((x) => Math.abs(x.frequency - band.frequency) <= 1e-5 * band.frequency && x.type === band.type);
    const bound = fitted && fitted.bound.length > 0 ? `  (at ${fitted.bound.map((x) => LIMIT_WORDS[x]).join(', ')})` : '';
    lines.push(`  ${band.id}  ${band.type}  ${formatFrequency(band.frequency)}  ${signedDb(band.gainDb ?? 0)}  Q ${(band.q ?? 0).toFixed(2)}${bound}`);
  }
  lines.push(r.bound.length === 0 ? 'no limit bound' : `limits that bound: ${r.bound.map((x) => LIMIT_WORDS[x]).join(', ')}`);
  if (r.nulls.length > 0) {
    lines.push(`declined nulls (not boosted, left out of the error within 1/${2 * fit.options.smoothingN} octave):`);
    for (const n of r.nulls) lines.push(`  ${formatFrequency(n.fromHz)} to ${formatFrequency(n.toHz)}, ${n.depthDb.toFixed(1)} dB below the 1/3-octave level`);
  }
  if (r.shortfalls.length === 0) lines.push(`the target is met within +/-${fit.options.toleranceDb} dB over the range`);
  else {
    lines.push(`not met within +/-${fit.options.toleranceDb} dB:`);
    for (const x of r.shortfalls) lines.push(`  ${formatFrequency(x.fromHz)} to ${formatFrequency(x.toHz)}: ${signedDb(x.worstDb)} at worst; ${REASON_WORDS[x.reason]}`);
  }
  lines.push(CAUTION);
  return lines.join('\n');
}

export function fitReportJson(fit: PlanFit, scope: FitScope, before: Plan): Record<string, unknown> {
  const r = fit.result;
  const s = fit.setup;
  const target = fit.plan.targets?.find((t) => (scope.kind === 'system' ? t.scope === 'system' : t.outputId === scope.outputId));
  return {
    scope: scope.kind,
    outputId: scope.kind === 'output' ? scope.outputId : null,
    measurementId: s.measurementId,
    target: target ? targetToJson(target) : null,
    fromHz: s.fromHz,
    toHz: s.toHz,
    smoothing: `1/${fit.options.smoothingN}`,
    levelDb: r.levelDb,
    budget: { left: s.budget, ...s.budgetSource, askedBeyondBudget: fit.askedBeyondBudget },
    limits: {
      bands: fit.options.bands,
      maxBoostDb: fit.options.maxBoostDb,
      maxCutDb: fit.options.maxCutDb,
      qMin: fit.options.qMin,
      qMax: fit.options.qMax,
      nullDepthDb: fit.options.nullDepthDb,
      maxAddedGainDb: fit.options.maxAddedGainDb,
      toleranceDb: fit.options.toleranceDb,
    },
    before: r.before,
    after: r.after,
    addedGainDb: r.addedGainDb,
    bands: addedBands(fit, scope).map((b) => ({ id: b.id, type: b.type, frequency: b.frequency, gainDb: b.gainDb, q: b.q })),
    replaced: s.replaced.map((b) => b.id),
    bound: r.bound,
    bandsAtLimits: r.bands.filter((b) => b.bound.length > 0).map((b) => ({ type: b.type, frequency: b.frequency, bound: b.bound })),
    nulls: r.nulls,
    shortfalls: r.shortfalls,
    iterations: r.iterations,
    plan: before.name,
  };
}
