/**
 * The warnings a user must see about a plan: headroom (boost), instability, frequencies close to
 * Nyquist, and a high-frequency output with no high-pass edge (a tweeter fed full-range bass can
 * be destroyed). `check` on the command line and the app's status bar print these.
 */
import { designInput, designOutput, type DesignedOutput } from '../design/chain';
import type { Band, Output, Plan } from '../plan/types';
import { headroom, type Headroom } from './headroom';
import { largestPoleRadius } from './poles';
import { MARGINAL_POLE_RADIUS, NEAR_NYQUIST_FRACTION, headroomSeverity } from './thresholds';
import { diagnostic, type Diagnostic } from '../diagnostics';

/** The codes `check` emits; each surface words them (see src/diagnostics.ts). */
export type CheckCode = 'headroom' | 'unstable' | 'near-nyquist' | 'no-high-pass' | 'marginal-stability';
export type Warning = Diagnostic<CheckCode>;


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

export function analyzeOutput(plan: Plan, d: DesignedOutput): OutputAnalysis {
  const r = largestPoleRadius(d.sections);
  return { id: d.id, headroom: headroom(d.sections, d.gain, plan.sampleRate), largestPoleRadius: r, stable: r < 1 };
}

export function analyzePlan(plan: Plan): PlanAnalysis {
  const warnings: Warning[] = [];
  const input = designInput(plan);
  const outputs = plan.outputs.map((o) => analyzeOutput(plan, designOutput(plan, o, input)));

  nearNyquist(plan, plan.input.bands, 'input', warnings);
  plan.outputs.forEach((o, i) => {
    const a = outputs[i];
    const output = { kind: 'output', outputId: o.id } as const;
    if (!a.stable) {
      warnings.push(diagnostic('unstable', 'danger', output, { radius: a.largestPoleRadius }));
    } else if (a.largestPoleRadius > MARGINAL_POLE_RADIUS) {
      warnings.push(diagnostic('marginal-stability', 'warning', output, { radius: a.largestPoleRadius }));
    }
    const boost = headroomSeverity(a.headroom.peakDb);
    if (boost) {
      warnings.push(diagnostic('headroom', boost, output, { peakDb: a.headroom.peakDb, frequencyHz: a.headroom.frequencyHz }));
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
    if (!o.highPass && !hasHighPassBand(o) && looksHighFrequency(plan, o)) {
      warnings.push(diagnostic('no-high-pass', 'danger', output, {}));
    }
  });
  return { outputs, warnings };
}
