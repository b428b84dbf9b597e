/**
 * Reading a plan: JSON text or a parsed value in, a complete `Plan` or one `PlanError` out.
 *
 * Every error names the field path (`outputs[1].bands[0].q: must be > 0`). Numbers must be
 * plain finite JSON numbers: NaN, Infinity and numbers written as strings are refused. A field the
 * contract does not know is refused too, rather than dropped: a plan never loses data silently.
 * Older versions are migrated (see `migrate.ts`); a version this build does not know is refused.
 */
import { maxShelfSlope, safeShelfSlope, shelfSlopeLimitText, SHELF_SLOPE_Q_MAX } from './shelf';
import { FIELDS_SINCE, migrate, VERSION_ADDED } from './migrate';
import { parseJsonText } from './json';
import { PlanError } from './error';
import { exportNameProblem } from './export-name';
import { shownToken } from './shown-text';
import {
  ACOUSTIC_OFFSET_UNITS,
  BAND_TYPES,
  DESIGN_METHODS,
  MATCHED_DESIGN_TYPES,
  type DesignMethod,
  MEASUREMENT_KINDS,
  BESSEL_NORMALIZATIONS,
  CROSSOVER_FAMILIES,
  LIMITS,
  PLAN_FORMAT,
  PLAN_VERSION,
  COEFFICIENT_NAMES,
  type Band,
  type BandType,
  type AcousticOffset,
  type BoardProfile,
  type CoefficientName,
  type Measurement,
  type MeasurementKind,
  type NumberFormat,
  type BesselNormalization,
  type Crossover,
  type CrossoverFamily,
  type Output,
  type Plan,
  type RawCoefficients,
  type Target,
  type TargetPart,
  type TargetPartKind,
  TARGET_PART_KINDS,
} from './types';

export { PlanError };

export type ReadResult = { ok: true; plan: Plan } | { ok: false; error: PlanError };

/** Parses JSON text and reads it as a plan. Never throws. */
export function readPlanText(text: string): ReadResult {
  const parsed = parseJsonText(text);
  return parsed.ok ? readPlanValue(parsed.value) : parsed;
}

/** JSON text for plans, profiles and exports (plan/json.ts): BOM, line and column, bare NaN. */
export { parseJsonText, bareNonFiniteNumber } from './json';

/** Reads an already parsed value as a plan. Never throws. */
export function readPlanValue(value: unknown): ReadResult {
  try {
    return { ok: true, plan: readPlan(value) };
  } catch (e) {
    if (e instanceof PlanError) return { ok: false, error: e };
    return { ok: false, error: new PlanError('', `unreadable plan (${(e as Error).message})`) };
  }
}

/** Reads a plan; throws `PlanError`. */
export function readPlan(value: unknown): Plan {
  const root = object(value, '');
  const format = root.format;
  if (format !== PLAN_FORMAT) {
    throw new PlanError('format', `must be "${PLAN_FORMAT}" (this is not a Biquadrant plan)`);
  }
  const version = root.version;
  if (typeof version !== 'number' || !Number.isInteger(version)) throw new PlanError('version', 'must be a whole number');
  if (version < 1 || version > PLAN_VERSION) {
    throw new PlanError('version', `${version} is not supported: this build reads plan versions 1 to ${PLAN_VERSION}; a newer Biquadrant may open it`);
  }
  refuseNewerFields(root, version);
  const current = object(migrate(root, version), '');
  return readCurrent(current);
}

/**
 * Refuses, at its path, a field that came with a version above the file's own (see FIELDS_SINCE
 * in migrate.ts): a version 1 file with a profile, a version 2 file with measurements.
 */
function refuseNewerFields(root: Record<string, unknown>, version: number): void {
  const check = (o: unknown, table: Record<string, number>, path: string) => {
    if (typeof o !== 'object' || o === null || Array.isArray(o)) return;
    for (const key of Object.keys(o)) {
      const since = table[key];
      if (since !== undefined && version < since) {
        throw new PlanError(path ? `${path}.${key}` : key, `is not a field of plan version ${version} (${VERSION_ADDED[since]} came with version ${since})`);
      }
    }
  };
  check(root, FIELDS_SINCE.plan, '');
  if (Array.isArray(root.outputs)) root.outputs.forEach((o, i) => check(o, FIELDS_SINCE.output, `outputs[${i}]`));
  const checkBands = (chain: unknown, path: string) => {
    const bands = typeof chain === 'object' && chain !== null ? (chain as Record<string, unknown>).bands : undefined;
    if (Array.isArray(bands)) bands.forEach((b, i) => check(b, FIELDS_SINCE.band, `${path}.bands[${i}]`));
  };
  checkBands(root.input, 'input');
  if (Array.isArray(root.outputs)) root.outputs.forEach((o, i) => checkBands(o, `outputs[${i}]`));
}

const PLAN_KEYS = ['format', 'version', 'name', 'notes', 'sampleRate', 'input', 'outputs', 'profile', 'airTemperatureC', 'measurements', 'systemMeasurementIds', 'defaultDesign', 'targets'];

