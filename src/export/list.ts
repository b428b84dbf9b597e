/**
 * The export list: one description of what a board gets, from which every format is written
 * (format.ts) and every check is made (quantized response, per-section report, overflow).
 *
 * Steps per output, in signal order (input chain first, as `coeffs` lists them):
 * 1. the designed sections at the profile's sample rate; a profile rate that differs from the
 *    plan's redesigns a copy of the plan at that rate (every band keeps its frequency, gain and Q);
 *    a band at or above the new Nyquist is refused with its field path;
 * 2. the section budget: an output with more sections than the board runs is refused, naming the
 *    output and by how many (nothing is dropped);
 * 3. gain: kept separate, or folded into the first section's b0 b1 b2 (a unity section carries
 *    it when the output has none);
 * 4. each coefficient c as written: a1, a2 negated when the board adds the feedback terms, times
 *    the pre-scaling power of two, then the number format (decimal digits, or Qm.n integers);
 * 5. back again, exactly: what the board computes (integer / 2^n / scale, sign undone), and the
 *    per-section report (largest coefficient error, pole radius, saturation, instability).
 *
 * The board's a0 is taken as exactly 1 (a written a0 only labels the list; when it saturates,
 * e.g. 1.0 in Q1.31, it is flagged like any coefficient). The separate gain is written in the same
 * number format without the pre-scaling (it is not a coefficient).
 */
import { poleRadius } from '../analysis/poles';
import { diagnostic, type Diagnostic } from '../diagnostics';
import { designPlan, outputGain, type SourcedSection } from '../design/chain';
import { scaleNumerator, type Section } from '../design/section';
import { exportNames } from '../plan/export-name';
import { readPlanValue } from '../plan/read';
import { LIMITS, type BoardProfile, type CoefficientName, type Plan } from '../plan/types';
import { planToJson } from '../plan/write';
import { BAND_TYPE_WORDS, EDGE_WORDS } from '../plan/words';
import { fixedRange, fromFixed, qName, roundHalfAwayFromZero, toFixed, toHex, type Saturation } from './fixed';
import { effectiveOrder } from './profiles';
import { suggestOrderAndScaling } from './overflow';

/** One number as the board gets it. */
export interface WrittenNumber {
  /** The number written: an integer for fixed point, the (rounded) decimal otherwise. */
  value: number;
  /** Its text in the text, CSV and JSON formats (hex for fixed point in hex notation). */
  text: string;
  saturation: Saturation;
}

export type SectionKey = 'b0' | 'b1' | 'b2' | 'a1' | 'a2';
export const SECTION_KEYS: readonly SectionKey[] = ['b0', 'b1', 'b2', 'a1', 'a2'];

export interface ExportSection {
  /** 1-based position in the output's list. */
  index: number;
  /** Where it comes from: `input/<band id>` or `<export name>/<band id | highPass | lowPass | gain>`. */
  from: string;
  /** What it is, spelled out (plan/words.ts): "peaking", "high-pass edge", "output gain". */
  what: string;
  /** The factor the suggested scaling put on b0 b1 b2 (1 when not rearranged). */
  scale: number;
  /** The exact design (file convention), gain folded in when the profile says so. */
  ideal: Section;
  /** The numbers written, in the profile's order. */
  written: { name: CoefficientName; number: WrittenNumber }[];
  /** What the board computes, back in the file convention (exact: integer / 2^n / scale). */
  quantized: Section;
  /** Coefficients that saturated (a0 included when written and saturated). */
  saturated: CoefficientName[];
  /** Largest |quantized - ideal| over b0 b1 b2 a1 a2, and which coefficient. */
  largestError: number;
  largestErrorCoefficient: SectionKey;
  poleRadiusIdeal: number;
  /** Largest pole radius of the quantized section; >= 1 is unstable. */
  poleRadius: number;
  stable: boolean;
}

export interface ExportOutput {
  /** The output's id in the plan. */
  id: string;
  /** What the export calls it (plan/export-name.ts): the list headers, CSV column, JSON id, C names. */
  exportName: string;
  name: string;
  mute: boolean;
  gain: {
    /** Linear, polarity included. */
    ideal: number;
    /** null when folded into the first section. */
    written: WrittenNumber | null;
    /** What the board applies after the cascade (1 when folded). */
    quantized: number;
  };
  delay: { ms: number; samples: number; text: string };
  sections: ExportSection[];
}

export interface ExportList {
  planName: string;
  profile: BoardProfile;
  /** The rate the list is designed for (the profile's, or the plan's). */
  sampleRate: number;
  planSampleRate: number;
  redesigned: boolean;
  /** Things the user should know that do not stop the export. */
  notes: ExportNote[];
  outputs: ExportOutput[];
}

