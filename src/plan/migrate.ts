/**
 * Migration of older plan versions to the current one, one step per version, so a reader only
 * ever validates the current shape. A step must keep every field.
 *
 * 1 -> 2: version 2 adds the optional board profile (`profile`). A version 1 plan has none, so
 * every field is kept as it is and no profile is added (the export falls back to the default).
 * 2 -> 3: version 3 adds optional fields only (the measurements, each output's driver measurement,
 * acoustic offset and export name, the system measurements, the air temperature). A version 2 plan has none,
 * so every field is kept as it is and nothing is added: absent means "none" (and 20 degrees C).
 *
 * Adding an optional field to the current version takes no new step: add it to `FIELDS_SINCE`
 * (so an older file that carries it is refused rather than read as something it is not), to the
 * reader's allowed keys and checks, and to the writer (written only when set, so re-saved older
 * files diff only by their version line). A new version with a required field, or a changed
 * meaning, needs a step here that fills it in from the older shape.
 */
import { PLAN_VERSION } from './types';

type Step = (plan: Record<string, unknown>) => Record<string, unknown>;

/** steps[v] turns a version v plan into version v + 1. */
const steps: Record<number, Step> = {
  1: (plan) => ({ ...plan }),
  2: (plan) => ({ ...plan }),
};

/**
 * The version that introduced each optional field, per object of the plan. A file of an older
 * version that carries one is refused at that field's path: it was not written by a build that
 * knew the field, so its meaning is not the one this build would give it.
 */
export const FIELDS_SINCE = {
  plan: { profile: 2, airTemperatureC: 3, measurements: 3, systemMeasurementIds: 3, defaultDesign: 3, targets: 3 } as Record<string, number>,
  output: { driverMeasurementId: 3, acousticOffset: 3, exportName: 3 } as Record<string, number>,
  band: { design: 3, fitted: 3, locked: 3 } as Record<string, number>,
};

/** What each version added, for the refusal's message. */
export const VERSION_ADDED: Record<number, string> = {
  2: 'board profiles',
  3: 'measurements, targets, fitted and locked bands, acoustic offsets, export names, the air temperature and design methods',
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
