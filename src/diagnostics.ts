/**
 * One shape for everything the core has to tell a user: a warning of `check`, a refused field of
 * a plan, a refused line of an imported list, a refused edit, a note of an export.
 *
 * The core never passes a finished English sentence to another layer. It passes a `Diagnostic`:
 * what happened (`code`), how bad it is (`severity`), where (`target`: an output, a band, an
 * edge, a field path or a line) and the numbers involved (`values`). Each surface renders it in
 * its own words: the command line with ids and field paths (`diagnosticMessage`, below, whose
 * text the CLI's tests fix), the app with output names and band numbers
 * (`renderer/src/lib/diagnostics.ts`).
 *
 * A new kind of diagnostic adds its code and values to `DiagnosticValues`; both renderers are
 * `Record`s over the codes, so the compiler names every place that must learn the new code.
 */
import { dbText, formatFrequency, peakPlaceText } from './format';

/** A crossover edge of an output (as `EdgeKind` in plan/types; not imported, so the reader can import this file). */
type EdgeKind = 'highPass' | 'lowPass';

export type Severity = 'info' | 'warning' | 'danger' | 'error';

/** "input" or an output id. */
export type ChainId = string;

export type DiagnosticTarget =
  /** The whole document or plan. */
  | { kind: 'plan' }
  /** An output; `detail` names a part of it ("gain"). */
  | { kind: 'output'; outputId: string; detail?: string }
  | { kind: 'edge'; outputId: string; edge: EdgeKind }
  | { kind: 'band'; chain: ChainId; bandId: string }
  /** A field of a plan, profile or JSON file by its path in the file: `outputs[1].bands[0].q`. */
  | { kind: 'field'; path: string }
  /** A line (1-based) of an imported text, with the column or coefficient when known. */
  | { kind: 'line'; line: number; detail?: string }
  /** A row of an output's block (or its gain line) in an imported C header. */
  | { kind: 'row'; outputId: string; row: number | 'gain' };

/** A frequency that keeps a new sample rate from being taken, and what it belongs to. */
export interface RateMisfit {
  target: Extract<DiagnosticTarget, { kind: 'band' } | { kind: 'edge' }>;
  frequencyHz: number;
}

/** The values each code carries. */
export interface DiagnosticValues {
  // the warnings of `check` (src/analysis/check.ts)
  unstable: { radius: number; hasRawBands: boolean };
  'marginal-stability': { radius: number };
  headroom: { peakDb: number; frequencyHz: number; outsideAudioBand: boolean };
  'shelf-overshoot': { slope: number; monotonicSlope: number };
  'near-nyquist': { frequencyHz: number; nyquistHz: number; fraction: number };
  'no-high-pass': Record<string, never>;
  /** Largest digital-minus-analog magnitude (dB) over 20 Hz .. topHz, where it occurs, and whether the band is already matched. */
  cramping: { deviationDb: number; frequencyHz: number; thresholdDb: number; topHz: number; matched: boolean };
  /** A band or edge the board's number format holds coarsely (src/export/sensitivity.ts), and the form it should run in. */
  'coefficient-sensitivity': { form: 'error-feedback' | 'double-precision'; frequencyErrorPercent: number; largestErrorDb: number; poleRadius: number; profileName: string };
  // refusals of the plan reader (src/plan/read.ts) and of the coefficient import (src/export/import.ts)
  'plan-field': { reason: string };
  'import-refused': { reason: string };
  // refusals of an edit (src/ui/edits.ts)
  'edit-refused': { reason: string };
  'no-such-band': { bandId: string };
  'no-such-output': { outputId: string };
  'rate-range': { minHz: number; maxHz: number };
  'rate-misfit': { sampleRateHz: number; nyquistHz: number; misfits: RateMisfit[] };
  // notes of an export list (src/export/list.ts); `from` is the designed section's source ("woofer/b2")
  'export-redesigned': { boardHz: number; planHz: number };
  'export-raw-rate': { bands: string[] };
  'export-scaling-level': { levelDb: number };
  'export-scaling-short': { levelDb: number; gainLimitDb: number };
  'export-unstable': { sections: { outputId: string; index: number; from: string }[] };
  'export-saturated': { sections: { outputId: string; index: number; names: string[] }[] };
  'export-gain-saturated': { outputIds: string[] };
  // refusals of an export list
  'export-budget': { outputId: string; exportName: string; sections: number; budget: number };
  'export-delay': { outputId: string; exportName: string; delaySamples: number; maxSamples: number };
  'export-rate': { boardHz: number; planHz: number; refusal: Diagnostic<'plan-field'> };
  /** A separate gain the number format cannot hold: write `scaledGain` and multiply by 2^shiftBits after the cascade. */
  'export-gain-scaling': { exportName: string; gain: string; format: string; scaledGain: string; scaledText: string; shiftBits: number; maxGain: string };
}

