/**
 * The acoustic curves of a plan frame: each driver measurement on the plot grid, each output's
 * predicted acoustic response (its cached chain response x the measurement x its offset) and the
 * predicted sum of the summed outputs that have one, and the system measurements. The math is
 * the core's (src/measure/acoustic.ts, smooth.ts); this only keeps what did not change between
 * frames: a measurement is smoothed and interpolated once per grid and setting, a prediction is
 * redone only when its chain response, its measurement or its offset changed, so a drag pays for
 * the dragged output's prediction and the sum alone.
 *
 * Smoothing applies to what is drawn (measurements and the predictions made from them), never to
 * the plan. The excess-phase display draws a measurement's phase with its delay removed (as the
 * plan stores it); predictions keep their full phase, which is what sums.
 */
import { acousticOffsetMs, driverOnGrid, interpolateMeasurement, measurementResponse, predictedFromChain, type InterpolatedMeasurement } from '$core/measure/acoustic';
import { DEFAULT_AIR_TEMPERATURE_C, type Measurement, type Output } from '$core/plan/types';
import { smoothMeasurement, type Smoothing } from '$core/measure/smooth';
import { sumResponses, type Response } from '$core/response/chain-response';
import { normalizedOmega, type ComplexResponse } from '$core/response/kernel';
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

/** A system measurement on the plot grid. */
export interface SystemCurve {
  measurement: Measurement;
  /** Its place among the system measurements (its dash). */
  index: number;
  measured: Response;
}

/** How measurements are drawn (not saved): smoothing, and full phase or excess phase (delay removed). */
export interface MeasurementDisplay {
  smoothing: Smoothing;
  phase: 'full' | 'excess';
}

const AS_STORED: MeasurementDisplay = { smoothing: { kind: 'none' }, phase: 'full' };

function displayKey(d: MeasurementDisplay): string {
  const s = d.smoothing;
  return `${s.kind === 'octave' ? `1/${s.n}` : s.kind}|${d.phase}`;
}

export interface AcousticFrame {
  curves: AcousticCurve[];
  systems: SystemCurve[];
  /** The predicted sum of the summed outputs with a driver measurement; null when there is none. */
  sum: Response | null;
  /** Summed outputs without a driver measurement (left out of the predicted sum). */
  unmeasured: string[];
}

export class AcousticCache {
  #grid: Float64Array | null = null;
  #sampleRate = 0;
  #display = '';
  #omega: Float64Array = new Float64Array(0);
  #interpolated = new WeakMap<Measurement, { d: InterpolatedMeasurement; measured: Response }>();
  #smoothedCount = 0;
  #predicted = new WeakMap<Response, { d: InterpolatedMeasurement; offsetMs: number; r: Response }>();
  /** Each driver's complex response on the grid, per offset: a drag changes the chain only. */
  #drivers = new WeakMap<InterpolatedMeasurement, { offsetMs: number; c: ComplexResponse }>();
  #lastSum: { parts: Response[]; sum: Response } | null = null;

  /** How many measurements were smoothed and interpolated so far (tests: a drag adds none). */
  get preparedCount(): number {
    return this.#smoothedCount;
  }

  /** A measurement as drawn: smoothed, on the grid; the measured curve with full or excess phase. */
  #prepare(m: Measurement, display: MeasurementDisplay, fs: number): { d: InterpolatedMeasurement; measured: Response } {
    let hit = this.#interpolated.get(m);
    if (hit) return hit;
    this.#smoothedCount++;
    const shown = display.smoothing.kind === 'none' ? m : smoothMeasurement(m, display.smoothing);
    const grid = this.#grid!;
    const d = interpolateMeasurement(shown, grid);
    const drawn = display.phase === 'excess' && shown.delayMs !== 0 ? interpolateMeasurement({ ...shown, delayMs: 0 }, grid) : d;
    hit = { d, measured: measurementResponse(drawn, fs) };
    this.#interpolated.set(m, hit);
    return hit;
  }

  frame(f: PlanFrame, display: MeasurementDisplay = AS_STORED): AcousticFrame {
    const plan = f.plan;
    const key = displayKey(display);
    if (f.frequencies !== this.#grid || plan.sampleRate !== this.#sampleRate || key !== this.#display) {
      this.#grid = f.frequencies;
      this.#sampleRate = plan.sampleRate;
      this.#display = key;
      this.#omega = normalizedOmega(f.frequencies, plan.sampleRate);
      this.#interpolated = new WeakMap();
      this.#predicted = new WeakMap();
      this.#drivers = new WeakMap();
      this.#lastSum = null;
    }
    const fs = plan.sampleRate;
    const temperature = plan.airTemperatureC ?? DEFAULT_AIR_TEMPERATURE_C;
    const byId = new Map((plan.measurements ?? []).map((m) => [m.id, m]));
    const curves: AcousticCurve[] = [];
    f.outputs.forEach((c, index) => {
      const m = c.output.driverMeasurementId === undefined ? undefined : byId.get(c.output.driverMeasurementId);
      if (!m) return;
      const hit = this.#prepare(m, display, fs);
      const offsetMs = acousticOffsetMs(c.output.acousticOffset, temperature);
      let p = this.#predicted.get(c.response);
      if (!p || p.d !== hit.d || p.offsetMs !== offsetMs) {
        let drv = this.#drivers.get(hit.d);
        if (!drv || drv.offsetMs !== offsetMs) {
          drv = { offsetMs, c: driverOnGrid(hit.d, offsetMs, this.#omega, fs) };
          this.#drivers.set(hit.d, drv);
        }
        p = { d: hit.d, offsetMs, r: predictedFromChain(c.response, hit.d, offsetMs, this.#omega, fs, drv.c) };
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
    const systems = (plan.systemMeasurementIds ?? []).flatMap((id, index) => {
      const m = byId.get(id);
      return m ? [{ measurement: m, index, measured: this.#prepare(m, display, fs).measured }] : [];
    });
    return { curves, systems, sum, unmeasured: f.summed.filter((id) => !measuredIds.has(id)) };
  }
}
