/**
 * The band fit, off the main thread: the page posts a request, the worker posts progress (at most
 * every 50 ms) and then the fitted plan with its report, or an error. Cancel is the page
 * terminating the worker: nothing it computed reaches the document.
 */
import { fitPlan, type FitScope, type PlanFitOptions } from '$core/fit/plan-fit';
import { readPlanValue } from '$core/plan/read';
import { planToJson } from '$core/plan/write';
import type { Target } from '$core/plan/types';

export interface FitRequest {
  plan: unknown;
  scope: FitScope;
  target: Target;
  options: PlanFitOptions;
}

export type FitMessage =
  | { type: 'progress'; fraction: number }
  | {
      type: 'done';
      plan: unknown;
      report: {
        levelDb: number;
        before: { rmsDb: number; maxDb: number };
        after: { rmsDb: number; maxDb: number };
        bands: number;
        budget: number;
        bound: string[];
        shortfalls: { fromHz: number; toHz: number; worstDb: number; reason: string }[];
        nulls: number;
        addedGainDb: number;
      };
    }
  | { type: 'error'; message: string };

const worker = self as unknown as { onmessage: ((e: MessageEvent<FitRequest>) => void) | null; postMessage(m: FitMessage): void };

worker.onmessage = (e) => {
  const req = e.data;
  const read = readPlanValue(req.plan);
  if (!read.ok) {
    worker.postMessage({ type: 'error', message: read.error.message });
    return;
  }
  let last = 0;
  try {
    const fit = fitPlan(read.plan, req.scope, req.target, req.options, {
      progress: (fraction) => {
        const now = performance.now();
        if (now - last < 50 && fraction < 1) return;
        last = now;
        worker.postMessage({ type: 'progress', fraction });
      },
    });
    const r = fit.result;
    worker.postMessage({
      type: 'done',
      plan: planToJson(fit.plan),
      report: {
        levelDb: r.levelDb,
        before: r.before,
        after: r.after,
        bands: r.bands.length,
        budget: fit.setup.budget,
        bound: r.bound,
        shortfalls: r.shortfalls,
        nulls: r.nulls.length,
        addedGainDb: r.addedGainDb,
      },
    });
  } catch (err) {
    worker.postMessage({ type: 'error', message: (err as Error).message });
  }
};
