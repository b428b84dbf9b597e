/**
 * The delay a board runs: its profile's `delayUnit` "samples" rounds each output's delay to the
 * nearest whole sample at the board's rate (as every export writes it, docs/plan-format.md "What
 * an export does with it"); "ms" keeps it as typed. A plan without a board profile has no board
 * chosen yet: its delays are the exact ones.
 */
import type { Plan } from '../plan/types';
import type { DesignedOutput } from './chain';

/** The delay (ms) the plan's board runs for `delayMs`. */
export function boardDelayMs(delayMs: number, plan: Plan): number {
  const p = plan.profile;
  if (!p || p.delayUnit === 'ms') return delayMs;
  const fs = p.sampleRate ?? plan.sampleRate;
  return (Math.round((delayMs * fs) / 1000) * 1000) / fs;
}

/** Designed outputs with the board's delays in place of the exact ones. */
export function withBoardDelays(designed: readonly DesignedOutput[], plan: Plan): DesignedOutput[] {
  return designed.map((d) => {
    const ms = boardDelayMs(d.delayMs, plan);
    return ms === d.delayMs ? d : { ...d, delayMs: ms, delaySamplesExact: (ms * plan.sampleRate) / 1000 };
  });
}

/** True when some output's board delay differs from its exact one. */
export function delaysRounded(plan: Plan): boolean {
  return plan.outputs.some((o) => boardDelayMs(o.delayMs, plan) !== o.delayMs);
}
