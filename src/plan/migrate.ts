/**
 * Migration of older plan versions to the current one, one step per version, so a reader only
 * ever validates the current shape. A step must keep every field.
 *
 * 1 -> 2: version 2 adds the optional board profile (`profile`). A version 1 plan has none, so
 * every field is kept as it is and no profile is added (the export falls back to the default).
 *
 * 2 -> 3: version 3 adds an output's optional export name (`exportName`). Without it the export
 * name is a slug of the output's name, so the step only adds defaults: every field is kept.
 */
import { PLAN_VERSION } from './types';

type Step = (plan: Record<string, unknown>) => Record<string, unknown>;

/** steps[v] turns a version v plan into version v + 1. */
const steps: Record<number, Step> = {
  1: (plan) => ({ ...plan }),
  2: (plan) => ({ ...plan }),
};

export function migrate(plan: Record<string, unknown>, fromVersion: number): Record<string, unknown> {
  let current = plan;
  for (let v = fromVersion; v < PLAN_VERSION; v++) {
    const step = steps[v];
    if (!step) throw new Error(`no migration from plan version ${v}`);
    current = { ...step(current), version: v + 1 };
  }
  return current;
}
