/**
 * A plan's outputs as designed cascades: every section in signal order with where it came from,
 * plus the output's linear gain (polarity included) and delay.
 * Signal order: input bands, highPass edge, lowPass edge, the output's bands, gain, polarity, delay.
 */
import type { Band, DesignMethod, Output, Plan } from '../plan/types';
import { designBandBy } from './band';
import { designEdge } from './crossover';
import type { Section } from './section';

export interface SourcedSection extends Section {
  /** "input/<bandId>", "<outputId>/highPass", "<outputId>/lowPass" or "<outputId>/<bandId>". */
  from: string;
}

export interface DesignedOutput {
  id: string;
  /** Linear gain, polarity included: -10^(gainDb/20) when inverted. */
  gain: number;
  delayMs: number;
  /** Delay in samples, not rounded (the response uses this). */
  delaySamplesExact: number;
  mute: boolean;
  sections: SourcedSection[];
}

export function designBands(bands: readonly Band[], sampleRateHz: number, prefix: string, defaultMethod: DesignMethod = 'bilinear'): SourcedSection[] {
  const out: SourcedSection[] = [];
  for (const band of bands) {
    if (!band.enabled) continue;
    for (const s of designBandBy(band, sampleRateHz, defaultMethod)) out.push({ ...s, from: `${prefix}/${band.id}` });
  }
  return out;
}

/** The input chain's sections, shared by every output. */
export function designInput(plan: Plan): SourcedSection[] {
  return designBands(plan.input.bands, plan.sampleRate, 'input', plan.defaultDesign);
}

/** One output's own sections (edges and bands), without the input chain. */
export function designOutputOwn(plan: Plan, output: Output): SourcedSection[] {
  const fs = plan.sampleRate;
  const sections: SourcedSection[] = [];
  // Signal order: the high-pass edge, then the low-pass edge.
  for (const kind of ['highPass', 'lowPass'] as const) {
    const edge = output[kind];
    if (edge) for (const s of designEdge(edge, kind, fs)) sections.push({ ...s, from: `${output.id}/${kind}` });
  }
  sections.push(...designBands(output.bands, fs, output.id, plan.defaultDesign));
  return sections;
}

export function outputGain(output: Output): number {
  return (output.invert ? -1 : 1) * Math.pow(10, output.gainDb / 20);
}

export function designOutput(plan: Plan, output: Output, inputSections: SourcedSection[] = designInput(plan)): DesignedOutput {
  return {
    id: output.id,
    gain: outputGain(output),
    delayMs: output.delayMs,
    delaySamplesExact: (output.delayMs * plan.sampleRate) / 1000,
    mute: output.mute,
    sections: [...inputSections, ...designOutputOwn(plan, output)],
  };
}

export function designPlan(plan: Plan): DesignedOutput[] {
  const input = designInput(plan);
  return plan.outputs.map((o) => designOutput(plan, o, input));
}
