/**
 * Writing a plan: UTF-8 JSON, 2-space indent, one stable key order (the order of the contract),
 * so plans diff well under version control. Optional band fields are written when set.
 */
import type { Band, BoardProfile, Crossover, Measurement, Output, Plan, Target } from './types';

function edge(e: Crossover | null): Record<string, unknown> | null {
  if (!e) return null;
  const o: Record<string, unknown> = { family: e.family, order: e.order, frequency: e.frequency };
  if (e.normalization !== undefined) o.normalization = e.normalization;
  return o;
}

function band(b: Band): Record<string, unknown> {
  const o: Record<string, unknown> = { id: b.id, type: b.type, frequency: b.frequency };
  if (b.gainDb !== undefined) o.gainDb = b.gainDb;
  if (b.q !== undefined) o.q = b.q;
  if (b.slope !== undefined) o.slope = b.slope;
  o.enabled = b.enabled;
  if (b.coefficients) {
    const c = b.coefficients;
    o.coefficients = { b0: c.b0, b1: c.b1, b2: c.b2, a0: c.a0, a1: c.a1, a2: c.a2 };
  }
  // Version 3, written only when set.
  if (b.design !== undefined) o.design = b.design;
  if (b.fitted !== undefined) o.fitted = b.fitted;
  if (b.locked !== undefined) o.locked = b.locked;
  return o;
}

function output(x: Output): Record<string, unknown> {
  const o: Record<string, unknown> = {
    id: x.id,
    name: x.name,
  };
  // Version 3, written only when set: without it the export name follows the output's name.
  if (x.exportName !== undefined) o.exportName = x.exportName;
  Object.assign(o, {
    gainDb: x.gainDb,
    delayMs: x.delayMs,
    invert: x.invert,
    mute: x.mute,
    highPass: edge(x.highPass),
    lowPass: edge(x.lowPass),
    bands: x.bands.map(band),
  });
  // Version 3, written only when set: an output of an older file is written as it was read.
  if (x.driverMeasurementId !== undefined) o.driverMeasurementId = x.driverMeasurementId;
  if (x.acousticOffset !== undefined) o.acousticOffset = { value: x.acousticOffset.value, unit: x.acousticOffset.unit };
  return o;
}

/** A measurement as a plain object in the contract's key order (every field written). */
export function measurementToJson(m: Measurement): Record<string, unknown> {
  return {
    id: m.id,
    name: m.name,
    source: { fileName: m.source.fileName, kind: m.source.kind },
    frequencyHz: [...m.frequencyHz],
    magnitudeDb: [...m.magnitudeDb],
    phaseDeg: m.phaseDeg === null ? null : [...m.phaseDeg],
    phaseEstimated: m.phaseEstimated,
    delayMs: m.delayMs,
    notes: [...m.notes],
  };
}

/** The plan as a plain object in the file's key order. */
export function planToJson(plan: Plan): Record<string, unknown> {
  const o: Record<string, unknown> = { format: plan.format, version: plan.version, name: plan.name };
  if (plan.notes !== undefined) o.notes = plan.notes;
  o.sampleRate = plan.sampleRate;
  o.input = { bands: plan.input.bands.map(band) };
  o.outputs = plan.outputs.map(output);
  // Version 2: written last, so a migrated version 1 file diffs only by its version and this block.
  if (plan.profile) o.profile = profileToJson(plan.profile);
  // Version 3, after the profile, each only when set: a migrated older file diffs by its version
  // line alone. The measurements go last, as they are the bulk of the file.
  if (plan.airTemperatureC !== undefined) o.airTemperatureC = plan.airTemperatureC;
  if (plan.systemMeasurementIds !== undefined) o.systemMeasurementIds = [...plan.systemMeasurementIds];
  if (plan.defaultDesign !== undefined) o.defaultDesign = plan.defaultDesign;
  if (plan.targets !== undefined) o.targets = plan.targets.map(targetToJson);
  if (plan.measurements !== undefined) o.measurements = plan.measurements.map(measurementToJson);
  return o;
}

/** A target as a plain object in the contract's key order (optional fields only when set). */
export function targetToJson(t: Target): Record<string, unknown> {
  const o: Record<string, unknown> = { scope: t.scope };
  if (t.outputId !== undefined) o.outputId = t.outputId;
  o.parts = t.parts.map((p) => (p.kind === 'points' ? { kind: p.kind, points: p.points.map(([f, db]) => [f, db]) } : { ...p }));
  o.alignment = t.alignment;
  if (t.levelDb !== undefined) o.levelDb = t.levelDb;
  if (t.fromHz !== undefined) o.fromHz = t.fromHz;
  if (t.toHz !== undefined) o.toHz = t.toHz;
  o.toleranceDb = t.toleranceDb;
  return o;
}

/** A board profile as a plain object in the contract's key order (every field written). */
export function profileToJson(p: BoardProfile): Record<string, unknown> {
  const n = p.number;
  const number =
    n.kind === 'decimal'
      ? { kind: n.kind, significantDigits: n.significantDigits }
      : { kind: n.kind, integerBits: n.integerBits, fractionBits: n.fractionBits, wordBits: n.wordBits, notation: n.notation };
  return {
    name: p.name,
    sampleRate: p.sampleRate,
    order: [...p.order],
    feedbackSign: p.feedbackSign,
    writeA0: p.writeA0,
    number,
    coefficientScale: p.coefficientScale,
    gain: p.gain,
    delayUnit: p.delayUnit,
    maxDelaySamples: p.maxDelaySamples,
    sectionBudget: p.sectionBudget,
  };
}

/** The file text, ending with a newline. */
export function writePlanText(plan: Plan): string {
  return JSON.stringify(planToJson(plan), null, 2) + '\n';
}
