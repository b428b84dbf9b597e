/**
 * Responses of a plan on the plot grid, recomputing only what changed. Plans are immutable and
 * edits share untouched parts, so object identity tells what changed: a band drag in one output
 * replaces that output (and the plan), so only that output and the sum are recomputed; an
 * input-chain edit replaces `plan.input`, so every output is.
 */
import { designBandBy } from '$core/design/band';
import { withBoardDelays } from '$core/design/board-delay';
import { designInput, designOutput, type DesignedOutput, type SourcedSection } from '$core/design/chain';
import { cascadeWithGainDelay, outputResponse, sumResponses, type Response } from '$core/response/chain-response';
import { normalizedOmega } from '$core/response/kernel';
import type { Band, Output, Plan } from '$core/plan/types';

export interface OutputCurve {
  output: Output;
  designed: DesignedOutput;
  response: Response;
}

export interface PlanFrame {
  plan: Plan;
  frequencies: Float64Array;
  outputs: OutputCurve[];
  /** Sum of the unmuted (and, when any is soloed, soloed) outputs. */
  sum: Response;
  /** Ids summed. */
  summed: readonly string[];
  /** The input chain alone (unity gain, no delay). */
  input: Response;
}

export interface CacheStats {
  outputsComputed: number;
  inputComputed: number;
  sumsComputed: number;
  bandsComputed: number;
}

export class ResponseCache {
  #grid: Float64Array | null = null;
  #omega: Float64Array | null = null;
  #sampleRate = 0;
  #inputKey: Plan['input'] | null = null;
  #inputSections: SourcedSection[] = [];
  #inputResponse: Response | null = null;
  #outputs = new WeakMap<Output, { inputSections: SourcedSection[]; curve: OutputCurve }>();
  #bands = new WeakMap<Band, Response>();
  #lastSum: { parts: Response[]; sum: Response } | null = null;
  /** What the designs depend on beyond the bands and outputs themselves: the plan's default design method and the board's delays. */
  #planKey = '';
  readonly stats: CacheStats = { outputsComputed: 0, inputComputed: 0, sumsComputed: 0, bandsComputed: 0 };

  #setGrid(grid: Float64Array, sampleRate: number): void {
    if (grid === this.#grid && sampleRate === this.#sampleRate) return;
    this.#grid = grid;
    this.#sampleRate = sampleRate;
    this.#omega = normalizedOmega(grid, sampleRate);
    this.#inputKey = null;
    this.#outputs = new WeakMap();
    this.#bands = new WeakMap();
    this.#lastSum = null;
  }

  /**
   * `exactDelays`: the outputs' exact delays; otherwise the delays the plan's board runs
   * (src/design/board-delay.ts: whole samples under a profile in samples).
   */
  frame(plan: Plan, grid: Float64Array, solo: readonly string[], exactDelays = false): PlanFrame {
    this.#setGrid(grid, plan.sampleRate);
    const key = `${plan.defaultDesign ?? ''}|${exactDelays ? 'exact' : `${plan.profile?.delayUnit ?? ''}@${plan.profile?.sampleRate ?? ''}`}`;
    if (key !== this.#planKey) {
      this.#planKey = key;
      this.#inputKey = null;
      this.#outputs = new WeakMap();
      this.#bands = new WeakMap();
      this.#lastSum = null;
    }
    const omega = this.#omega!;
    const fs = plan.sampleRate;
    if (this.#inputKey !== plan.input) {
      this.#inputKey = plan.input;
      this.#inputSections = designInput(plan);
      this.#inputResponse = cascadeWithGainDelay(this.#inputSections, 1, 0, omega, fs);
      this.stats.inputComputed++;
    }
    const outputs = plan.outputs.map((o) => {
      const hit = this.#outputs.get(o);
      if (hit && hit.inputSections === this.#inputSections) return hit.curve;
      const exact = designOutput(plan, o, this.#inputSections);
      const designed = exactDelays ? exact : withBoardDelays([exact], plan)[0];
      const curve: OutputCurve = { output: o, designed, response: outputResponse(designed, omega, fs) };
      this.#outputs.set(o, { inputSections: this.#inputSections, curve });
      this.stats.outputsComputed++;
      return curve;
    });
    const soloed = solo.filter((s) => plan.outputs.some((o) => o.id === s));
    const summedCurves = outputs.filter((c) => !c.output.mute && (soloed.length === 0 || soloed.includes(c.output.id)));
    const parts = summedCurves.map((c) => c.response);
    let sum: Response;
    const last = this.#lastSum;
    if (last && last.parts.length === parts.length && last.parts.every((p, i) => p === parts[i])) sum = last.sum;
    else {
      sum = sumResponses(parts, omega, fs);
      this.#lastSum = { parts, sum };
      this.stats.sumsComputed++;
    }
    return { plan, frequencies: grid, outputs, sum, summed: summedCurves.map((c) => c.output.id), input: this.#inputResponse! };
  }

  /** One band's own response (unity gain, no delay) on the current grid. */
  band(band: Band, plan?: Plan): Response {
    const hit = this.#bands.get(band);
    if (hit) return hit;
    const r = cascadeWithGainDelay(designBandBy(band, this.#sampleRate, plan?.defaultDesign), 1, 0, this.#omega!, this.#sampleRate);
    this.#bands.set(band, r);
    this.stats.bandsComputed++;
    return r;
  }
}
