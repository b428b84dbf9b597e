/**
 * The warnings a user must see about a plan: headroom (boost), instability, frequencies close to
 * Nyquist, and a high-frequency output with no high-pass edge (a tweeter fed full-range bass can
 * be destroyed). `check` on the command line and the app's status bar print these.
 */
import { designInput, designOutput, type DesignedOutput } from '../design/chain';
import { MONOTONIC_SHELF_SLOPE } from '../design/cookbook';
import type { Band, Output, Plan } from '../plan/types';
import { headroom, type Headroom } from './headroom';
import { largestPoleRadius } from './poles';
import { worstCasePeak, type WorstCase } from './worst-case';
import { CRAMPING_WARN_DB, MARGINAL_POLE_RADIUS, NEAR_NYQUIST_FRACTION, crampingTopHz, headroomSeverity } from './thresholds';
import { planCramping } from './cramping';
import { diagnostic, type Diagnostic } from '../diagnostics';

/**
 * The codes `check` emits; each surface words them (see src/diagnostics.ts).
 * 'coefficient-sensitivity' comes from src/export/sensitivity.ts beside analyzePlan: it needs the
 * board's number format, and analysis/ imports nothing from export/.
 */
export type CheckCode = 'headroom' | 'unstable' | 'near-nyquist' | 'no-high-pass' | 'marginal-stability' | 'shelf-overshoot' | 'cramping' | 'coefficient-sensitivity';
export type Warning = Diagnostic<CheckCode>;


export interface OutputAnalysis {
  id: string;
  /** Sine peak over 0 Hz .. Nyquist. */
  headroom: Headroom;
  /** Peak for any input bounded by full scale (sum |h|); never below the sine peak. */
  worstCase: WorstCase;
  largestPoleRadius: number;
  stable: boolean;
}

export interface PlanAnalysis {
  outputs: OutputAnalysis[];
  warnings: Warning[];
}

const HIGH_WORDS = /(tweet|treble|horn|high|^hf|_hf|-hf|\bhf\b|top|compression)/i;

/**
 * An output is treated as high-frequency when its name or id says so, or when it has no low-pass
 * edge while another output has one (it is the top way).
 */
export function looksHighFrequency(plan: Plan, out: Output): boolean {
  if (HIGH_WORDS.test(out.id) || HIGH_WORDS.test(out.name)) return true;
  if (plan.outputs.length < 2) return false;
  return out.lowPass === null && plan.outputs.some((o) => o !== out && o.lowPass !== null);
}

/** An enabled high-pass band (cookbook 2nd order or 1st order) of the output's own chain also protects its driver. */
function hasHighPassBand(out: Output): boolean {
  return out.bands.some((b) => b.enabled && (b.type === 'highPass' || b.type === 'highPass1'));
}

/** Frequencies above this are flagged near Nyquist. */
function nearNyquistLimit(plan: Plan): number {
  return NEAR_NYQUIST_FRACTION * (plan.sampleRate / 2);
}

function nearNyquist(plan: Plan, bands: Band[], chain: string, warnings: Warning[]): void {
  const limit = nearNyquistLimit(plan);
  for (const b of bands) {
    if (b.enabled && b.type !== 'raw' && b.frequency > limit) {
      warnings.push(
        diagnostic('near-nyquist', 'warning', { kind: 'band', chain, bandId: b.id }, { frequencyHz: b.frequency, nyquistHz: plan.sampleRate / 2, fraction: NEAR_NYQUIST_FRACTION }),
      );
    }
  }
}

/**
 * Shelves set by a slope above S = 1 overshoot: the cookbook's S = 1 is the steepest slope that
 * keeps the shelf monotonic; steeper ones bump above the shelf gain and dip below 0 dB before it.
 */
function steepShelves(bands: Band[], chain: string, warnings: Warning[]): void {
  for (const b of bands) {
    if (b.enabled && (b.type === 'lowShelf' || b.type === 'highShelf') && b.q === undefined && (b.slope ?? 1) > MONOTONIC_SHELF_SLOPE) {
      warnings.push(diagnostic('shelf-overshoot', 'warning', { kind: 'band', chain, bandId: b.id }, { slope: b.slope ?? 1, monotonicSlope: MONOTONIC_SHELF_SLOPE }));
    }
  }
}

