/**
 * Import: a coefficient list in any export format and board profile back to sections, and from
 * there to raw bands, so a board's existing settings can be examined like any plan.
 *
 * Each number is undone as the export did it: hex words as two's complement of the word width,
 * integers divided by 2^n, then divided by the pre-scaling power of two, and a1, a2 negated back
 * when the profile negates feedback. Every step is exact, so a decimal export with the shortest
 * round-trip form (String(x)) reads back to the very same doubles.
 *
 * Accepted: the four export formats (the JSON carries its own profile), and plain pasted text:
 * one section per line, numbers separated by spaces, commas, semicolons or tabs, `#` and `//`
 * comments, optional `output ID`, `gain X` and `delay X [samples|ms]` lines.
 */
import type { Band, BoardProfile, CoefficientName, Plan, RawCoefficients } from '../plan/types';
import { LIMITS, PLAN_FORMAT, PLAN_VERSION } from '../plan/types';
import { diagnostic, DiagnosticError, targetPath, type DiagnosticTarget } from '../diagnostics';
import { parseJsonText, readBoardProfile, readPlanValue, PlanError } from '../plan/read';
import { shownToken } from '../plan/shown-text';
import { planToJson } from '../plan/write';
import { fixedRange, fromFixed, fromHex, qName } from './fixed';
import { writeFactor } from './list';
import { effectiveOrder } from './profiles';
import { COEFFICIENTS_FORMAT } from './format';

/** A section as a raw band holds it; a0 is 1 unless a decimal list wrote another (fixed-point boards take a0 as exactly 1). */
export interface ImportedSection extends RawCoefficients {
  /** Where the export said it came from, when it did. */
  from?: string;
  /** Where in the input it was read ("line 12"), for refusals of the plan it becomes. */
  where?: DiagnosticTarget;
}

export interface ImportedOutput {
  id: string;
  /** Where in the input the output, its gain and its delay were read. */
  where?: { output?: DiagnosticTarget; gain?: DiagnosticTarget; delay?: DiagnosticTarget };
  /** Linear, polarity included; null when the list has none (folded, or not given). */
  gain: number | null;
  delay: { value: number; unit: 'samples' | 'ms' } | null;
  sections: ImportedSection[];
}

export interface ImportedList {
  /** The profile the numbers were read with (a JSON export's own profile wins). */
  profile: BoardProfile;
  sampleRate: number | null;
  /** Where the sample rate was read (a comment line, a define, the JSON field). */
  sampleRateWhere?: DiagnosticTarget;
  outputs: ImportedOutput[];
  notes: string[];
}

/**
 * A coefficient list refused: where (a line, a row of an output, a field path of a JSON export,
 * or the whole text) and why. Not a `PlanError`: the list is not a plan, and its places are lines
 * and rows as well as field paths.
 */
export class ImportError extends DiagnosticError<'import-refused'> {
  constructor(
    readonly target: DiagnosticTarget,
    readonly reason: string,
  ) {
    super(diagnostic('import-refused', 'error', target, { reason }));
    this.name = 'ImportError';
  }

  /** "line 12", "outputs[0].sections[3]" or "" (the command line's words). */
  get where(): string {
    return targetPath(this.target);
  }
}

const WHOLE: DiagnosticTarget = { kind: 'plan' };
const field = (path: string): DiagnosticTarget => ({ kind: 'field', path });
const lineAt = (n: number, detail?: string): DiagnosticTarget => (detail === undefined ? { kind: 'line', line: n } : { kind: 'line', line: n, detail });

export type ImportResult = { ok: true; list: ImportedList } | { ok: false; error: ImportError };

export type ImportFormat = 'auto' | 'text' | 'csv' | 'json' | 'c';

/** Reads a coefficient list. Never throws. */
export function parseCoefficientList(text: string, profile: BoardProfile, format: ImportFormat = 'auto'): ImportResult {
  try {
    const f = format === 'auto' ? detectFormat(text) : format;
    const list = f === 'json' ? parseJson(text) : f === 'c' ? parseC(text, profile) : f === 'csv' ? parseCsv(text, profile) : parseText(text, profile);
    if (list.outputs.length === 0 || list.outputs.every((o) => o.sections.length === 0 && o.gain === null)) {
      throw new ImportError(WHOLE, 'no sections found');
    }
    return { ok: true, list };
  } catch (e) {
    if (e instanceof ImportError) return { ok: false, error: e };
    if (e instanceof PlanError) return { ok: false, error: new ImportError(e.path ? field(e.path) : WHOLE, e.reason) };
    throw e;
  }
}

