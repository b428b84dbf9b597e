/**
 * A fit in progress or proposed: it runs in a Web Worker (workers/fit.worker.ts) so the window
 * stays responsive; its progress, Cancel (the worker is terminated, the document untouched), and
 * the proposal, drawn as a preview until it is accepted (one undoable step) or discarded.
 */
import type { FitScope, PlanFitOptions } from '$core/fit/plan-fit';
import { readPlanValue } from '$core/plan/read';
import { planToJson } from '$core/plan/write';
import type { Plan, Target } from '$core/plan/types';
import type { FitMessage } from '../workers/fit.worker';

export type FitReport = Extract<FitMessage, { type: 'done' }>['report'];

export class FitState {
  #worker: Worker | null = null;
  #running = $state(false);
  #progress = $state(0);
  #error = $state<string | null>(null);
  /** The plan the running or proposed fit started from, and the scope it fits. */
  #base: Plan | null = null;
  #scope = $state.raw<FitScope | null>(null);
  #proposal = $state.raw<{ plan: Plan; report: FitReport } | null>(null);

  get running(): boolean {
    return this.#running;
  }
  get progress(): number {
    return this.#progress;
  }
  get error(): string | null {
    return this.#error;
  }
  get scope(): FitScope | null {
    return this.#scope;
  }
  get proposal(): { plan: Plan; report: FitReport } | null {
    return this.#proposal;
  }
  /** The plan the proposal was fitted from (accepting it over a changed plan would lose edits). */
  get base(): Plan | null {
    return this.#base;
  }

  start(plan: Plan, scope: FitScope, target: Target, options: PlanFitOptions): void {
    this.cancel();
    this.#proposal = null;
    this.#error = null;
    this.#base = plan;
    this.#scope = scope;
    this.#running = true;
    this.#progress = 0;
    const worker = new Worker(new URL('../workers/fit.worker.ts', import.meta.url), { type: 'module' });
    this.#worker = worker;
    worker.onmessage = (e: MessageEvent<FitMessage>) => {
      if (this.#worker !== worker) return;
      const m = e.data;
      if (m.type === 'progress') {
        this.#progress = m.fraction;
        return;
      }
      this.#stop();
      if (m.type === 'error') {
        this.#error = m.message;
        return;
      }
      const read = readPlanValue(m.plan);
      if (!read.ok) this.#error = read.error.message;
      else this.#proposal = { plan: read.plan, report: m.report };
    };
    worker.onerror = (e) => {
      if (this.#worker !== worker) return;
      this.#stop();
      this.#error = e.message || 'the fit stopped with an error';
    };
    worker.postMessage({ plan: planToJson(plan), scope, target, options });
  }

  #stop(): void {
    this.#worker?.terminate();
    this.#worker = null;
    this.#running = false;
  }

  /** Stops a running fit; the document is not touched. */
  cancel(): void {
    if (!this.#worker) return;
    this.#stop();
    this.#scope = this.#proposal ? this.#scope : null;
  }

  /** Forgets the proposal (after Accept, or Discard). */
  discard(): void {
    this.#proposal = null;
    this.#scope = null;
    this.#base = null;
    this.#error = null;
  }
}

export const fitState = new FitState();