function readCurrent(o: Record<string, unknown>): Plan {
  allowKeys(o, '', PLAN_KEYS);
  const sampleRate = num(o.sampleRate, 'sampleRate');
  if (sampleRate < LIMITS.sampleRateMinHz || sampleRate > LIMITS.sampleRateMaxHz) {
    throw new PlanError('sampleRate', `must be between ${LIMITS.sampleRateMinHz} and ${LIMITS.sampleRateMaxHz} Hz`);
  }
  const plan: Plan = {
    format: PLAN_FORMAT,
    version: PLAN_VERSION,
    name: str(o.name, 'name', LIMITS.nameMaxLength),
    sampleRate,
    input: { bands: [] },
    outputs: [],
  };
  if (o.notes !== undefined) plan.notes = str(o.notes, 'notes', LIMITS.notesMaxLength, true);
  const input = object(o.input, 'input');
  allowKeys(input, 'input', ['bands']);
  plan.input.bands = readBands(input.bands, 'input.bands', sampleRate);

  const outputs = array(o.outputs, 'outputs');
  if (outputs.length < LIMITS.outputsMin || outputs.length > LIMITS.outputsMax) {
    throw new PlanError('outputs', `must hold ${LIMITS.outputsMin} to ${LIMITS.outputsMax} outputs (has ${outputs.length})`);
  }
  const ids = new Set<string>();
  const exportNamesSet = new Set<string>();
  outputs.forEach((v, i) => {
    const out = readOutput(v, `outputs[${i}]`, sampleRate, plan.input.bands.length);
    if (ids.has(out.id)) throw new PlanError(`outputs[${i}].id`, `"${out.id}" is used by another output`);
    ids.add(out.id);
    if (out.exportName !== undefined) {
      // Case is ignored: the C header upper-cases export names for its macros.
      const key = out.exportName.toLowerCase();
      if (exportNamesSet.has(key)) throw new PlanError(`outputs[${i}].exportName`, `"${out.exportName}" is used by another output (case is ignored)`);
      exportNamesSet.add(key);
    }
    plan.outputs.push(out);
  });
  if (o.profile !== undefined && o.profile !== null) plan.profile = readBoardProfile(o.profile, 'profile');
  readMeasurementFields(o, plan);
  if (o.defaultDesign !== undefined) plan.defaultDesign = oneOf(o.defaultDesign, 'defaultDesign', DESIGN_METHODS) as DesignMethod;
  if (o.targets !== undefined) plan.targets = readTargets(o.targets, 'targets', plan);
  return plan;
}

// ---- measurements (version 3) -----------------------------------------------------------------

/** Reads the version 3 plan fields into `plan` and refuses every dangling or doubled reference. */
function readMeasurementFields(o: Record<string, unknown>, plan: Plan): void {
  if (o.airTemperatureC !== undefined) {
    const t = num(o.airTemperatureC, 'airTemperatureC');
    if (t < LIMITS.airTemperatureCMin || t > LIMITS.airTemperatureCMax) {
      throw new PlanError('airTemperatureC', `must be between ${LIMITS.airTemperatureCMin} and ${LIMITS.airTemperatureCMax} degrees C`);
    }
    plan.airTemperatureC = t;
  }
  const ids = new Set<string>();
  if (o.measurements !== undefined) {
    const list = array(o.measurements, 'measurements');
    if (list.length > LIMITS.measurementsMax) throw new PlanError('measurements', `must hold at most ${LIMITS.measurementsMax} measurements`);
    plan.measurements = list.map((v, i) => {
      const m = readMeasurement(v, `measurements[${i}]`);
      if (ids.has(m.id)) throw new PlanError(`measurements[${i}].id`, `"${m.id}" is used by another measurement`);
      ids.add(m.id);
      return m;
    });
  }
  const drivers = new Set<string>();
  plan.outputs.forEach((out, i) => {
    const id = out.driverMeasurementId;
    if (id === undefined) return;
    if (!ids.has(id)) throw new PlanError(`outputs[${i}].driverMeasurementId`, `"${id}" names no measurement of this plan`);
    drivers.add(id);
  });
  if (o.systemMeasurementIds !== undefined) {
    const list = array(o.systemMeasurementIds, 'systemMeasurementIds');
    const seen = new Set<string>();
    plan.systemMeasurementIds = list.map((v, i) => {
      const path = `systemMeasurementIds[${i}]`;
      const id = identifier(v, path);
      if (!ids.has(id)) throw new PlanError(path, `"${id}" names no measurement of this plan`);
      if (seen.has(id)) throw new PlanError(path, `"${id}" appears twice`);
      if (drivers.has(id)) throw new PlanError(path, `"${id}" is an output's driver measurement; a measurement is of one driver or of the system, not both`);
      seen.add(id);
      return id;
    });
  }
}

const MEASUREMENT_KEYS = ['id', 'name', 'source', 'frequencyHz', 'magnitudeDb', 'phaseDeg', 'phaseEstimated', 'delayMs', 'notes'];

/**
 * Reads one measurement at `path`; throws `PlanError` with the field path. Required: `id`,
 * `source`, `frequencyHz` (2 to 65536 frequencies > 0, strictly increasing) and `magnitudeDb` (as
 * many). Defaults: `name` (the id), `phaseDeg` (null), `phaseEstimated` (false), `delayMs` (0),
 * `notes` (none).
 */