export type DiagnosticCode = keyof DiagnosticValues;

export type Diagnostic<C extends DiagnosticCode = DiagnosticCode> = {
  [K in C]: { code: K; severity: Severity; target: DiagnosticTarget; values: DiagnosticValues[K] };
}[C];

export function diagnostic<C extends DiagnosticCode>(code: C, severity: Severity, target: DiagnosticTarget, values: DiagnosticValues[C]): Diagnostic<C> {
  return { code, severity, target, values } as Diagnostic<C>;
}

/**
 * The target as ids and paths, as the command line and the `check --format json` output write
 * it: "input/b3", "woofer", "outputs[0].q", "line 12"; "" for the whole plan.
 */
export function targetPath(t: DiagnosticTarget): string {
  switch (t.kind) {
    case 'plan':
      return '';
    case 'output':
      return t.detail ? `${t.outputId} ${t.detail}` : t.outputId;
    case 'edge':
      return t.outputId;
    case 'band':
      return `${t.chain}/${t.bandId}`;
    case 'field':
      return t.path;
    case 'line':
      return t.detail ? `line ${t.line}, ${t.detail}` : `line ${t.line}`;
    case 'row':
      return t.row === 'gain' ? `output ${t.outputId} gain` : `output ${t.outputId} row ${t.row}`;
  }
}

const fmtHz = formatFrequency;

/** The words of a coefficient-sensitivity finding, the same on every surface. */
export function sensitivityText(v: DiagnosticValues['coefficient-sensitivity']): string {
  const figures = `in "${v.profileName}" its pole frequency moves ${v.frequencyErrorPercent >= 0 ? '+' : ''}${v.frequencyErrorPercent.toFixed(2)}% and its magnitude up to ${v.largestErrorDb.toFixed(2)} dB (poles at radius ${v.poleRadius.toFixed(6)})`;
  return v.form === 'double-precision'
    ? `${figures}: run this section with double-precision coefficients (two words each) or in a low-sensitivity form`
    : `${figures}: run this section with error feedback (noise shaping), its rounding noise grows as its poles near the unit circle`;
}