export type ExportNote = Diagnostic<'export-redesigned' | 'export-raw-rate' | 'export-scaling-level' | 'export-scaling-short' | 'export-unstable' | 'export-saturated' | 'export-gain-saturated' | 'export-gain-scaling'>;

/** Why a list cannot be exported: too many sections, too long a delay, or the plan fails at the board's rate. */
export type ExportProblem = Diagnostic<'export-budget' | 'export-delay' | 'export-rate'>;

export type ExportResult = { ok: true; list: ExportList } | { ok: false; problems: ExportProblem[] };

/** The plan at the profile's rate: itself, or a redesigned copy; a band above the new Nyquist is refused. */
export function planAtProfileRate(plan: Plan, profile: BoardProfile): { ok: true; plan: Plan } | { ok: false; problem: ExportProblem } {
  const fs = profile.sampleRate ?? plan.sampleRate;
  if (fs === plan.sampleRate) return { ok: true, plan };
  const r = readPlanValue({ ...planToJson(plan), sampleRate: fs });
  if (!r.ok) {
    return { ok: false, problem: diagnostic('export-rate', 'error', r.error.diagnostic.target, { boardHz: fs, planHz: plan.sampleRate, refusal: r.error.diagnostic }) };
  }
  return { ok: true, plan: r.plan };
}

/** One output's use of the board's section budget. */
export interface BudgetUse {
  id: string;
  exportName: string;
  /** Sections the board runs for this output (input chain included; a folded gain on an output without sections adds its unity section). */
  used: number;
  allowed: number;
}

/** The sections an output sends to the board, from its designed count and the profile's gain rule. */
export function sectionsNeeded(designedCount: number, profile: BoardProfile): number {
  return profile.gain === 'first-section' && designedCount === 0 ? 1 : designedCount;
}

/**
 * Every output's section count against the profile's budget, as the export counts it (a redesign
 * at the board's rate keeps every band and edge, so the count is the plan's).
 */
export function budgetUse(plan: Plan, profile: BoardProfile): BudgetUse[] {
  const names = exportNames(plan.outputs);
  return designPlan(plan).map((d, i) => ({ id: d.id, exportName: names[i], used: sectionsNeeded(d.sections.length, profile), allowed: profile.sectionBudget }));
}

/** Builds the list for every output (or one). Never throws for a valid plan and profile. */
export interface ExportOptions {
  /**
   * "as-designed" (default): signal order, no scaling. "suggested": each output's sections in the
   * order and with the scaling of `suggestOrderAndScaling` (overflow.ts), applied to the exact
   * design before quantization; a separate gain takes back the level the scaling removed, so the
   * output's response is the plan's (only its internal nodes change). A folded gain cannot, and
   * the notes say by how much the output is lower.
   */
  arrangement?: 'as-designed' | 'suggested';
}

