/**
 * The acoustic curves of a plan frame: each driver measurement on the plot grid, each output's
 * predicted acoustic response (its cached chain response x the measurement x its offset) and the
 * predicted sum of the summed outputs that have one. The math is the core's
 * (src/measure/acoustic.ts); this only keeps what did not change between frames: a measurement
 * is interpolated once per grid, a prediction is redone only when its chain response, its
 * measurement or its offset changed.
 */
import { acousticOffsetMs, interpolateMeasurement, measurementResponse, predictedFromChain, type InterpolatedMeasurement } from '$core/measure/acoustic';
import { DEFAULT_AIR_TEMPERATURE_C, type Measurement, type Output } from '$core/plan/types';
import { sumResponses, type Response } from '$core/response/chain-response';
import { normalizedOmega } from '$core/response/kernel';
import type { PlanFrame } from './response-cache';

export interface AcousticCurve {
  output: Output;
  /** The output's index in the plan (its colour). */
  index: number;
  measurement: Measurement;
  /** The driver measurement alone on the grid. */
  measured: Response;
  /** Driver x chain x offset. */
  predicted: Response;
}

export interface AcousticFrame {
  curves: AcousticCurve[];
  /** The predicted sum of the summed outputs with a driver measurement; null when there is none. */
  sum: Response | null;
  /** Summed outputs without a driver measurement (left out of the predicted sum). */
  unmeasured: string[];
}

export class AcousticCache {
  #grid: Float64Array | null = null;
  #sampleRate = 0;
  #omega: Float64Array = new Float64Array(0);
  #interpolated = new WeakMap<Measurement, { d: InterpolatedMeasurement; measured: Response }>();
  #predicted = new WeakMap<Response, { d: InterpolatedMeasurement; offsetMs: number; r: Response }>();
  #lastSum: { parts: Response[]; sum: Response } | null = null;

  frame(f: PlanFrame): AcousticFrame {
    const plan = f.plan;
    if (f.frequencies !== this.#grid || plan.sampleRate !== this.#sampleRate) {
      this.#grid = f.frequencies;
      this.#sampleRate = plan.sampleRate;
      this.#omega = normalizedOmega(f.frequencies, plan.sampleRate);
      this.#interpolated = new WeakMap();
      this.#predicted = new WeakMap();
      this.#lastSum = null;
    }
    const fs = plan.sampleRate;
    const temperature = plan.airTemperatureC ?? DEFAULT_AIR_TEMPERATURE_C;
    const byId = new Map((plan.measurements ?? []).map((m) => [m.id, m]));
    const curves: AcousticCurve[] = [];
    f.outputs.forEach((c, index) => {
      const m = c.output.driverMeasurementId === undefined ? undefined : byId.get(c.output.driverMeasurementId);
      if (!m) return;
      let hit = this.#interpolated.get(m);
      if (!hit) {
        const d = interpolateMeasurement(m, f.frequencies);
        hit = { d, measured: measurementResponse(d, fs) };
        this.#interpolated.set(m, hit);
      }
      const offsetMs = acousticOffsetMs(c.output.acousticOffset, temperature);
      let p = this.#predicted.get(c.response);
      if (!p || p.d !== hit.d || p.offsetMs !== offsetMs) {
        p = { d: hit.d, offsetMs, r: predictedFromChain(c.response, hit.d, offsetMs, this.#omega, fs) };
        this.#predicted.set(c.response, p);
      }
      curves.push({ output: c.output, index, measurement: m, measured: hit.measured, predicted: p.r });
    });
    const summed = new Set(f.summed);
    const parts = curves.filter((c) => summed.has(c.output.id)).map((c) => c.predicted);
    let sum: Response | null = null;
    if (parts.length > 0) {
      const last = this.#lastSum;
      if (last && last.parts.length === parts.length && last.parts.every((x, i) => x === parts[i])) sum = last.sum;
      else {
        sum = sumResponses(parts, this.#omega, fs);
        this.#lastSum = { parts, sum };
      }
    }
    const measuredIds = new Set(curves.map((c) => c.output.id));
    return { curves, sum, unmeasured: f.summed.filter((id) => !measuredIds.has(id)) };
  }
}
