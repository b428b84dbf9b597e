/**
 * A measured response as the plan keeps it (docs/plan-format.md, "Measurement"): an id unique
 * in the plan, the source file's name and kind, and notes trimmed to the contract's limits. The
 * command line's `attach` and the app's import build their measurements here, so both give a file
 * the same id and the same notes.
 */
import { LIMITS, type Measurement, type MeasurementKind, type Plan } from '../plan/types';
import type { MeasuredResponse } from './types';

/**
 * A measurement id for `name`, unique in the plan: lower case, runs of other characters turned
 * into "-", at most 32 characters, "-2", "-3", ... appended on a clash.
 */
export function measurementId(plan: Plan, name: string): string {
  const taken = new Set((plan.measurements ?? []).map((m) => m.id));
  const base =
    name
      .toLowerCase()
      .replace(/[^a-z0-9_-]+/g, '-')
      .replace(/^-+|-+$/g, '')
      .slice(0, 32) || 'measurement';
  if (!taken.has(base)) return base;
  for (let k = 2; ; k++) {
    const suffix = `-${k}`;
    const id = base.slice(0, 32 - suffix.length) + suffix;
    if (!taken.has(id)) return id;
  }
}

/**
 * Notes as the plan keeps them: at most LIMITS.measurementNotesMax lines of at most
 * LIMITS.measurementNoteMaxLength characters, control characters (tabs aside) shown as spaces.
 * Notes are a file's header lines, not data, so trimming them loses nothing measured.
 */
export function planNotes(notes: readonly string[]): string[] {
  return notes
    .slice(0, LIMITS.measurementNotesMax)
    .map((n) => n.replace(/[\u0000-\u0008\u000a-\u001f\u007f-\u009f\u2028\u2029]/g, ' ').slice(0, LIMITS.measurementNoteMaxLength));
}

/** A name as the plan keeps it: one line, at most LIMITS.nameMaxLength characters, never empty. */
export function planMeasurementName(name: string): string {
  const one = name.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, ' ').trim().slice(0, LIMITS.nameMaxLength);
  return one === '' ? 'measurement' : one;
}

/** `m` as a plan measurement with id `id`, copied (the caller's arrays are not shared). */
export function toPlanMeasurement(m: MeasuredResponse, id: string, source: { fileName: string; kind: MeasurementKind }): Measurement {
  return {
    id,
    name: planMeasurementName(m.name),
    source: { fileName: (source.fileName.split(/[\\/]/).pop() ?? '').slice(0, 255), kind: source.kind },
    frequencyHz: m.frequencyHz.slice(),
    magnitudeDb: m.magnitudeDb.slice(),
    phaseDeg: m.phaseDeg === null ? null : m.phaseDeg.slice(),
    phaseEstimated: m.phaseEstimated,
    delayMs: m.delayMs,
    notes: planNotes(m.notes),
  };
}