/** The frequencies of an output's enabled bands and edges (input chain included): where the peak search looks closely. */
export function bandFrequencies(plan: Plan, out: Output): number[] {
  const bands = [...plan.input.bands, ...out.bands].filter((b) => b.enabled && b.type !== 'raw').map((b) => b.frequency);
  for (const e of [out.highPass, out.lowPass]) if (e) bands.push(e.frequency);
  return bands;
}

export function analyzeOutput(plan: Plan, d: DesignedOutput): OutputAnalysis {
  const r = largestPoleRadius(d.sections);
  const out = plan.outputs.find((o) => o.id === d.id);
  const hints = out ? bandFrequencies(plan, out) : [];
  return {
    id: d.id,
    headroom: headroom(d.sections, d.gain, plan.sampleRate, hints),
    worstCase: worstCasePeak(d.sections, d.gain),
    largestPoleRadius: r,
    // NaN-safe: a radius that cannot be computed is not "stable".
    stable: r < 1,
  };
}

function hasRawBands(plan: Plan, o: Output): boolean {
  return [...plan.input.bands, ...o.bands].some((b) => b.enabled && b.type === 'raw');
}

/**
 * The last analysis of each output and what it was made from. Plans are immutable and an edit
 * replaces only what it touches, so after a nudge of one band the headroom search (the costly
 * part) runs again for that output alone; an input-chain or sample-rate change redoes them all.
 */
const outputMemo = new WeakMap<Output, { input: Plan['input']; sampleRate: number; analysis: OutputAnalysis }>();

export function analyzePlan(plan: Plan): PlanAnalysis {
  const warnings: Warning[] = [];
  let input: ReturnType<typeof designInput> | null = null;
  const outputs = plan.outputs.map((o) => {
    const hit = outputMemo.get(o);
    if (hit && hit.input === plan.input && hit.sampleRate === plan.sampleRate) return hit.analysis;
    input ??= designInput(plan);
    const analysis = analyzeOutput(plan, designOutput(plan, o, input));
    outputMemo.set(o, { input: plan.input, sampleRate: plan.sampleRate, analysis });
    return analysis;
  });

  nearNyquist(plan, plan.input.bands, 'input', warnings);
  steepShelves(plan.input.bands, 'input', warnings);
  plan.outputs.forEach((o, i) => {
    const a = outputs[i];
    const output = { kind: 'output', outputId: o.id } as const;
    if (!a.stable) {
      warnings.push(diagnostic('unstable', 'danger', output, { radius: a.largestPoleRadius, hasRawBands: hasRawBands(plan, o) }));
    } else if (a.largestPoleRadius > MARGINAL_POLE_RADIUS) {
      warnings.push(diagnostic('marginal-stability', 'warning', output, { radius: a.largestPoleRadius }));
    }
    const boost = headroomSeverity(a.headroom.peakDb);
    if (boost) {
      warnings.push(diagnostic('headroom', boost, output, { peakDb: a.headroom.peakDb, frequencyHz: a.headroom.frequencyHz, outsideAudioBand: a.headroom.outsideAudioBand }));
    }
    for (const edge of ['highPass', 'lowPass'] as const) {
      const e = o[edge];
      if (e && e.frequency > nearNyquistLimit(plan)) {
        warnings.push(
          diagnostic('near-nyquist', 'warning', { kind: 'edge', outputId: o.id, edge }, { frequencyHz: e.frequency, nyquistHz: plan.sampleRate / 2, fraction: NEAR_NYQUIST_FRACTION }),
        );
      }
    }
    nearNyquist(plan, o.bands, o.id, warnings);
    steepShelves(o.bands, o.id, warnings);
    if (!o.highPass && !hasHighPassBand(o) && looksHighFrequency(plan, o)) {
      warnings.push(diagnostic('no-high-pass', 'danger', output, {}));
    }
  });
  crampedItems(plan, warnings);
  return { outputs, warnings };
}

/** Bands and edges whose digital magnitude departs from their analog prototype by more than CRAMPING_WARN_DB. */
function crampedItems(plan: Plan, warnings: Warning[]): void {
  for (const c of planCramping(plan)) {
    if (!(Math.abs(c.deviationDb) <= CRAMPING_WARN_DB)) {
      warnings.push(
        diagnostic('cramping', 'warning', c.target, {
          deviationDb: c.deviationDb,
          frequencyHz: c.frequencyHz,
          thresholdDb: CRAMPING_WARN_DB,
          topHz: crampingTopHz(plan.sampleRate),
          matched: c.method === 'matched',
        }),
      );
    }
  }
}
