/**
 * The app's words for the core's diagnostics (src/diagnostics.ts): outputs by their names, bands
 * by their number in the chain's list, fields by their own name, the way the editors show them.
 * The command line words the same diagnostics with ids and field paths; nothing here reads a
 * sentence back.
 */
import { gainScalingText, sensitivityText, type Diagnostic, type DiagnosticCode, type DiagnosticTarget, type RateMisfit } from '$core/diagnostics';
import type { Plan } from '$core/plan/types';
import { formatFrequency as fmtHz } from '$core/ui/units';
import { dbText, peakPlaceText } from '$core/format';

function outputName(plan: Plan, id: string): string {
  return plan.outputs.find((o) => o.id === id)?.name ?? id;
}

/** "Input chain, band 3", "Tweeter, band 1"; the id when the band is gone. */
function bandName(plan: Plan, chain: string, bandId: string, joiner = ', '): string {
  const bands = chain === 'input' ? plan.input.bands : (plan.outputs.find((o) => o.id === chain)?.bands ?? []);
  const chainName = chain === 'input' ? 'Input chain' : outputName(plan, chain);
  const i = bands.findIndex((b) => b.id === bandId);
  return `${chainName}${joiner}band ${i >= 0 ? i + 1 : bandId}`;
}

const EDGE_NAME = { highPass: 'high-pass edge', lowPass: 'low-pass edge' } as const;

/** A field path as the field's own name: `outputs[0].bands[11].coefficients.a0` -> `a0`. */
export function fieldName(path: string): string {
  return path.replace(/\[\d+\]$/, '').split('.').pop() || path;
}

/** Where, as the user sees it. */
export function targetText(plan: Plan, t: DiagnosticTarget): string {
  switch (t.kind) {
    case 'plan':
      return '';
    case 'output':
      return t.detail ? `${outputName(plan, t.outputId)} ${t.detail}` : outputName(plan, t.outputId);
    case 'edge':
      return `${outputName(plan, t.outputId)} ${EDGE_NAME[t.edge]}`;
    case 'band':
      return bandName(plan, t.chain, t.bandId);
    case 'field':
      return fieldName(t.path);
    case 'line':
      return t.detail ? `Line ${t.line}, ${t.detail}` : `Line ${t.line}`;
    case 'row':
      return t.row === 'gain' ? `Output ${t.outputId}, gain` : `Output ${t.outputId}, row ${t.row}`;
  }
}

/** "input chain band 3 at 21 kHz", "Tweeter band 2 at 20 kHz", "Tweeter high-pass at 30 kHz". */
function misfitText(plan: Plan, m: RateMisfit): string {
  const t = m.target;
  const what = t.kind === 'edge' ? `${outputName(plan, t.outputId)} ${t.edge === 'highPass' ? 'high-pass' : 'low-pass'}` : bandName(plan, t.chain, t.bandId, ' ').replace(/^Input chain/, 'input chain');
  return `${what} at ${fmtHz(m.frequencyHz)}`;
}

function withPlace(plan: Plan, t: DiagnosticTarget, reason: string): string {
  const where = targetText(plan, t);
  return where ? `${where}: ${reason}` : reason;
}