export function readMeasurement(v: unknown, path: string): Measurement {
  const o = object(v, path);
  allowKeys(o, path, MEASUREMENT_KEYS);
  const at = (key: string) => `${path}.${key}`;
  const id = identifier(o.id, at('id'));
  const name = o.name === undefined ? id : plainText(o.name, at('name'), LIMITS.nameMaxLength, false);
  if (name.trim() === '') throw new PlanError(at('name'), 'must not be empty');
  const src = object(o.source, at('source'));
  allowKeys(src, at('source'), ['fileName', 'kind']);
  const fileName = plainText(src.fileName, at('source.fileName'), LIMITS.fileNameMaxLength, false);
  if (/[/\\]/.test(fileName)) throw new PlanError(at('source.fileName'), 'must be a file name without a folder');
  const kind = oneOf(src.kind, at('source.kind'), MEASUREMENT_KINDS) as MeasurementKind;

  const frequencyHz = numberList(o.frequencyHz, at('frequencyHz'), LIMITS.measurementPointsMax);
  if (frequencyHz.length < LIMITS.measurementPointsMin) throw new PlanError(at('frequencyHz'), `must hold at least ${LIMITS.measurementPointsMin} frequencies`);
  for (let i = 0; i < frequencyHz.length; i++) {
    const f = frequencyHz[i];
    if (!(f > 0)) throw new PlanError(`${at('frequencyHz')}[${i}]`, 'must be > 0 Hz');
    if (f > LIMITS.measurementFrequencyMaxHz) throw new PlanError(`${at('frequencyHz')}[${i}]`, `must be at most ${LIMITS.measurementFrequencyMaxHz} Hz`);
    if (i > 0 && !(f > frequencyHz[i - 1])) {
      throw new PlanError(`${at('frequencyHz')}[${i}]`, `${f} Hz does not increase on the one before (${frequencyHz[i - 1]} Hz): frequencies must strictly increase`);
    }
  }
  const n = frequencyHz.length;
  const magnitudeDb = numberList(o.magnitudeDb, at('magnitudeDb'), n);
  sameLength(magnitudeDb, n, at('magnitudeDb'));
  boundAll(magnitudeDb, at('magnitudeDb'), LIMITS.measurementMagnitudeDbAbsMax, 'dB');
  let phaseDeg: number[] | null = null;
  if (o.phaseDeg !== undefined && o.phaseDeg !== null) {
    phaseDeg = numberList(o.phaseDeg, at('phaseDeg'), n);
    sameLength(phaseDeg, n, at('phaseDeg'));
    boundAll(phaseDeg, at('phaseDeg'), LIMITS.measurementPhaseDegAbsMax, 'degrees');
  }
  const phaseEstimated = o.phaseEstimated === undefined ? false : bool(o.phaseEstimated, at('phaseEstimated'));
  if (phaseEstimated && phaseDeg === null) throw new PlanError(at('phaseEstimated'), 'is true, but the measurement has no phase (phaseDeg is null)');
  const delayMs = o.delayMs === undefined ? 0 : num(o.delayMs, at('delayMs'));
  if (Math.abs(delayMs) > LIMITS.measurementDelayMsAbsMax) throw new PlanError(at('delayMs'), `must be within +/-${LIMITS.measurementDelayMsAbsMax} ms`);
  const notes: string[] = [];
  if (o.notes !== undefined) {
    const list = array(o.notes, at('notes'));
    if (list.length > LIMITS.measurementNotesMax) throw new PlanError(at('notes'), `must hold at most ${LIMITS.measurementNotesMax} lines`);
    list.forEach((x, i) => notes.push(plainText(x, `${at('notes')}[${i}]`, LIMITS.measurementNoteMaxLength, true)));
  }
  return { id, name, source: { fileName, kind }, frequencyHz, magnitudeDb, phaseDeg, phaseEstimated, delayMs, notes };
}

// ---- targets (version 3) ----------------------------------------------------------------------

const TARGET_KEYS = ['scope', 'outputId', 'parts', 'alignment', 'levelDb', 'fromHz', 'toHz', 'toleranceDb'];

/** The plan's targets: at most one per output and one for the system, each naming a real output. */
function readTargets(v: unknown, path: string, plan: Plan): Target[] {
  const list = array(v, path);
  const seen = new Set<string>();
  return list.map((x, i) => {
    const at = `${path}[${i}]`;
    const t = readTarget(x, at, plan.sampleRate);
    if (t.scope === 'output') {
      const out = plan.outputs.find((o) => o.id === t.outputId);
      if (!out) throw new PlanError(`${at}.outputId`, `"${t.outputId}" names no output of this plan`);
    }
    const key = t.scope === 'system' ? 'system' : `output ${t.outputId}`;
    if (seen.has(key)) throw new PlanError(at, t.scope === 'system' ? 'a second target of the system (one is allowed)' : `a second target of output "${t.outputId}" (one per output is allowed)`);
    seen.add(key);
    return t;
  });
}

/**
 * Reads one target at `path`; throws `PlanError` with the field path. Required: `scope` and, for
 * an output, `outputId`. Defaults: `parts` (flat), `alignment` ("mean"), `levelDb` (found by the
 * alignment), `fromHz` / `toHz` (the fit's default range), `toleranceDb` (1).
 */
export function readTarget(v: unknown, path: string, sampleRate: number): Target {
  const o = object(v, path);
  allowKeys(o, path, TARGET_KEYS);
  const at = (key: string) => `${path}.${key}`;
  const scope = oneOf(o.scope, at('scope'), ['output', 'system']) as Target['scope'];
  const t: Target = { scope, parts: [], alignment: 'mean', toleranceDb: 1 };
  if (scope === 'output') t.outputId = identifier(o.outputId, at('outputId'));
  else if (o.outputId !== undefined) throw new PlanError(at('outputId'), 'applies to a target of an output only (scope "output")');
  if (o.parts !== undefined) {
    const parts = array(o.parts, at('parts'));
    if (parts.length > LIMITS.targetPartsMax) throw new PlanError(at('parts'), `must hold at most ${LIMITS.targetPartsMax} parts`);
    t.parts = parts.map((p, i) => readTargetPart(p, `${at('parts')}[${i}]`, sampleRate, scope));
  }
  if (o.alignment !== undefined) t.alignment = oneOf(o.alignment, at('alignment'), ['mean', 'median']) as Target['alignment'];
  if (o.levelDb !== undefined) {
    t.levelDb = num(o.levelDb, at('levelDb'));
    if (Math.abs(t.levelDb) > LIMITS.measurementMagnitudeDbAbsMax) throw new PlanError(at('levelDb'), `must be within +/-${LIMITS.measurementMagnitudeDbAbsMax} dB`);
  }
  if (o.fromHz !== undefined) t.fromHz = frequency(o.fromHz, at('fromHz'), sampleRate);
  if (o.toHz !== undefined) t.toHz = frequency(o.toHz, at('toHz'), sampleRate);
  if (t.fromHz !== undefined && t.toHz !== undefined && !(t.toHz > t.fromHz)) {
    throw new PlanError(at('toHz'), `must be above fromHz (${t.fromHz} Hz)`);
  }
  if (o.toleranceDb !== undefined) {
    t.toleranceDb = num(o.toleranceDb, at('toleranceDb'));
    if (!(t.toleranceDb >= LIMITS.targetToleranceDbMin && t.toleranceDb <= LIMITS.targetToleranceDbMax)) {
      throw new PlanError(at('toleranceDb'), `must be from ${LIMITS.targetToleranceDbMin} to ${LIMITS.targetToleranceDbMax} dB`);
    }
  }
  return t;
}