export function buildExportList(plan: Plan, profile: BoardProfile, outputId?: string, options: ExportOptions = {}): ExportResult {
  const at = planAtProfileRate(plan, profile);
  if (!at.ok) return { ok: false, problems: [at.problem] };
  const p = at.plan;
  const fs = p.sampleRate;
  const notes: ExportNote[] = [];
  const PLAN = { kind: 'plan' } as const;
  const redesigned = fs !== plan.sampleRate;
  if (redesigned) {
    notes.push(diagnostic('export-redesigned', 'info', PLAN, { boardHz: fs, planHz: plan.sampleRate }));
    const raws = [
      ...p.input.bands.filter((b) => b.type === 'raw').map((b) => `input/${b.id}`),
      ...p.outputs.flatMap((o) => o.bands.filter((b) => b.type === 'raw').map((b) => `${o.id}/${b.id}`)),
    ];
    if (raws.length > 0) notes.push(diagnostic('export-raw-rate', 'warning', PLAN, { bands: raws }));
  }
  const designed = designPlan(p);
  const names = exportNames(p.outputs);
  const problems: ExportProblem[] = [];
  const outputs: ExportOutput[] = [];
  p.outputs.forEach((o, i) => {
    if (outputId !== undefined && o.id !== outputId) return;
    const d = designed[i];
    const name = names[i];
    let sections: SourcedSection[] = d.sections;
    const gain = outputGain(o);
    if (profile.gain === 'first-section') {
      sections = sections.length === 0 ? [{ b0: gain, b1: 0, b2: 0, a1: 0, a2: 0, from: `${o.id}/gain` }] : sections.map((s, k) => (k === 0 ? scaleNumerator(s, gain) : s));
    }
    const needed = sectionsNeeded(d.sections.length, profile);
    if (needed > profile.sectionBudget) {
      problems.push(diagnostic('export-budget', 'error', { kind: 'output', outputId: o.id }, { outputId: o.id, exportName: name, sections: needed, budget: profile.sectionBudget }));
    }
    const delaySamples = Math.round((o.delayMs * fs) / 1000);
    if (profile.maxDelaySamples !== null && delaySamples > profile.maxDelaySamples) {
      problems.push(diagnostic('export-delay', 'error', { kind: 'field', path: `outputs[${i}].delayMs` }, { outputId: o.id, exportName: name, delaySamples, maxSamples: profile.maxDelaySamples }));
    }
    let outGain = gain;
    let scales: number[] = sections.map(() => 1);
    if (options.arrangement === 'suggested' && sections.length > 0) {
      const sug = suggestOrderAndScaling(sections, fs);
      scales = sug.scales;
      sections = sug.order.map((j, k) => ({ ...sug.sections[k], from: sections[j].from }));
      if (sug.levelChangeDb < 0) {
        if (profile.gain === 'separate') {
          // The make-up gain stays within the plan's output gain limit (less 0.01 dB for the
          // number format's rounding), so the list still imports as a plan; the rest is noted.
          const gainDb = 20 * Math.log10(Math.abs(gain));
          const makeUpDb = Math.min(-sug.levelChangeDb, LIMITS.outputGainDbAbsMax - 0.01 - gainDb);
          if (makeUpDb > 0) outGain = gain * Math.pow(10, makeUpDb / 20);
          const shortDb = -sug.levelChangeDb - Math.max(0, makeUpDb);
          if (shortDb > 0.005) {
            notes.push(diagnostic('export-scaling-short', 'info', { kind: 'output', outputId: o.id }, { levelDb: shortDb, gainLimitDb: LIMITS.outputGainDbAbsMax }));
          }
        } else notes.push(diagnostic('export-scaling-level', 'info', { kind: 'output', outputId: o.id }, { levelDb: -sug.levelChangeDb }));
      }
    }
    const what = sections.map((s) => sourceWords(p, o.id, s.from));
    sections = sections.map((s) => ({ ...s, from: exportFrom(s.from, o.id, name) }));
    const writtenGain = profile.gain === 'separate' ? writeNumber(outGain, profile) : null;
    outputs.push({
      id: o.id,
      exportName: name,
      name: o.name,
      mute: o.mute,
      gain: { ideal: outGain, written: writtenGain, quantized: writtenGain ? readBack(writtenGain, profile) : 1 },
      delay: { ms: o.delayMs, samples: delaySamples, text: profile.delayUnit === 'samples' ? String(delaySamples) : numText(o.delayMs) },
      sections: sections.map((s, k) => ({ ...exportSection(s, k + 1, profile), scale: scales[k], what: what[k] })),
    });
  });
  if (problems.length > 0) return { ok: false, problems };
  // Diagnostics name outputs and sources by plan id (each surface words them); the export's own
  // names are in the list itself.
  const unstable = outputs.flatMap((o) => o.sections.filter((s) => !s.stable).map((s) => ({ outputId: o.id, index: s.index, from: planFrom(s.from, o) })));
  if (unstable.length > 0) notes.push(diagnostic('export-unstable', 'danger', PLAN, { sections: unstable }));
  const saturated = outputs.flatMap((o) => o.sections.filter((s) => s.saturated.length > 0).map((s) => ({ outputId: o.id, index: s.index, names: [...s.saturated] })));
  if (saturated.length > 0) notes.push(diagnostic('export-saturated', 'warning', PLAN, { sections: saturated }));
  const gainSat = outputs.filter((o) => o.gain.written && o.gain.written.saturation !== 'none');
  if (gainSat.length > 0) notes.push(diagnostic('export-gain-saturated', 'warning', PLAN, { outputIds: gainSat.map((o) => o.id) }));
  for (const o of gainSat) {
    const note = gainScalingNote(o, profile);
    if (note) notes.push(note);
  }
  return { ok: true, list: { planName: plan.name, profile, sampleRate: fs, planSampleRate: plan.sampleRate, redesigned, notes, outputs } };
}

/**
 * What a board must do with a gain its number format cannot hold (Q1.31 tops out just below 1, so
 * even unity saturates): the smallest power of two 2^k that brings the gain into range, the value
 * to write, and the shift the board applies after the cascade. The list itself keeps the profile's
 * rule (the separate gain is never pre-scaled) and flags the saturation.
 */
