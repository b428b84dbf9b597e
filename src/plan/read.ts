/**
 * Reading a plan: JSON text or a parsed value in, a complete `Plan` or one `PlanError` out.
 *
 * Every error names the field path (`outputs[1].bands[0].q: must be > 0`). Numbers must be
 * plain finite JSON numbers: NaN, Infinity and numbers written as strings are refused. A field the
 * contract does not know is refused too, rather than dropped: a plan never loses data silently.
 * Older versions are migrated (see `migrate.ts`); a version this build does not know is refused.
 */
import { maxShelfSlope } from '../design/cookbook';
import { exportNameProblem } from './export-name';
import { migrate } from './migrate';
import { jsonProblem, shownToken } from './shown-text';
import {
  BAND_TYPES,
  BESSEL_NORMALIZATIONS,
  CROSSOVER_FAMILIES,
  LIMITS,
  PLAN_FORMAT,
  PLAN_VERSION,
  COEFFICIENT_NAMES,
  type Band,
  type BandType,
  type BoardProfile,
  type CoefficientName,
  type NumberFormat,
  type BesselNormalization,
  type Crossover,
  type CrossoverFamily,
  type Output,
  type Plan,
  type RawCoefficients,
} from './types';

export class PlanError extends Error {
  constructor(
    /** Field path, e.g. `outputs[1].bands[0].q`; empty for the whole document. */
    readonly path: string,
    readonly reason: string,
  ) {
    super(path ? `${path}: ${reason}` : reason);
    this.name = 'PlanError';
  }
}

export type ReadResult = { ok: true; plan: Plan } | { ok: false; error: PlanError };

/** Parses JSON text and reads it as a plan. Never throws. */
export function readPlanText(text: string): ReadResult {
  const parsed = parseJsonText(text);
  return parsed.ok ? readPlanValue(parsed.value) : parsed;
}

/**
 * JSON.parse for plan and profile files; never throws. Text that is not JSON only because of a
 * bare NaN or Infinity is refused at that number's field path.
 */
export function parseJsonText(text: string): { ok: true; value: unknown } | { ok: false; error: PlanError } {
  try {
    return { ok: true, value: JSON.parse(text) };
  } catch (e) {
    const bare = bareNonFiniteNumber(text);
    if (bare) return { ok: false, error: new PlanError(bare.path, `must be a finite number, not ${bare.token} (not valid JSON either)`) };
    return { ok: false, error: new PlanError('', jsonProblem(text, e)) };
  }
}

/**
 * Where text that is not JSON only because of a bare NaN, Infinity or -Infinity (as some
 * writers put them) holds the first such token: its field path (`outputs[0].bands[1].q`, in
 * the reader's notation) and the token; null when that is not the reason.
 */
export function bareNonFiniteNumber(text: string): { path: string; token: string } | null {
  const MARK = '\u0000nonfinite:';
  let out = '';
  let found = false;
  for (let i = 0; i < text.length; ) {
    const ch = text[i];
    if (ch === '"') {
      // copy a string literal as it is
      let j = i + 1;
      while (j < text.length && text[j] !== '"') j += text[j] === '\\' ? 2 : 1;
      out += text.slice(i, j + 1);
      i = j + 1;
      continue;
    }
    const m = /^(-?Infinity|NaN)(?![A-Za-z0-9_])/.exec(text.slice(i, i + 10));
    if (m && !/[A-Za-z0-9_.]/.test(text[i - 1] ?? '')) {
      out += JSON.stringify(MARK + m[1]);
      i += m[1].length;
      found = true;
      continue;
    }
    out += ch;
    i++;
  }
  if (!found) return null;
  let value: unknown;
  try {
    value = JSON.parse(out);
  } catch {
    return null;
  }
  const walk = (v: unknown, path: string): { path: string; token: string } | null => {
    if (typeof v === 'string') return v.startsWith(MARK) ? { path, token: v.slice(MARK.length) } : null;
    if (Array.isArray(v)) {
      for (let k = 0; k < v.length; k++) {
        const r = walk(v[k], `${path}[${k}]`);
        if (r) return r;
      }
      return null;
    }
    if (typeof v === 'object' && v !== null) {
      for (const [key, x] of Object.entries(v)) {
        const r = walk(x, path ? `${path}.${key}` : key);
        if (r) return r;
      }
    }
    return null;
  };
  return walk(value, '');
}

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
  if (version < 2 && root.profile !== undefined) {
    throw new PlanError('profile', 'is not a field of plan version 1 (board profiles came with version 2)');
  }
  if (version < 3 && Array.isArray(root.outputs)) {
    root.outputs.forEach((out, i) => {
      if (out !== null && typeof out === 'object' && 'exportName' in out) {
        throw new PlanError(`outputs[${i}].exportName`, `is not a field of plan version ${version} (export names came with version 3)`);
      }
    });
  }
  const current = object(migrate(root, version), '');
  return readCurrent(current);
}