function targetDb(v: unknown, path: string): number {
  const x = num(v, path);
  if (Math.abs(x) > LIMITS.targetDbAbsMax) throw new PlanError(path, `must be within +/-${LIMITS.targetDbAbsMax} dB`);
  return x;
}

function readTargetPart(v: unknown, path: string, sampleRate: number, scope: Target['scope']): TargetPart {
  const o = object(v, path);
  const kind = oneOf(o.kind, `${path}.kind`, TARGET_PART_KINDS) as TargetPartKind;
  const at = (key: string) => `${path}.${key}`;
  switch (kind) {
    case 'flat':
      allowKeys(o, path, ['kind']);
      return { kind };
    case 'crossover':
      allowKeys(o, path, ['kind']);
      if (scope !== 'output') throw new PlanError(at('kind'), '"crossover" (the output\'s own edges) applies to a target of an output only');
      return { kind };
    case 'tilt': {
      allowKeys(o, path, ['kind', 'dbPerOctave', 'pivotHz']);
      const dbPerOctave = num(o.dbPerOctave, at('dbPerOctave'));
      if (Math.abs(dbPerOctave) > LIMITS.targetTiltDbPerOctaveAbsMax) {
        throw new PlanError(at('dbPerOctave'), `must be within +/-${LIMITS.targetTiltDbPerOctaveAbsMax} dB per octave`);
      }
      return { kind, dbPerOctave, pivotHz: frequency(o.pivotHz, at('pivotHz'), sampleRate) };
    }
    case 'lowShelf':
    case 'highShelf':
      allowKeys(o, path, ['kind', 'frequency', 'gainDb']);
      return { kind, frequency: frequency(o.frequency, at('frequency'), sampleRate), gainDb: targetDb(o.gainDb, at('gainDb')) };
    case 'points': {
      allowKeys(o, path, ['kind', 'points']);
      const list = array(o.points, at('points'));
      if (list.length < 1 || list.length > LIMITS.targetPointsMax) throw new PlanError(at('points'), `must hold 1 to ${LIMITS.targetPointsMax} points`);
      const points = list.map((p, i): [number, number] => {
        const pp = `${at('points')}[${i}]`;
        const pair = array(p, pp);
        if (pair.length !== 2) throw new PlanError(pp, 'must be a pair [frequency Hz, dB]');
        const f = num(pair[0], `${pp}[0]`);
        if (!(f > 0) || f > LIMITS.measurementFrequencyMaxHz) throw new PlanError(`${pp}[0]`, `must be > 0 and at most ${LIMITS.measurementFrequencyMaxHz} Hz`);
        return [f, targetDb(pair[1], `${pp}[1]`)];
      });
      for (let i = 1; i < points.length; i++) {
        if (!(points[i][0] > points[i - 1][0])) {
          throw new PlanError(`${at('points')}[${i}][0]`, `${points[i][0]} Hz does not increase on the one before (${points[i - 1][0]} Hz): frequencies must strictly increase`);
        }
      }
      return { kind, points };
    }
  }
}

function readAcousticOffset(v: unknown, path: string): AcousticOffset {
  const o = object(v, path);
  allowKeys(o, path, ['value', 'unit']);
  const unit = oneOf(o.unit, `${path}.unit`, ACOUSTIC_OFFSET_UNITS) as AcousticOffset['unit'];
  const value = num(o.value, `${path}.value`);
  const max = unit === 'mm' ? LIMITS.acousticOffsetMmAbsMax : LIMITS.acousticOffsetMsAbsMax;
  if (Math.abs(value) > max) throw new PlanError(`${path}.value`, `must be within +/-${max} ${unit}`);
  return { value, unit };
}

/** An id of the plan's kind ([a-z0-9_-]{1,32}). */
function identifier(v: unknown, path: string): string {
  const id = str(v, path, 32);
  if (!LIMITS.idPattern.test(id)) throw new PlanError(path, 'must be 1 to 32 of a-z, 0-9, "_" or "-"');
  return id;
}

/** Control characters but tab: a measurement's note lines may hold tabs (the columns of a header). */
const CONTROL_BUT_TAB = /[\u0000-\u0008\u000a-\u001f\u007f-\u009f\u2028\u2029]/;

/** A name or note line: `str`'s checks, with tabs allowed when `allowTab` (line breaks never). */
function plainText(v: unknown, path: string, maxLength: number, allowTab: boolean): string {
  if (!allowTab) return str(v, path, maxLength);
  const s = str(v, path, maxLength, true);
  const m = CONTROL_BUT_TAB.exec(s);
  if (m) throw new PlanError(path, `must not contain control characters (U+${m[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')} at character ${m.index + 1})`);
  return s;
}