/** The command line's words for each code: ids and field paths. */
const MESSAGES: { [C in DiagnosticCode]: (d: Diagnostic<C>) => string } = {
  unstable: (d) =>
    `output ${targetPath(d.target)} is unstable: a pole lies at radius ${Number.isFinite(d.values.radius) ? d.values.radius.toFixed(6) : 'that cannot be computed'} (>= 1)${d.values.hasRawBands ? '; check its raw bands' : '; check its shelf slopes and Q values'}`,
  'marginal-stability': (d) => `output ${targetPath(d.target)} has a pole at radius ${d.values.radius.toFixed(7)}: fixed-point coefficients may make it unstable`,
  headroom: (d) =>
    `output ${targetPath(d.target)} boosts ${dbText(d.values.peakDb)} at ${peakPlaceText(d.values)}: a full-scale input clips; lower the input level or the gain by that much`,
  'shelf-overshoot': (d) =>
    `band ${d.target.kind === 'band' ? d.target.bandId : targetPath(d.target)} has shelf slope S ${d.values.slope}: above S = ${d.values.monotonicSlope} a shelf overshoots its gain (Audio EQ Cookbook); check its peak in the headroom`,
  'near-nyquist': (d) =>
    d.target.kind === 'band'
      ? `band ${d.target.bandId} at ${fmtHz(d.values.frequencyHz)} is within ${Math.round((1 - d.values.fraction) * 100)}% of Nyquist (${fmtHz(d.values.nyquistHz)}): its shape is cramped by the bilinear transform`
      : `output ${targetPath(d.target)}: an edge at ${fmtHz(d.values.frequencyHz)} is close to Nyquist (${fmtHz(d.values.nyquistHz)})`,
  'no-high-pass': (d) =>
    `output ${targetPath(d.target)} looks like a high-frequency way but has no high-pass edge or high-pass band: low frequencies can destroy its driver`,
  cramping: (d) =>
    `${d.target.kind === 'band' ? `band ${d.target.bandId}` : `output ${targetPath(d.target)}`} departs from its analog prototype by ${dbText(d.values.deviationDb)} at ${fmtHz(d.values.frequencyHz)} (more than ${d.values.thresholdDb} dB over 20 Hz - ${fmtHz(d.values.topHz)})${d.values.matched || d.target.kind === 'edge' ? '' : '; a matched design ("design": "matched") follows the analog shape'}`,
  'coefficient-sensitivity': (d) => `${d.target.kind === 'band' ? `band ${d.target.bandId}` : `output ${targetPath(d.target)}`}: ${sensitivityText(d.values)}`,
  'plan-field': (d) => prefixed(d.target, d.values.reason),
  'import-refused': (d) => prefixed(d.target, d.values.reason),
  'edit-refused': (d) => d.values.reason,
  'no-such-band': (d) => `no band ${d.values.bandId}`,
  'no-such-output': (d) => `no output ${d.values.outputId}`,
  'rate-range': (d) => `sample rate must be ${d.values.minHz} to ${d.values.maxHz} Hz`,
  'export-redesigned': (d) => `redesigned at the board's ${d.values.boardHz} Hz (the plan is at ${d.values.planHz} Hz): every band keeps its frequency, gain and Q`,
  'export-raw-rate': (d) => `raw bands keep their coefficients, so their response moves with the rate: ${d.values.bands.join(', ')}`,
  'export-scaling-level': (d) =>
    `output "${targetPath(d.target)}": the suggested scaling leaves the output ${d.values.levelDb.toFixed(2)} dB below the design (the gain is folded, so it cannot take it back)`,
  'export-scaling-short': (d) =>
    `output "${targetPath(d.target)}": the suggested scaling leaves the output ${d.values.levelDb.toFixed(2)} dB below the design (its gain would pass the plan's ${d.values.gainLimitDb} dB limit)`,
  'export-unstable': (d) => `UNSTABLE after quantization: ${d.values.sections.map((s) => `${s.outputId} section ${s.index} (${s.from})`).join(', ')}`,
  'export-saturated': (d) => `saturated coefficients: ${d.values.sections.map((s) => `${s.outputId} section ${s.index} (${s.names.join(', ')})`).join('; ')}`,
  'export-gain-saturated': (d) => `output gain saturated: ${d.values.outputIds.join(', ')}`,
  'export-budget': (d) => {
    const extra = d.values.sections - d.values.budget;
    return `output "${d.values.exportName}" needs ${d.values.sections} sections, ${extra} more than the board's ${d.values.budget}: remove or merge ${extra} band(s) or crossover section(s)`;
  },
  'export-delay': (d) =>
    `output "${d.values.exportName}" delays ${d.values.delaySamples} samples, ${d.values.delaySamples - d.values.maxSamples} more than the board's ${d.values.maxSamples}`,
  'export-rate': (d) =>
    `the board runs at ${d.values.boardHz} Hz, the plan at ${d.values.planHz} Hz; redesigning at ${d.values.boardHz} Hz fails: ${diagnosticMessage(d.values.refusal)}`,
  'export-gain-scaling': (d) => `output "${d.values.exportName}": ${gainScalingText(d.values)}`,
  'rate-misfit': (d) => {
    const { misfits } = d.values;
    const more = misfits.length > 3 ? ` and ${misfits.length - 3} more` : '';
    const named = misfits.slice(0, 3).map((m) => `${misfitPath(m.target)} at ${fmtHz(m.frequencyHz)}`);
    return `${fmtHz(d.values.sampleRateHz)} refused: Nyquist would be ${fmtHz(d.values.nyquistHz)}, below ${named.join(', ')}${more}. Lower those first.`;
  },
};

function prefixed(t: DiagnosticTarget, reason: string): string {
  const where = targetPath(t);
  return where ? `${where}: ${reason}` : reason;
}

function misfitPath(t: RateMisfit['target']): string {
  return t.kind === 'band' ? `${t.chain === 'input' ? 'input chain' : t.chain} band ${t.bandId}` : `${t.outputId} ${t.edge === 'highPass' ? 'high-pass' : 'low-pass'}`;
}

/** The diagnostic in the command line's words (ids and field paths). */
export function diagnosticMessage(d: Diagnostic): string {
  return (MESSAGES[d.code] as (d: Diagnostic) => string)(d);
}

/**
 * An error that carries a diagnostic: thrown inside a reader, caught at its edge and returned as
 * a result. `message` is the command line's text (`diagnosticMessage`).
 */
export abstract class DiagnosticError<C extends DiagnosticCode = DiagnosticCode> extends Error {
  constructor(readonly diagnostic: Diagnostic<C>) {
    super(diagnosticMessage(diagnostic as Diagnostic));
  }
}

/** The advice for a separate gain the number format cannot hold, after the output's name. */
export function gainScalingText(v: DiagnosticValues['export-gain-scaling']): string {
  const k = v.shiftBits;
  return `its gain ${v.gain} does not fit ${v.format}; write ${v.scaledGain} (${v.scaledText}) and have the board multiply by ${2 ** k} (shift left by ${k} bit${k === 1 ? '' : 's'}) after the cascade, or lower the output gain below ${v.maxGain}`;
}
