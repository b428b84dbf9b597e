/**
 * Migration of older plan versions to the current one, one step per version, so a reader only
 * ever validates the current shape. Version 1 is the first: there is nothing to migrate yet; the
 * step table is where version 2 will put its `1 -> 2` function. A step must keep every field.
 */
import { PLAN_VERSION } from './types';

type Step = (plan: Record<string, unknown>) => Record<string, unknown>;

/** steps[v] turns a version v plan into version v + 1. */
const steps: Record<number, Step> = {};

export function migrate(plan: Record<string, unknown>, fromVersion: number): Record<string, unknown> {
  let current = plan;
  for (let v = fromVersion; v < PLAN_VERSION; v++) {
    const step = steps[v];
    if (!step) throw new Error(`no migration from plan version ${v}`);
    current = { ...step(current), version: v + 1 };
  }
  return current;
}