/**
 * A list of at most `max` plain finite numbers; the first bad element is named by its index.
 * The path of an element is built only for an error: the app validates the whole plan on every
 * edit, and measurements hold thousands of numbers.
 */
function numberList(v: unknown, path: string, max: number): number[] {
  const list = array(v, path);
  if (list.length > max) throw new PlanError(path, `must hold at most ${max} numbers (has ${list.length})`);
  const out = new Array<number>(list.length);
  for (let i = 0; i < list.length; i++) {
    const x = list[i];
    out[i] = typeof x === 'number' && Number.isFinite(x) ? x : num(x, `${path}[${i}]`);
  }
  return out;
}

function sameLength(xs: number[], n: number, path: string): void {
  if (xs.length !== n) throw new PlanError(path, `must hold one number per frequency (${n}), not ${xs.length}`);
}

function boundAll(xs: number[], path: string, absMax: number, unit: string): void {
  for (let i = 0; i < xs.length; i++) {
    if (Math.abs(xs[i]) > absMax) throw new PlanError(`${path}[${i}]`, `must be within +/-${absMax} ${unit}`);
  }
}

// ---- board profile (version 2) ----------------------------------------------------------------

const PROFILE_KEYS = [
  'name',
  'sampleRate',
  'order',
  'feedbackSign',
  'writeA0',
  'number',
  'coefficientScale',
  'gain',
  'delayUnit',
  'maxDelaySamples',
  'sectionBudget',
];

/**
 * Reads a board profile at `path` (`profile` in a plan); throws `PlanError` with the field path.
 * Only `sectionBudget` is required; the rest default to the file convention: `name` ("custom
 * profile"), `sampleRate` (null: the plan's rate), `order` (b0 b1 b2 a1 a2), `feedbackSign`
 * ("as-computed"), `writeA0` (false), `number` (shortest exact decimal), `coefficientScale` (1),
 * `gain` ("separate"), `delayUnit` ("samples") and `maxDelaySamples` (null).
 */
export function readBoardProfile(v: unknown, path: string): BoardProfile {
  const o = object(v, path);
  allowKeys(o, path, PROFILE_KEYS);
  const at = (key: string) => (path ? `${path}.${key}` : key);
  const name = o.name === undefined ? 'custom profile' : str(o.name, at('name'), LIMITS.nameMaxLength);
  let sampleRate: number | null = null;
  if (o.sampleRate !== undefined && o.sampleRate !== null) {
    sampleRate = num(o.sampleRate, at('sampleRate'));
    if (sampleRate < LIMITS.sampleRateMinHz || sampleRate > LIMITS.sampleRateMaxHz) {
      throw new PlanError(at('sampleRate'), `must be between ${LIMITS.sampleRateMinHz} and ${LIMITS.sampleRateMaxHz} Hz, or null for the plan's rate`);
    }
  }
  const writeA0 = o.writeA0 === undefined ? false : bool(o.writeA0, at('writeA0'));
  const order: CoefficientName[] = o.order === undefined ? ['b0', 'b1', 'b2', 'a1', 'a2'] : readOrder(o.order, at('order'), writeA0);
  const feedbackSign =
    o.feedbackSign === undefined ? 'as-computed' : (oneOf(o.feedbackSign, at('feedbackSign'), ['as-computed', 'negated']) as BoardProfile['feedbackSign']);
  const number: NumberFormat = o.number === undefined ? { kind: 'decimal', significantDigits: null } : readNumberFormat(o.number, at('number'));
  const coefficientScale = o.coefficientScale === undefined ? 1 : num(o.coefficientScale, at('coefficientScale'));
  const log2 = Math.log2(Math.abs(coefficientScale));
  if (!(coefficientScale > 0) || !Number.isInteger(log2) || Math.abs(log2) > LIMITS.coefficientScaleLog2Max) {
    throw new PlanError(
      at('coefficientScale'),
      `must be a power of two from 2^-${LIMITS.coefficientScaleLog2Max} to 2^${LIMITS.coefficientScaleLog2Max} (0.5 halves every coefficient), not ${coefficientScale}`,
    );
  }
  const gain = o.gain === undefined ? 'separate' : (oneOf(o.gain, at('gain'), ['separate', 'first-section']) as BoardProfile['gain']);
  const delayUnit = o.delayUnit === undefined ? 'samples' : (oneOf(o.delayUnit, at('delayUnit'), ['samples', 'ms']) as BoardProfile['delayUnit']);
  let maxDelaySamples: number | null = null;
  if (o.maxDelaySamples !== undefined && o.maxDelaySamples !== null) {
    maxDelaySamples = wholeNumber(o.maxDelaySamples, at('maxDelaySamples'), 0, LIMITS.maxDelaySamplesMax);
  }
  const sectionBudget = wholeNumber(o.sectionBudget, at('sectionBudget'), 1, LIMITS.sectionBudgetMax);
  return { name, sampleRate, order, feedbackSign, writeA0, number, coefficientScale, gain, delayUnit, maxDelaySamples, sectionBudget };
}

function readOrder(v: unknown, path: string, writeA0: boolean): CoefficientName[] {
  const list = array(v, path);
  const names = list.map((x, i) => oneOf(x, `${path}[${i}]`, COEFFICIENT_NAMES) as CoefficientName);
  const seen = new Set<string>();
  names.forEach((n, i) => {
    if (seen.has(n)) throw new PlanError(`${path}[${i}]`, `"${n}" appears twice`);
    seen.add(n);
  });
  for (const need of ['b0', 'b1', 'b2', 'a1', 'a2']) {
    if (!seen.has(need)) throw new PlanError(path, `must name each of b0, b1, b2, a1, a2 once (missing ${need})`);
  }
  if (seen.has('a0') && !writeA0) throw new PlanError(path, 'places a0, but writeA0 is false');
  return names;
}

