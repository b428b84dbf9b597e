/**
 * Target curves: the response a fit aims for, as the sum in dB of its parts (docs/fitting.md,
 * "Targets"). A target with no parts is flat. Level alignment is separate (align.ts): these are
 * shapes, 0 dB meaning "the aligned level".
 */
import { designBand } from '../design/cookbook';
import { designEdge } from '../design/crossover';
import type { Output, Target, TargetPart } from '../plan/types';
import { addSectionDb, gridTrig } from './bands';

/** What the parts need beyond the frequencies: the sample rate, and the output for `crossover`. */
export interface TargetContext {
  sampleRateHz: number;
  /** The output whose edges a `crossover` part follows (absent for the system). */
  output?: Output;
}

/** A flat target over the fit's default range. */
export function flatTarget(scope: Target['scope'], outputId?: string): Target {
  const t: Target = { scope, parts: [{ kind: 'flat' }], alignment: 'mean', toleranceDb: 1 };
  if (outputId !== undefined) t.outputId = outputId;
  return t;
}

/** The target's shape in dB at each frequency (its level not yet aligned). */
export function targetShapeDb(parts: readonly TargetPart[], frequenciesHz: ArrayLike<number>, ctx: TargetContext): Float64Array {
  const n = frequenciesHz.length;
  const out = new Float64Array(n);
  for (const p of parts) addPart(p, frequenciesHz, ctx, out);
  return out;
}

function addPart(p: TargetPart, freqs: ArrayLike<number>, ctx: TargetContext, out: Float64Array): void {
  const n = freqs.length;
  switch (p.kind) {
    case 'flat':
      return;
    case 'tilt':
      for (let i = 0; i < n; i++) out[i] += p.dbPerOctave * Math.log2(freqs[i] / p.pivotHz);
      return;
    case 'lowShelf':
    case 'highShelf': {
      // The cookbook shelf with S = 1 (its steepest monotonic slope) at the plan's rate.
      const sections = designBand({ id: 'target', type: p.kind, frequency: p.frequency, gainDb: p.gainDb, slope: 1, enabled: true }, ctx.sampleRateHz);
      const trig = gridTrig(freqs, ctx.sampleRateHz);
      for (const s of sections) addSectionDb(s, trig, out);
      return;
    }
    case 'points':
      addBreakpoints(p.points, freqs, out);
      return;
    case 'crossover': {
      const o = ctx.output;
      if (!o) return;
      const trig = gridTrig(freqs, ctx.sampleRateHz);
      for (const kind of ['highPass', 'lowPass'] as const) {
        const edge = o[kind];
        if (edge) for (const s of designEdge(edge, kind, ctx.sampleRateHz)) addSectionDb(s, trig, out);
      }
      return;
    }
  }
}

/** Straight lines on log f between the points, constant beyond the first and the last. */
export function addBreakpoints(points: readonly (readonly [number, number])[], freqs: ArrayLike<number>, out: Float64Array): void {
  const m = points.length;
  let k = 0;
  for (let i = 0; i < freqs.length; i++) {
    const f = freqs[i];
    if (f <= points[0][0]) {
      out[i] += points[0][1];
      continue;
    }
    if (f >= points[m - 1][0]) {
      out[i] += points[m - 1][1];
      continue;
    }
    // Frequencies usually come in increasing order: resume the search where the last one ended.
    if (k >= m - 1 || points[k][0] > f) k = 0;
    while (points[k + 1][0] < f) k++;
    const [f0, d0] = points[k];
    const [f1, d1] = points[k + 1];
    out[i] += d0 + ((d1 - d0) * Math.log(f / f0)) / Math.log(f1 / f0);
  }
}
