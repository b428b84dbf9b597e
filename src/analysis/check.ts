/**
 * The warnings a user must see about a plan: headroom (boost), instability, frequencies close to
 * Nyquist, and a high-frequency output with no high-pass edge (a tweeter fed full-range bass can
 * be destroyed). `check` on the command line and the app's status bar print these.
 */
import { designInput, designOutput, type DesignedOutput } from '../design/chain';
import type { Band, Output, Plan } from '../plan/types';
import { headroom, type Headroom } from './headroom';
import { largestPoleRadius } from './poles';
import { formatFrequency } from '../ui/units';

export type Severity = 'info' | 'warning' | 'danger';

export interface Warning {
  severity: Severity;
  /** Stable identifier of the kind of warning, for tests and the UI. */
  code: 'headroom' | 'unstable' | 'near-nyquist' | 'no-high-pass' | 'marginal-stability';
  /** Where: "input", an output id, or a field path. */
  where: string;
  message: string;
}

/** A frequency above this fraction of Nyquist is flagged: the bilinear transform cramps it. */
export const NEAR_NYQUIST_FRACTION = 0.9;
/** A pole radius above this is flagged as marginal (common practice, no source: low-frequency sections at high rates sit near 0.999). */
export const MARGINAL_POLE_RADIUS = 0.99999;
/** Boost below this is rounding, not headroom loss (a Linkwitz-Riley high-pass peaks at +1e-10 dB). */
export const HEADROOM_WARN_DB = 0.01;

export interface OutputAnalysis {
  id: string;
  headroom: Headroom;
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

function nearNyquist(plan: Plan, bands: Band[], where: string, warnings: Warning[]): void {
  const limit = nearNyquistLimit(plan);
  for (const b of bands) {
    if (b.enabled && b.type !== 'raw' && b.frequency > limit) {
      warnings.push({
        severity: 'warning',
        code: 'near-nyquist',
        where: `${where}/${b.id}`,
        message: `band ${b.id} at ${fmtHz(b.frequency)} is within ${Math.round((1 - NEAR_NYQUIST_FRACTION) * 100)}% of Nyquist (${fmtHz(plan.sampleRate / 2)}): its shape is cramped by the bilinear transform`,
      });
    }
  }
}

/** Frequencies in warnings read as in the app's fields ("63 Hz", "2.2 kHz"): `formatFrequency`. */
export const fmtHz = formatFrequency;

export function analyzeOutput(plan: Plan, d: DesignedOutput): OutputAnalysis {
  const r = largestPoleRadius(d.sections);
  return { id: d.id, headroom: headroom(d.sections, d.gain, plan.sampleRate), largestPoleRadius: r, stable: r < 1 };
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
  plan.outputs.forEach((o, i) => {
    const a = outputs[i];
    if (!a.stable) {
      warnings.push({
        severity: 'danger',
        code: 'unstable',
        where: o.id,
        message: `output ${o.id} is unstable: a pole lies at radius ${a.largestPoleRadius.toFixed(6)} (>= 1); check its raw bands`,
      });
    } else if (a.largestPoleRadius > MARGINAL_POLE_RADIUS) {
      warnings.push({
        severity: 'warning',
        code: 'marginal-stability',
        where: o.id,
        message: `output ${o.id} has a pole at radius ${a.largestPoleRadius.toFixed(7)}: fixed-point coefficients may make it unstable`,
      });
    }
    if (a.headroom.peakDb > HEADROOM_WARN_DB) {
      warnings.push({
        severity: a.headroom.peakDb > 6 ? 'danger' : 'warning',
        code: 'headroom',
        where: o.id,
        message: `output ${o.id} boosts ${a.headroom.peakDb.toFixed(2)} dB at ${fmtHz(a.headroom.frequencyHz)}: a full-scale input clips; lower the input level or the gain by that much`,
      });
    }
    for (const edge of [o.highPass, o.lowPass]) {
      if (edge && edge.frequency > nearNyquistLimit(plan)) {
        warnings.push({
          severity: 'warning',
          code: 'near-nyquist',
          where: o.id,
          message: `output ${o.id}: an edge at ${fmtHz(edge.frequency)} is close to Nyquist (${fmtHz(plan.sampleRate / 2)})`,
        });
      }
    }
    nearNyquist(plan, o.bands, o.id, warnings);
    if (!o.highPass && !hasHighPassBand(o) && looksHighFrequency(plan, o)) {
      warnings.push({
        severity: 'danger',
        code: 'no-high-pass',
        where: o.id,
        message: `output ${o.id} looks like a high-frequency way but has no high-pass edge or high-pass band: low frequencies can destroy its driver`,
      });
    }
  });
  return { outputs, warnings };
}