function readNumberFormat(v: unknown, path: string): NumberFormat {
  const o = object(v, path);
  const at = (key: string) => `${path}.${key}`;
  const kind = oneOf(o.kind, at('kind'), ['decimal', 'fixed']);
  if (kind === 'decimal') {
    allowKeys(o, path, ['kind', 'significantDigits']);
    let digits: number | null = null;
    if (o.significantDigits !== undefined && o.significantDigits !== null) {
      digits = wholeNumber(o.significantDigits, at('significantDigits'), 1, LIMITS.significantDigitsMax);
    }
    return { kind: 'decimal', significantDigits: digits };
  }
  allowKeys(o, path, ['kind', 'integerBits', 'fractionBits', 'wordBits', 'notation']);
  const wordBits = wholeNumber(o.wordBits, at('wordBits'), LIMITS.wordBitsMin, LIMITS.wordBitsMax);
  const integerBits = wholeNumber(o.integerBits, at('integerBits'), 1, wordBits);
  const fractionBits = wholeNumber(o.fractionBits, at('fractionBits'), 0, wordBits - 1);
  if (integerBits + fractionBits > wordBits) {
    throw new PlanError(path, `Q${integerBits}.${fractionBits} needs ${integerBits + fractionBits} bits, more than the ${wordBits}-bit word`);
  }
  const notation = o.notation === undefined ? 'decimal' : (oneOf(o.notation, at('notation'), ['decimal', 'hex']) as 'decimal' | 'hex');
  return { kind: 'fixed', integerBits, fractionBits, wordBits, notation };
}

function wholeNumber(v: unknown, path: string, min: number, max: number): number {
  const x = num(v, path);
  if (!Number.isInteger(x) || x < min || x > max) throw new PlanError(path, `must be a whole number from ${min} to ${max}`);
  return x;
}

/**
 * Sections an edge designs to (design/crossover.ts): one per pole pair and a first-order one for
 * an odd order; a Linkwitz-Riley of order 2n is the Butterworth of order n twice.
 */
function edgeSections(edge: Crossover | null): number {
  if (!edge) return 0;
  return edge.family === 'linkwitz-riley' ? 2 * Math.ceil(edge.order / 4) : Math.ceil(edge.order / 2);
}

function readOutput(v: unknown, path: string, fs: number, inputBands: number): Output {
  const o = object(v, path);
  allowKeys(o, path, ['id', 'name', 'exportName', 'gainDb', 'delayMs', 'invert', 'mute', 'highPass', 'lowPass', 'bands', 'driverMeasurementId', 'acousticOffset']);
  const id = str(o.id, `${path}.id`, 32);
  if (!LIMITS.idPattern.test(id)) throw new PlanError(`${path}.id`, 'must be 1 to 32 of a-z, 0-9, "_" or "-"');
  let exportName: string | undefined;
  if (o.exportName !== undefined) {
    exportName = str(o.exportName, `${path}.exportName`, LIMITS.exportNameMaxLength);
    const problem = exportNameProblem(exportName);
    if (problem) throw new PlanError(`${path}.exportName`, problem);
  }
  const gainDb = o.gainDb === undefined ? 0 : num(o.gainDb, `${path}.gainDb`);
  if (Math.abs(gainDb) > LIMITS.outputGainDbAbsMax) throw new PlanError(`${path}.gainDb`, `must be within +/-${LIMITS.outputGainDbAbsMax} dB`);
  const delayMs = o.delayMs === undefined ? 0 : num(o.delayMs, `${path}.delayMs`);
  if (delayMs < 0) throw new PlanError(`${path}.delayMs`, 'must be >= 0');
  if (delayMs > LIMITS.delayMsMax) throw new PlanError(`${path}.delayMs`, `must be at most ${LIMITS.delayMsMax} ms`);
  const name = o.name === undefined ? id : str(o.name, `${path}.name`, LIMITS.nameMaxLength);
  const invert = o.invert === undefined ? false : bool(o.invert, `${path}.invert`);
  const mute = o.mute === undefined ? false : bool(o.mute, `${path}.mute`);
  const highPass = readEdge(o.highPass, `${path}.highPass`, fs);
  const lowPass = readEdge(o.lowPass, `${path}.lowPass`, fs);
  // Up to bandsMax bands, or more while the whole signal path stays within pathSectionsMax.
  const maxBands = Math.max(LIMITS.bandsMax, LIMITS.pathSectionsMax - inputBands - edgeSections(highPass) - edgeSections(lowPass));
  const bands = readBands(o.bands, `${path}.bands`, fs, maxBands);
  const out: Output = { id, name, gainDb, delayMs, invert, mute, highPass, lowPass, bands };
  if (exportName !== undefined) out.exportName = exportName;
  // Version 3; the reference is checked against the plan's measurements in readMeasurementFields.
  if (o.driverMeasurementId !== undefined && o.driverMeasurementId !== null) out.driverMeasurementId = identifier(o.driverMeasurementId, `${path}.driverMeasurementId`);
  if (o.acousticOffset !== undefined && o.acousticOffset !== null) out.acousticOffset = readAcousticOffset(o.acousticOffset, `${path}.acousticOffset`);
  return out;
}