export function detectFormat(text: string): Exclude<ImportFormat, 'auto'> {
  const t = text.trimStart();
  if (t.startsWith('{')) return 'json';
  if (/#ifndef|#define|static\s+const/.test(text)) return 'c';
  if (/^output,section,/.test(t)) return 'csv';
  return 'text';
}

// ---- numbers -----------------------------------------------------------------------------------

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

/** A written token to the value it stands for (integer / 2^n for fixed point), before undoing scale and sign. */
export function readToken(token: string, profile: BoardProfile, where: DiagnosticTarget): number {
  const t = token.trim();
  const n = profile.number;
  if (n.kind === 'decimal') {
    if (!DECIMAL.test(t)) throw new ImportError(where, `${shownToken(t)} is not a decimal number`);
    return Number(t);
  }
  let integer: number | null;
  // In a hex profile every unsigned word is hex, with or without 0x.
  if (/^[+-]?0x/i.test(t) || (n.notation === 'hex' && /^[0-9a-f]+$/i.test(t))) {
    if (t.startsWith('-')) throw new ImportError(where, `${shownToken(t)}: hex words are two's complement, not signed`);
    integer = fromHex(t, n.wordBits);
    if (integer === null) throw new ImportError(where, `${shownToken(t)} is not a ${n.wordBits}-bit hex word`);
  } else if (/^[+-]?\d+$/.test(t)) {
    integer = Number(t);
  } else {
    throw new ImportError(where, `${shownToken(t)} is not an integer of ${qName(n)}`);
  }
  const { min, max } = fixedRange(n);
  if (integer < min || integer > max) throw new ImportError(where, `${t} is outside ${qName(n)} (${min} .. ${max})`);
  return fromFixed(integer, n);
}

function toSection(values: number[], names: CoefficientName[], profile: BoardProfile, where: DiagnosticTarget, from?: string): ImportedSection {
  if (values.length !== names.length) {
    throw new ImportError(where, `expected ${names.length} numbers (${names.join(' ')}), found ${values.length}`);
  }
  const s: ImportedSection = { b0: 0, b1: 0, b2: 0, a0: 1, a1: 0, a2: 0 };
  names.forEach((name, i) => {
    s[name] = values[i] / writeFactor(name, profile);
  });
  // Fixed-point boards take a0 as exactly 1 (it may even saturate, as 1.0 does in Q1.31).
  if (profile.number.kind === 'fixed') s.a0 = 1;
  if (s.a0 === 0) throw new ImportError(where, 'a0 is 0');
  if (from !== undefined) s.from = from;
  s.where = where;
  return s;
}

function readGain(token: string, profile: BoardProfile, where: DiagnosticTarget): number {
  // The gain is written in the number format but never pre-scaled or negated.
  return readToken(token, profile, where);
}

// ---- text ----------------------------------------------------------------------------------------

function parseText(text: string, profile: BoardProfile): ImportedList {
  const names = effectiveOrder(profile);
  const outputs: ImportedOutput[] = [];
  let current: ImportedOutput | null = null;
  const ensure = (): ImportedOutput => {
    if (!current) {
      current = { id: `out${outputs.length + 1}`, gain: null, delay: null, sections: [] };
      outputs.push(current);
    }
    return current;
  };
  let sampleRate = profile.sampleRate;
  let sampleRateWhere: DiagnosticTarget | undefined;
  text.split(/\r?\n/).forEach((raw, i) => {
    const where = lineAt(i + 1);
    // Our text export states its rate in a comment: "# Sample rate: 48000 Hz".
    const rate = /^\s*#\s*Sample rate:\s*(\d+(?:\.\d+)?(?:e[+-]?\d+)?)\s*Hz/i.exec(raw);
    if (rate) {
      sampleRate = Number(rate[1]);
      sampleRateWhere = where;
    }
    const hash = raw.indexOf('#');
    let comment = hash >= 0 ? raw.slice(hash + 1).trim() : '';
    let line = hash >= 0 ? raw.slice(0, hash) : raw;
    const slashes = line.indexOf('//');
    if (slashes >= 0) {
      comment = line.slice(slashes + 2).trim();
      line = line.slice(0, slashes);
    }
    line = line.trim();
    if (line === '') return;
    let m = /^output\s+(\S+)$/i.exec(line);
    if (m) {
      current = { id: m[1], gain: null, delay: null, sections: [], where: { output: where } };
      outputs.push(current);
      return;
    }
    m = /^gain\s*[:=]?\s*(\S+)$/i.exec(line);
    if (m) {
      const o = ensure();
      o.gain = readGain(m[1], profile, where);
      o.where = { ...o.where, gain: where };
      return;
    }
    m = /^delay\s*[:=]?\s*(\S+)(?:\s+(samples|ms))?$/i.exec(line);
    if (m) {
      const o = ensure();
      o.delay = { value: readDelay(m[1], where), unit: (m[2]?.toLowerCase() as 'samples' | 'ms' | undefined) ?? profile.delayUnit };
      o.where = { ...o.where, delay: where };
      return;
    }
    const tokens = line.split(/[\s,;]+/).filter((t) => t !== '');
    const values = tokens.map((t) => readToken(t, profile, where));
    // "# 3 input/b1" after a section: the export's index and origin.
    const from = /^\d+\s+(\S+)/.exec(comment)?.[1];
    ensure().sections.push(toSection(values, names, profile, where, from));
  });
  return { profile, sampleRate, sampleRateWhere, outputs, notes: [] };
}

/** A delay as written: a plain decimal number >= 0. */
function readDelay(token: string, where: DiagnosticTarget): number {
  const t = token.trim();
  const value = Number(t);
  if (!DECIMAL.test(t) || !Number.isFinite(value) || value < 0) throw new ImportError(where, `delay ${shownToken(t)} is not a number >= 0`);
  return value;
}

// ---- CSV -----------------------------------------------------------------------------------------

function splitCsvLine(line: string): string[] {
  const cells: string[] = [];
  let cell = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (c === '"') quoted = false;
      else cell += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      cells.push(cell);
      cell = '';
    } else cell += c;
  }
  cells.push(cell);
  return cells;
}