function readCurrent(o: Record<string, unknown>): Plan {
  allowKeys(o, '', ['format', 'version', 'name', 'notes', 'sampleRate', 'input', 'outputs', 'profile']);
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
  if (o.notes !== undefined) plan.notes = str(o.notes, 'notes', 100000);
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
    const out = readOutput(v, `outputs[${i}]`, sampleRate);
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
  return plan;
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

function readOutput(v: unknown, path: string, fs: number): Output {
  const o = object(v, path);
  allowKeys(o, path, ['id', 'name', 'exportName', 'gainDb', 'delayMs', 'invert', 'mute', 'highPass', 'lowPass', 'bands']);
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
  const out: Output = {
    id,
    name: o.name === undefined ? id : str(o.name, `${path}.name`, LIMITS.nameMaxLength),
    gainDb,
    delayMs,
    invert: o.invert === undefined ? false : bool(o.invert, `${path}.invert`),
    mute: o.mute === undefined ? false : bool(o.mute, `${path}.mute`),
    highPass: readEdge(o.highPass, `${path}.highPass`, fs),
    lowPass: readEdge(o.lowPass, `${path}.lowPass`, fs),
    bands: readBands(o.bands, `${path}.bands`, fs),
  };
  if (exportName !== undefined) out.exportName = exportName;
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

function readBands(v: unknown, path: string, fs: number): Band[] {
  if (v === undefined) return [];
  const list = array(v, path);
  if (list.length > LIMITS.bandsMax) throw new PlanError(path, `must hold at most ${LIMITS.bandsMax} bands`);
  const ids = new Set<string>();
  return list.map((b, i) => {
    const band = readBand(b, `${path}[${i}]`, fs);
    if (ids.has(band.id)) throw new PlanError(`${path}[${i}].id`, `"${band.id}" is used by another band of this chain`);
    ids.add(band.id);
    return band;
  });
}

const BAND_KEYS = ['id', 'type', 'frequency', 'gainDb', 'q', 'slope', 'enabled', 'coefficients'];

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
    if (!(band.q > 0)) throw new PlanError(`${path}.q`, 'must be > 0');
    if (band.q > LIMITS.qMax) throw new PlanError(`${path}.q`, `must be at most ${LIMITS.qMax}`);
  }
  if (o.slope !== undefined) {
    band.slope = num(o.slope, `${path}.slope`);
    if (!(band.slope > 0)) throw new PlanError(`${path}.slope`, 'must be > 0');
    if ((type === 'lowShelf' || type === 'highShelf') && band.q === undefined) {
      const max = maxShelfSlope(band.gainDb ?? 0);
      // A hair of tolerance for slopes typed at the limit; shelfAlpha clamps the rest.
      if (band.slope > max * (1 + 1e-9)) {
        throw new PlanError(`${path}.slope`, `must be at most ${max.toPrecision(6)} for a ${band.gainDb ?? 0} dB shelf (steeper has no real alpha)`);
      }
    }
  }
  if (o.coefficients !== undefined) band.coefficients = readCoefficients(o.coefficients, `${path}.coefficients`);
  if (isRaw && !band.coefficients) throw new PlanError(`${path}.coefficients`, 'required for a raw band');
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
  const scaled = [c.b0, c.b1, c.b2, c.a1, c.a2].map((x) => x / c.a0);
  if (!scaled.every(Number.isFinite)) throw new PlanError(`${path}.a0`, 'too small: dividing by it overflows');
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

function str(v: unknown, path: string, maxLength: number): string {
  if (v === undefined) throw new PlanError(path, 'is required');
  if (typeof v !== 'string') throw new PlanError(path, `must be a string, not ${describe(v)}`);
  if (v.length > maxLength) throw new PlanError(path, `must be at most ${maxLength} characters`);
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