const TEXT: { [C in DiagnosticCode]: (plan: Plan, d: Diagnostic<C>) => string } = {
  unstable: (plan, d) =>
    `${targetText(plan, d.target)} is unstable: a pole lies at radius ${Number.isFinite(d.values.radius) ? d.values.radius.toFixed(6) : 'that cannot be computed'} (>= 1)${d.values.hasRawBands ? '; check its raw bands' : '; check its shelf slopes and Q values'}`,
  'marginal-stability': (plan, d) => `${targetText(plan, d.target)} has a pole at radius ${d.values.radius.toFixed(7)}: fixed-point coefficients may make it unstable`,
  headroom: (plan, d) =>
    `${targetText(plan, d.target)} boosts ${dbText(d.values.peakDb)} at ${peakPlaceText(d.values)}: a full-scale input clips; lower the input level or the gain by that much`,
  'shelf-overshoot': (plan, d) =>
    `${targetText(plan, d.target)} has shelf slope S ${d.values.slope}: above S = ${d.values.monotonicSlope} a shelf overshoots its gain; check its peak in the headroom`,
  'near-nyquist': (plan, d) =>
    d.target.kind === 'band'
      ? `${targetText(plan, d.target)} at ${fmtHz(d.values.frequencyHz)} is within ${Math.round((1 - d.values.fraction) * 100)}% of Nyquist (${fmtHz(d.values.nyquistHz)}): its shape is cramped by the bilinear transform`
      : `${targetText(plan, d.target)} at ${fmtHz(d.values.frequencyHz)} is close to Nyquist (${fmtHz(d.values.nyquistHz)})`,
  'no-high-pass': (plan, d) => `${targetText(plan, d.target)} looks like a high-frequency way but has no high-pass edge or high-pass band: low frequencies can destroy its driver`,
  cramping: (plan, d) =>
    `${targetText(plan, d.target)} departs from its analog shape by ${dbText(d.values.deviationDb)} at ${fmtHz(d.values.frequencyHz)}${d.values.matched || d.target.kind === 'edge' ? '' : '; the band editor offers a matched design'}`,
  'coefficient-sensitivity': (plan, d) => `${targetText(plan, d.target)}: ${sensitivityText(d.values)}`,
  'plan-field': (plan, d) => withPlace(plan, d.target, d.values.reason),
  'import-refused': (plan, d) => withPlace(plan, d.target, d.values.reason),
  'edit-refused': (_plan, d) => d.values.reason,
  'no-such-band': () => 'that band no longer exists',
  'no-such-output': () => 'that output no longer exists',
  'rate-range': (_plan, d) => `the sample rate must be ${fmtHz(d.values.minHz)} to ${fmtHz(d.values.maxHz)}`,
  'export-redesigned': (_plan, d) => `redesigned at the board's ${fmtHz(d.values.boardHz)} (the plan is at ${fmtHz(d.values.planHz)}): every band keeps its frequency, gain and Q`,
  'export-raw-rate': (plan, d) => `raw bands keep their coefficients, so their response moves with the rate: ${d.values.bands.map((from) => sourceName(plan, from)).join(', ')}`,
  'export-scaling-level': (plan, d) =>
    `${targetText(plan, d.target)}: the suggested scaling leaves the output ${d.values.levelDb.toFixed(2)} dB below the design (the gain is folded, so it cannot take it back)`,
  'export-scaling-short': (plan, d) =>
    `${targetText(plan, d.target)}: the suggested scaling leaves the output ${d.values.levelDb.toFixed(2)} dB below the design (its gain would pass the plan's ${d.values.gainLimitDb} dB limit)`,
  'export-unstable': (plan, d) => `unstable after quantization: ${d.values.sections.map((s) => `${outputName(plan, s.outputId)} section ${s.index} (${sectionSource(plan, s.from)})`).join(', ')}`,
  'export-saturated': (plan, d) => `saturated coefficients: ${d.values.sections.map((s) => `${outputName(plan, s.outputId)} section ${s.index} (${s.names.join(', ')})`).join('; ')}`,
  'export-gain-saturated': (plan, d) => `output gain saturated: ${d.values.outputIds.map((id) => outputName(plan, id)).join(', ')}`,
  'export-budget': (plan, d) => {
    const extra = d.values.sections - d.values.budget;
    return `${outputName(plan, d.values.outputId)} needs ${d.values.sections} sections, ${extra} more than the board's ${d.values.budget}: remove or merge ${extra} band(s) or crossover section(s)`;
  },
  'export-delay': (plan, d) =>
    `${outputName(plan, d.values.outputId)} is delayed ${d.values.delaySamples} samples, ${d.values.delaySamples - d.values.maxSamples} more than the board's ${d.values.maxSamples}`,
  'export-rate': (plan, d) =>
    `the board runs at ${fmtHz(d.values.boardHz)}, the plan at ${fmtHz(d.values.planHz)}; redesigning at the board's rate fails: ${diagnosticText(plan, d.values.refusal)}`,
  'export-gain-scaling': (plan, d) => `${targetText(plan, d.target)}: ${gainScalingText(d.values)}`,
  'rate-misfit': (plan, d) => {
    const { misfits } = d.values;
    const more = misfits.length > 3 ? ` and ${misfits.length - 3} more` : '';
    const named = misfits.slice(0, 3).map((m) => misfitText(plan, m));
    return `${fmtHz(d.values.sampleRateHz)} refused: Nyquist would be ${fmtHz(d.values.nyquistHz)}, below ${named.join(', ')}${more}. Lower those first.`;
  },
};

/** A diagnostic in the app's words, as a sentence (first letter capital). */
export function diagnosticText(plan: Plan, d: Diagnostic): string {
  const text = (TEXT[d.code] as (plan: Plan, d: Diagnostic) => string)(plan, d);
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** A refusal shown beside the field it is about: the field's name and the reason ("a0: must not be 0"). */
export function fieldText(plan: Plan, d: Diagnostic): string {
  return (TEXT[d.code] as (plan: Plan, d: Diagnostic) => string)(plan, d);
}

/** The output or band a diagnostic points at, to select it: [chain, band or null], or null. */
export function diagnosticSelection(d: Diagnostic): [string, string | null] | null {
  const t = d.target;
  if (t.kind === 'band') return [t.chain, t.bandId];
  if (t.kind === 'output' || t.kind === 'edge') return [t.outputId, null];
  return null;
}

/** A section source with its chain: "input band 2", "Woofer band 1", "Woofer high-pass edge". */
function sourceName(plan: Plan, from: string): string {
  const chain = from.split('/')[0];
  const part = sectionSource(plan, from);
  return chain === 'input' || part === from ? part : `${outputName(plan, chain)} ${part}`;
}

/** Where a designed section came from ("sub/highPass", "input/b1") as the user knows it. */
export function sectionSource(plan: Plan, from: string): string {
  const [chainId, part] = from.split('/');
  if (part === undefined) return from;
  if (chainId === 'input') {
    const i = plan.input.bands.findIndex((b) => b.id === part);
    return i >= 0 ? `input band ${i + 1}` : from;
  }
  const output = plan.outputs.find((o) => o.id === chainId);
  if (!output) return from;
  if (part === 'highPass') return 'high-pass edge';
  if (part === 'lowPass') return 'low-pass edge';
  const i = output.bands.findIndex((b) => b.id === part);
  return i >= 0 ? `band ${i + 1}` : from;
}