function readEdge(v: unknown, path: string, fs: number): Crossover | null {
  if (v === undefined || v === null) return null;
  const o = object(v, path);
  allowKeys(o, path, ['family', 'order', 'frequency', 'normalization']);
  const family = oneOf(o.family, `${path}.family`, CROSSOVER_FAMILIES) as CrossoverFamily;
  const order = num(o.order, `${path}.order`);
  if (!Number.isInteger(order) || order < LIMITS.orderMin || order > LIMITS.orderMax) {
    throw new PlanError(`${path}.order`, `must be a whole number from ${LIMITS.orderMin} to ${LIMITS.orderMax}`);
  }
  if (family === 'linkwitz-riley' && !LIMITS.linkwitzRileyOrders.includes(order)) {
    throw new PlanError(`${path}.order`, 'linkwitz-riley takes order 2, 4, 6 or 8');
  }
  const edge: Crossover = { family, order, frequency: frequency(o.frequency, `${path}.frequency`, fs) };
  if (family === 'bessel') {
    edge.normalization = o.normalization === undefined ? 'phase' : (oneOf(o.normalization, `${path}.normalization`, BESSEL_NORMALIZATIONS) as BesselNormalization);
  } else if (o.normalization !== undefined) {
    throw new PlanError(`${path}.normalization`, 'applies to bessel edges only');
  }
  return edge;
}

function readBands(v: unknown, path: string, fs: number, maxBands: number = LIMITS.bandsMax): Band[] {
  if (v === undefined) return [];
  const list = array(v, path);
  if (list.length > maxBands) {
    throw new PlanError(
      path,
      maxBands === LIMITS.bandsMax
        ? `must hold at most ${LIMITS.bandsMax} bands`
        : `must hold at most ${maxBands} bands here (an output's path, input bands and edge sections included, holds at most ${LIMITS.pathSectionsMax} sections)`,
    );
  }
  const ids = new Set<string>();
  return list.map((b, i) => {
    const band = readBand(b, `${path}[${i}]`, fs);
    if (ids.has(band.id)) throw new PlanError(`${path}[${i}].id`, `"${band.id}" is used by another band of this chain`);
    ids.add(band.id);
    return band;
  });
}

const BAND_KEYS = ['id', 'type', 'frequency', 'gainDb', 'q', 'slope', 'enabled', 'coefficients', 'design', 'fitted', 'locked'];

function readBand(v: unknown, path: string, fs: number): Band {
  const o = object(v, path);
  allowKeys(o, path, BAND_KEYS);
  const id = str(o.id, `${path}.id`, LIMITS.bandIdMaxLength);
  if (id.length === 0) throw new PlanError(`${path}.id`, 'must not be empty');
  const type = oneOf(o.type, `${path}.type`, BAND_TYPES) as BandType;
  const isRaw = type === 'raw';
  const band: Band = {
    id,
    type,
    frequency: isRaw && o.frequency === undefined ? 1000 : frequency(o.frequency, `${path}.frequency`, fs),
    enabled: o.enabled === undefined ? true : bool(o.enabled, `${path}.enabled`),
  };
  if (o.gainDb !== undefined) {
    band.gainDb = num(o.gainDb, `${path}.gainDb`);
    if (Math.abs(band.gainDb) > LIMITS.gainDbAbsMax) throw new PlanError(`${path}.gainDb`, `must be within +/-${LIMITS.gainDbAbsMax} dB`);
  }
  if (o.q !== undefined) {
    band.q = num(o.q, `${path}.q`);
    // Written so that NaN fails too (every comparison below is "not inside the range").
    if (!(band.q >= LIMITS.qMin && band.q <= LIMITS.qMax)) throw new PlanError(`${path}.q`, `must be from ${LIMITS.qMin} to ${LIMITS.qMax}`);
  }
  if (o.slope !== undefined) {
    band.slope = num(o.slope, `${path}.slope`);
    if (!(band.slope >= LIMITS.slopeMin)) throw new PlanError(`${path}.slope`, `must be at least ${LIMITS.slopeMin}`);
    if ((type === 'lowShelf' || type === 'highShelf') && band.q === undefined) {
      const gain = band.gainDb ?? 0;
      const safe = safeShelfSlope(gain);
      if (!(band.slope <= safe)) {
        throw new PlanError(
          `${path}.slope`,
          `must be at most ${shelfSlopeLimitText(gain)} for a ${gain} dB shelf (steeper puts its poles within a Q ${SHELF_SLOPE_Q_MAX} resonance of the unit circle; they reach it at S ${maxShelfSlope(gain).toPrecision(4)}); S up to 1 keeps the shelf monotonic`,
        );
      }
    }
  }
  if (o.coefficients !== undefined) band.coefficients = readCoefficients(o.coefficients, `${path}.coefficients`);
  // Version 3, kept only when given: a band read without them is written without them.
  if (o.fitted !== undefined) band.fitted = bool(o.fitted, `${path}.fitted`);
  if (o.locked !== undefined) band.locked = bool(o.locked, `${path}.locked`);
  if (isRaw && !band.coefficients) throw new PlanError(`${path}.coefficients`, 'required for a raw band');
  if (o.design !== undefined) {
    band.design = oneOf(o.design, `${path}.design`, DESIGN_METHODS) as DesignMethod;
    if (band.design === 'matched' && !MATCHED_DESIGN_TYPES.includes(type)) {
      throw new PlanError(`${path}.design`, `"matched" applies to peaking, shelf, low-pass, high-pass, band-pass and notch bands, not ${type}`);
    }
  }
  return band;
}