function parseCsv(text: string, profile: BoardProfile): ImportedList {
  const lines = text
    .split(/\r?\n/)
    .map((line, i) => ({ line, lineNo: i + 1, where: lineAt(i + 1) }))
    .filter((l) => l.line.trim() !== '');
  if (lines.length === 0) throw new ImportError(WHOLE, 'the CSV is empty (no header line)');
  const header = splitCsvLine(lines[0].line).map((h) => h.trim());
  const col = (name: string) => header.indexOf(name);
  const names = effectiveOrder(profile);
  for (const n of names) if (col(n) < 0) throw new ImportError(lines[0].where, `the header has no "${n}" column (the profile's order is ${names.join(' ')})`);
  const outputs = new Map<string, ImportedOutput>();
  if (col('output') < 0) throw new ImportError(lines[0].where, 'the header has no "output" column');
  lines.slice(1).forEach(({ line, lineNo, where }) => {
    const cells = splitCsvLine(line);
    const id = cells[col('output')];
    if (!id) throw new ImportError(where, 'no output id');
    let out = outputs.get(id);
    if (!out) {
      out = { id, gain: null, delay: null, sections: [], where: { output: where } };
      outputs.set(id, out);
    }
    if (col('gain') >= 0 && cells[col('gain')]) {
      out.gain = readGain(cells[col('gain')], profile, where);
      out.where = { ...out.where, gain: where };
    }
    for (const unit of ['samples', 'ms'] as const) {
      const c = col(unit === 'samples' ? 'delaySamples' : 'delayMs');
      if (c >= 0 && cells[c]) {
        out.delay = { value: readDelay(cells[c], lineAt(lineNo, unit === 'samples' ? 'delaySamples' : 'delayMs')), unit };
        out.where = { ...out.where, delay: where };
      }
    }
    if (cells[col('section')] === '0') return;
    const values = names.map((n) => readToken(cells[col(n)] ?? '', profile, lineAt(lineNo, n)));
    out.sections.push(toSection(values, names, profile, where, col('from') >= 0 ? cells[col('from')] : undefined));
  });
  return { profile, sampleRate: profile.sampleRate, outputs: [...outputs.values()], notes: [] };
}

// ---- JSON ----------------------------------------------------------------------------------------