export function gainScalingNote(o: ExportOutput, profile: BoardProfile): Diagnostic<'export-gain-scaling'> | null {
  const n = profile.number;
  const g = o.gain.ideal;
  if (n.kind !== 'fixed') return null;
  const { min, max } = fixedRange(n);
  let k = 0;
  while (k < 64 && (roundHalfAwayFromZero((g / 2 ** k) * 2 ** n.fractionBits) > max || roundHalfAwayFromZero((g / 2 ** k) * 2 ** n.fractionBits) < min)) k++;
  const written = writeNumber(g / 2 ** k, profile);
  return diagnostic('export-gain-scaling', 'warning', { kind: 'output', outputId: o.id }, {
    exportName: o.exportName,
    gain: numText(g),
    format: qName(n),
    scaledGain: numText(g / 2 ** k),
    scaledText: written.text,
    shiftBits: k,
    maxGain: numText(fromFixed(max, n)),
  });
}

/** A section's source path with the output's plan id replaced by its export name. */
function exportFrom(from: string, id: string, name: string): string {
  return from.startsWith(`${id}/`) ? `${name}/${from.slice(id.length + 1)}` : from;
}

/** A source path in export names back in plan ids, for the diagnostics. */
function planFrom(from: string, o: ExportOutput): string {
  return from.startsWith(`${o.exportName}/`) ? `${o.id}/${from.slice(o.exportName.length + 1)}` : from;
}

/** What a section's source is, in words: the band type, the edge, or the folded gain. */
function sourceWords(plan: Plan, outputId: string, from: string): string {
  const slash = from.indexOf('/');
  const chain = from.slice(0, slash);
  const part = from.slice(slash + 1);
  if (part === 'gain') return 'output gain';
  if (part === 'highPass' || part === 'lowPass') return EDGE_WORDS[part];
  const bands = chain === 'input' ? plan.input.bands : (plan.outputs.find((o) => o.id === outputId)?.bands ?? []);
  const band = bands.find((b) => b.id === part);
  return band ? BAND_TYPE_WORDS[band.type] : '';
}

/** Shortest round-trip decimal; -0 written as 0. */
export function numText(x: number): string {
  return Object.is(x, -0) ? '0' : String(x);
}

/** One value in the profile's number format (no pre-scaling or sign change here). */
export function writeNumber(x: number, profile: BoardProfile): WrittenNumber {
  const n = profile.number;
  if (n.kind === 'decimal') {
    const value = n.significantDigits === null ? x : Number(x.toPrecision(n.significantDigits));
    const v = Object.is(value, -0) ? 0 : value;
    return { value: v, text: numText(v), saturation: 'none' };
  }
  const q = toFixed(x, n);
  return { value: q.integer, text: n.notation === 'hex' ? toHex(q.integer, n.wordBits) : String(q.integer), saturation: q.saturation };
}

/** The value a written number stands for (before undoing pre-scaling and sign). */
export function readBack(w: WrittenNumber, profile: BoardProfile): number {
  return profile.number.kind === 'fixed' ? fromFixed(w.value, profile.number) : w.value;
}

/** The sign and scale a coefficient gets before it is written. */
export function writeFactor(name: CoefficientName, profile: BoardProfile): number {
  const sign = profile.feedbackSign === 'negated' && (name === 'a1' || name === 'a2') ? -1 : 1;
  return sign * profile.coefficientScale;
}

export function exportSection(s: SourcedSection, index: number, profile: BoardProfile): ExportSection {
  const ideal: Section = { b0: s.b0, b1: s.b1, b2: s.b2, a1: s.a1, a2: s.a2 };
  const written: ExportSection['written'] = [];
  const quantized: Section = { ...ideal };
  const saturated: CoefficientName[] = [];
  for (const name of effectiveOrder(profile)) {
    const f = writeFactor(name, profile);
    const c = name === 'a0' ? 1 : ideal[name];
    const number = writeNumber(c * f, profile);
    written.push({ name, number });
    if (number.saturation !== 'none') saturated.push(name);
    // Exact: the read-back value is k / 2^n (or a double), divided by a power of two and a sign.
    if (name !== 'a0') quantized[name] = readBack(number, profile) / f;
  }
  let largestError = -1;
  let largestErrorCoefficient: SectionKey = 'b0';
  for (const k of SECTION_KEYS) {
    const e = Math.abs(quantized[k] - ideal[k]);
    if (e > largestError) {
      largestError = e;
      largestErrorCoefficient = k;
    }
  }
  const r = poleRadius(quantized);
  return {
    index,
    from: s.from,
    what: '',
    scale: 1,
    ideal,
    written,
    quantized,
    saturated,
    largestError,
    largestErrorCoefficient,
    poleRadiusIdeal: poleRadius(ideal),
    poleRadius: r,
    stable: r < 1,
  };
}

/** The quantized sections of an output (what the board computes), in list order. */
export function quantizedSections(o: ExportOutput): Section[] {
  return o.sections.map((s) => s.quantized);
}

/** The ideal sections of an output (gain folded in when the profile folds it), in list order. */
export function idealSections(o: ExportOutput): Section[] {
  return o.sections.map((s) => s.ideal);
}