function readCoefficients(v: unknown, path: string): RawCoefficients {
  const o = object(v, path);
  allowKeys(o, path, ['b0', 'b1', 'b2', 'a0', 'a1', 'a2']);
  const c: RawCoefficients = {
    b0: num(o.b0, `${path}.b0`),
    b1: num(o.b1, `${path}.b1`),
    b2: num(o.b2, `${path}.b2`),
    a0: o.a0 === undefined ? 1 : num(o.a0, `${path}.a0`),
    a1: num(o.a1, `${path}.a1`),
    a2: num(o.a2, `${path}.a2`),
  };
  if (c.a0 === 0) throw new PlanError(`${path}.a0`, 'must not be 0');
  // Bounded after dividing by a0: |b| up to 1000 (+60 dB, the gain limit) and |a1|, |a2| up to
  // 1000 keep a cascade's response, poles and sum |h| finite in double precision.
  const max = LIMITS.rawCoefficientAbsMax;
  for (const k of ['b0', 'b1', 'b2', 'a1', 'a2'] as const) {
    const x = c[k] / c.a0;
    if (!(Math.abs(x) <= max)) {
      throw new PlanError(`${path}.${k}`, `divided by a0 must be within +/-${max} (is ${Number.isFinite(x) ? x.toPrecision(6) : 'out of range'})`);
    }
  }
  return c;
}

// ---- small typed readers -------------------------------------------------------------------

function describe(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'string') return `the string ${shownToken(v, 40)}`;
  return typeof v === 'object' ? 'an object' : `${typeof v} ${String(v)}`;
}

function object(v: unknown, path: string): Record<string, unknown> {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) {
    throw new PlanError(path, `must be an object, not ${describe(v)}`);
  }
  return v as Record<string, unknown>;
}

function array(v: unknown, path: string): unknown[] {
  if (!Array.isArray(v)) throw new PlanError(path, `must be a list, not ${v === undefined ? 'missing' : describe(v)}`);
  return v;
}

function num(v: unknown, path: string): number {
  if (v === undefined) throw new PlanError(path, 'is required');
  if (typeof v !== 'number') throw new PlanError(path, `must be a number, not ${describe(v)}`);
  if (!Number.isFinite(v)) throw new PlanError(path, 'must be a finite number');
  return v;
}

/**
 * Control characters (C0, DEL, C1) and the Unicode line and paragraph separators. In a name or id
 * they can end a comment line of an export and start a line the board (or our import) reads as
 * data, so names and ids refuse them; notes, which are free text, keep tab and line breaks.
 */
export const CONTROL_CHARACTERS = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/;
const CONTROL_EXCEPT_LINE_BREAKS = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

function str(v: unknown, path: string, maxLength: number, allowLineBreaks = false): string {
  if (v === undefined) throw new PlanError(path, 'is required');
  if (typeof v !== 'string') throw new PlanError(path, `must be a string, not ${describe(v)}`);
  if (v.length > maxLength) throw new PlanError(path, `must be at most ${maxLength} characters`);
  const bad = (allowLineBreaks ? CONTROL_EXCEPT_LINE_BREAKS : CONTROL_CHARACTERS).exec(v);
  if (bad) {
    const code = bad[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0');
    throw new PlanError(path, `must not contain control characters (U+${code} at character ${bad.index + 1})`);
  }
  return v;
}

function bool(v: unknown, path: string): boolean {
  if (typeof v !== 'boolean') throw new PlanError(path, `must be true or false, not ${describe(v)}`);
  return v;
}

function oneOf(v: unknown, path: string, allowed: readonly string[]): string {
  if (v === undefined) throw new PlanError(path, 'is required');
  if (typeof v !== 'string' || !allowed.includes(v)) {
    throw new PlanError(path, `must be one of ${allowed.map((a) => `"${a}"`).join(', ')}, not ${describe(v)}`);
  }
  return v;
}

/**
 * How close (as a fraction of the sample rate) a designed frequency may come to 0 Hz and to
 * Nyquist. Closer, the bilinear designs degenerate in double precision: at the last double below
 * Nyquist a cookbook low-pass rounds to (1 + 2z^-1 + z^-2) / (1 + 2z^-1 + z^-2), a double pole on
 * the unit circle whose response there is 0/0 (NaN); within 1e-8 fs of either end, edges and
 * high-Q bands get a pole radius above 1 (unstable) from rounding alone; an edge at 1e-8 fs has
 * 1 + a1 + a2 rounded to 0 and a NaN response at 0 Hz. One millionth of the sample rate
 * (0.048 Hz at 48 kHz) is far outside any audio use and leaves a factor of 100 to those limits.
 */
export const FREQUENCY_EDGE_MARGIN = { nyquist: 1e-6, zero: 1e-6 } as const;

function frequency(v: unknown, path: string, fs: number): number {
  const f = num(v, path);
  if (!(f > 0)) throw new PlanError(path, 'must be > 0 Hz');
  if (!(f < fs / 2)) throw new PlanError(path, `must be below Nyquist (${fs / 2} Hz at ${fs} Hz)`);
  if (f > fs / 2 - FREQUENCY_EDGE_MARGIN.nyquist * fs) {
    throw new PlanError(path, `is too close to Nyquist (${fs / 2} Hz at ${fs} Hz) to design: keep it at least ${FREQUENCY_EDGE_MARGIN.nyquist * fs} Hz below`);
  }
  if (f < FREQUENCY_EDGE_MARGIN.zero * fs) {
    throw new PlanError(path, `is too close to 0 Hz to design at ${fs} Hz: must be at least ${FREQUENCY_EDGE_MARGIN.zero * fs} Hz`);
  }
  return f;
}

function allowKeys(o: Record<string, unknown>, path: string, allowed: readonly string[]): void {
  for (const key of Object.keys(o)) {
    if (!allowed.includes(key)) {
      const where = path ? `${path}.${key}` : key;
      throw new PlanError(where, `is not a field of this plan version (allowed here: ${allowed.join(', ')})`);
    }
  }
}