function parseJson(text: string): ImportedList {
  const parsed = parseJsonText(text);
  if (!parsed.ok) throw parsed.error; // a PlanError: parseCoefficientList reports it with its path
  const d = parsed.value as Record<string, unknown>;
  if (typeof d !== 'object' || d === null || d.format !== COEFFICIENTS_FORMAT) {
    throw new ImportError(field('format'), `must be "${COEFFICIENTS_FORMAT}" (a Biquadrant coefficient export)`);
  }
  const profile = readBoardProfile(d.profile, 'profile');
  const names = effectiveOrder(profile);
  if (!Array.isArray(d.outputs)) throw new ImportError(field('outputs'), 'must be a list');
  const tokenOf = (v: unknown, where: DiagnosticTarget): string => {
    if (typeof v === 'number' && Number.isFinite(v)) return String(v);
    if (typeof v === 'string') return v;
    throw new ImportError(where, 'must be a number or a hex string');
  };
  const outputs = d.outputs.map((o: Record<string, unknown>, i: number): ImportedOutput => {
    const path = `outputs[${i}]`;
    if (typeof o?.id !== 'string') throw new ImportError(field(`${path}.id`), 'must be a string');
    if (!Array.isArray(o.sections)) throw new ImportError(field(`${path}.sections`), 'must be a list');
    const sections = o.sections.map((s: Record<string, unknown>, k: number) => {
      const at = `${path}.sections[${k}]`;
      const where = field(at);
      if (!Array.isArray(s?.coefficients)) throw new ImportError(field(`${at}.coefficients`), 'must be a list');
      const values = s.coefficients.map((v: unknown, j: number) => readToken(tokenOf(v, field(`${at}.coefficients[${j}]`)), profile, field(`${at}.coefficients[${j}]`)));
      return toSection(values, names, profile, where, typeof s.from === 'string' ? s.from : undefined);
    });
    const gain = o.gain === null || o.gain === undefined ? null : readGain(tokenOf(o.gain, field(`${path}.gain`)), profile, field(`${path}.gain`));
    if (o.delay !== undefined && o.delay !== null && !(typeof o.delay === 'number' && o.delay >= 0)) throw new ImportError(field(`${path}.delay`), 'must be a number >= 0');
    const delay = typeof o.delay === 'number' ? { value: o.delay, unit: profile.delayUnit } : null;
    return { id: o.id, gain, delay, sections, where: { output: field(`${path}.id`), gain: field(`${path}.gain`), delay: field(`${path}.delay`) } };
  });
  const sampleRate = typeof d.sampleRate === 'number' ? d.sampleRate : profile.sampleRate;
  return { profile, sampleRate, sampleRateWhere: field('sampleRate'), outputs, notes: [] };
}

// ---- C header ------------------------------------------------------------------------------------

function cTokens(body: string): string[] {
  // The most negative integer is written (-2147483647 - 1): fold it back to one token.
  const folded = body.replace(/\(\s*-(\d+)\s*-\s*1\s*\)/g, (_, d: string) => String(-Number(d) - 1));
  return folded
    .split(/[\s,]+/)
    .map((t) => t.replace(/[uUlL]+$/, ''))
    .filter((t) => t !== '');
}

function parseC(text: string, profile: BoardProfile): ImportedList {
  const names = effectiveOrder(profile);
  const parts = text.split(/\/\*\s*output\s+(\S+)\s*\*\//);
  if (parts.length < 3) throw new ImportError(WHOLE, 'no "/* output ID */" blocks found (is this a Biquadrant C header?)');
  const outputs: ImportedOutput[] = [];
  const rate = /#define\s+BQ_SAMPLE_RATE\s+(\d+(?:\.\d+)?)/.exec(parts[0]);
  for (let i = 1; i < parts.length; i += 2) {
    const id = parts[i];
    const chunk = parts[i + 1];
    const out: ImportedOutput = { id, gain: null, delay: null, sections: [], where: { output: { kind: 'output', outputId: id }, gain: { kind: 'row', outputId: id, row: 'gain' }, delay: { kind: 'output', outputId: id, detail: 'delay' } } };
    const gain = /_gain\s*=\s*([^;]+);/.exec(chunk);
    if (gain) out.gain = readGain(cTokens(gain[1])[0] ?? '', profile, { kind: 'row', outputId: id, row: 'gain' });
    const delay = /_DELAY_(SAMPLES|MS)\s+(\S+)/.exec(chunk);
    if (delay) out.delay = { value: readDelay(delay[2], { kind: 'output', outputId: id, detail: 'delay' }), unit: delay[1] === 'MS' ? 'ms' : 'samples' };
    const sos = /_sos\s*\[[^\]]*\]\s*\[[^\]]*\]\s*=\s*\{([\s\S]*?)\};/.exec(chunk);
    if (sos) {
      const rowRe = /\{([^{}]*)\}\s*,?\s*(?:\/\*\s*\d+\s+(\S+).*?\*\/)?/g;
      let m: RegExpExecArray | null;
      let k = 0;
      while ((m = rowRe.exec(sos[1])) !== null) {
        const where: DiagnosticTarget = { kind: 'row', outputId: id, row: ++k };
        const values = cTokens(m[1]).map((t) => readToken(t, profile, where));
        out.sections.push(toSection(values, names, profile, where, m[2]));
      }
    }
    outputs.push(out);
  }
  return { profile, sampleRate: rate ? Number(rate[1]) : profile.sampleRate, sampleRateWhere: field('BQ_SAMPLE_RATE'), outputs, notes: [] };
}

// ---- to bands and plans --------------------------------------------------------------------------

/** Imported sections as raw bands with ids `<prefix>1`, `<prefix>2`, ... */
export function sectionsToRawBands(sections: readonly ImportedSection[], prefix = 'r'): Band[] {
  return sections.map((s, i) => ({
    id: `${prefix}${i + 1}`,
    type: 'raw',
    frequency: 1000,
    enabled: true,
    coefficients: { b0: s.b0, b1: s.b1, b2: s.b2, a0: s.a0, a1: s.a1, a2: s.a2 },
  }));
}

function safeId(id: string, i: number): string {
  const s = id.toLowerCase().replace(/[^a-z0-9_-]/g, '_').slice(0, 32);
  return s === '' ? `out${i + 1}` : s;
}

/**
 * A plan that holds an imported list: one output per imported output, its sections as raw bands,
 * its gain as gainDb and polarity, its delay in ms. The plan is read back with the plan reader
 * before it is returned, so `import` never writes a plan that Biquadrant then refuses; a refusal
 * (ImportError) names where in the input the refused value was read ("line 12: ...").
 * `where` names the places outside the input: the --name and --sample-rate options.
 */
export function importedPlan(
  list: ImportedList,
  name: string,
  fallbackSampleRate: number,
  where: { name?: string; sampleRate?: string } = {},
): Plan {
  const fs = list.sampleRate ?? fallbackSampleRate;
  if (list.outputs.length > LIMITS.outputsMax) throw new ImportError(WHOLE, `${list.outputs.length} outputs, more than a plan's ${LIMITS.outputsMax}`);
  const outputs = list.outputs.map((o, i) => {
    if (o.sections.length > LIMITS.pathSectionsMax) {
      throw new ImportError(o.where?.output ?? { kind: 'output', outputId: o.id }, `${o.sections.length} sections, more than the ${LIMITS.pathSectionsMax} an output's signal path holds`);
    }
    const g = o.gain ?? 1;
    if (g === 0) throw new ImportError(o.where?.gain ?? { kind: 'output', outputId: o.id, detail: 'gain' }, 'a gain of 0 cannot be a plan gain in dB');
    const gainDb = 20 * Math.log10(Math.abs(g));
    const delayMs = o.delay === null ? 0 : o.delay.unit === 'ms' ? o.delay.value : (o.delay.value * 1000) / fs;
    return {
      id: safeId(o.id, i),
      name: o.id,
      gainDb,
      delayMs,
      invert: g < 0,
      mute: false,
      highPass: null,
      lowPass: null,
      bands: sectionsToRawBands(o.sections),
    };
  });
  const plan: Plan = { format: PLAN_FORMAT, version: PLAN_VERSION, name, sampleRate: fs, input: { bands: [] }, outputs, profile: list.profile };
  const back = readPlanValue(planToJson(plan));
  if (!back.ok) throw new ImportError(importPlace(back.error.path, list, where), back.error.reason);
  return back.plan;
}

/** Where in the input (or which option) a field of the imported plan came from. */
function importPlace(path: string, list: ImportedList, where: { name?: string; sampleRate?: string }): DiagnosticTarget {
  if (path === 'name') return field(where.name ?? 'name');
  if (path === 'sampleRate') return list.sampleRate !== null ? (list.sampleRateWhere ?? field('sample rate')) : field(where.sampleRate ?? 'sample rate');
  const m = /^outputs\[(\d+)\](?:\.(\w+))?(?:\[(\d+)\])?/.exec(path);
  if (!m) return field(path);
  const o = list.outputs[Number(m[1])];
  if (!o) return field(path);
  if (m[2] === 'bands' && m[3] !== undefined) return o.sections[Number(m[3])]?.where ?? field(path);
  if (m[2] === 'gainDb' || m[2] === 'invert') return o.where?.gain ?? { kind: 'output', outputId: o.id, detail: 'gain' };
  if (m[2] === 'delayMs') return o.where?.delay ?? { kind: 'output', outputId: o.id, detail: 'delay' };
  return o.where?.output ?? { kind: 'output', outputId: o.id };
}
