/**
 * Edits of a plan's measurements as pure functions, like src/ui/edits.ts: add one from an
 * imported file, replace its data (a WAV file read again with another gate or channel), rename,
 * remove, and say what it measures (one output's driver, the system, or nothing yet); and the
 * plan's air temperature. Each result goes through the plan reader, so the rules of
 * docs/plan-format.md ("Measurement") hold: a measurement is of drivers or of the system, never
 * both, and every reference names a measurement of the plan.
 */
import { measurementId, planMeasurementName, toPlanMeasurement } from '../measure/plan-measurement';
import type { MeasuredResponse } from '../measure/types';
import { diagnostic } from '../diagnostics';
import { LIMITS, PLAN_VERSION, type Measurement, type MeasurementKind, type Plan } from '../plan/types';
import { validated, type EditResult } from './edits';
import { parsePlainNumber, type Parsed } from './units';

/** What a measurement is used as: one output's driver, the system, or nothing (kept in the plan only). */
export type MeasurementUse = { kind: 'driver'; outputId: string } | { kind: 'system' } | { kind: 'none' };

const refused = (reason: string) => ({ ok: false as const, diagnostic: diagnostic('edit-refused', 'error', { kind: 'plan' }, { reason }) });

/**
 * How `id` is used now. A measurement serving several outputs' drivers (a plan file may say so)
 * reports the first of them.
 */
export function measurementUse(plan: Plan, id: string): MeasurementUse {
  if ((plan.systemMeasurementIds ?? []).includes(id)) return { kind: 'system' };
  const out = plan.outputs.find((o) => o.driverMeasurementId === id);
  return out ? { kind: 'driver', outputId: out.id } : { kind: 'none' };
}

/** The system measurements, in the plan's order. */
export function systemMeasurements(plan: Plan): Measurement[] {
  const byId = new Map((plan.measurements ?? []).map((m) => [m.id, m]));
  return (plan.systemMeasurementIds ?? []).flatMap((id) => byId.get(id) ?? []);
}

/** The plan with `id` used as `use`: taken off every other use first (an output's old driver measurement stays in the plan). */
function withUse(plan: Plan, id: string, use: MeasurementUse): Plan {
  const system = (plan.systemMeasurementIds ?? []).filter((x) => x !== id);
  if (use.kind === 'system') system.push(id);
  const outputs = plan.outputs.map((o) => {
    const mine = use.kind === 'driver' && o.id === use.outputId;
    if (mine) return o.driverMeasurementId === id ? o : { ...o, driverMeasurementId: id };
    if (o.driverMeasurementId !== id) return o;
    const rest = { ...o };
    delete rest.driverMeasurementId;
    return rest;
  });
  const next: Plan = { ...plan, version: PLAN_VERSION, outputs };
  if (system.length > 0) next.systemMeasurementIds = system;
  else delete next.systemMeasurementIds;
  return next;
}

/**
 * Adds an imported measurement (a new id from its name) used as `use`. The result carries the
 * new id.
 */
export function addMeasurement(plan: Plan, m: MeasuredResponse, source: { fileName: string; kind: MeasurementKind }, use: MeasurementUse): EditResult & { measurementId?: string } {
  const list = plan.measurements ?? [];
  if (list.length >= LIMITS.measurementsMax) return refused(`a plan holds at most ${LIMITS.measurementsMax} measurements; remove one first`);
  if (use.kind === 'driver' && !plan.outputs.some((o) => o.id === use.outputId)) return refused(`no output "${use.outputId}"`);
  const id = measurementId(plan, m.name);
  const added = toPlanMeasurement(m, id, source);
  const r = validated(withUse({ ...plan, measurements: [...list, added] }, id, use));
  return r.ok ? { ...r, measurementId: id } : r;
}

function update(plan: Plan, id: string, change: (m: Measurement) => Measurement): EditResult {
  const list = plan.measurements ?? [];
  const i = list.findIndex((m) => m.id === id);
  if (i < 0) return refused(`no measurement "${id}"`);
  return validated({ ...plan, measurements: list.map((m, j) => (j === i ? change(m) : m)) });
}

/** Replaces the data of `id` (frequencies, levels, phase, delay, notes); its id, name, source and uses stay. */
export function replaceMeasurementData(plan: Plan, id: string, m: MeasuredResponse): EditResult {
  return update(plan, id, (old) => ({ ...toPlanMeasurement(m, old.id, old.source), name: old.name }));
}

export function renameMeasurement(plan: Plan, id: string, name: string): EditResult {
  if (name.trim() === '') return refused('a measurement needs a name');
  return update(plan, id, (m) => ({ ...m, name: planMeasurementName(name) }));
}

/** Uses `id` as `use` (an output's driver, the system, or nothing). */
export function setMeasurementUse(plan: Plan, id: string, use: MeasurementUse): EditResult {
  if (!(plan.measurements ?? []).some((m) => m.id === id)) return refused(`no measurement "${id}"`);
  if (use.kind === 'driver' && !plan.outputs.some((o) => o.id === use.outputId)) return refused(`no output "${use.outputId}"`);
  return validated(withUse(plan, id, use));
}

/** Removes `id` and every reference to it (outputs' drivers, the system list). */
export function removeMeasurement(plan: Plan, id: string): EditResult {
  const list = plan.measurements ?? [];
  if (!list.some((m) => m.id === id)) return refused(`no measurement "${id}"`);
  const next = withUse(plan, id, { kind: 'none' });
  const rest = list.filter((m) => m.id !== id);
  if (rest.length > 0) next.measurements = rest;
  else delete next.measurements;
  return validated(next);
}

/** The plan's air temperature in degrees Celsius; undefined goes back to the default (20). */
export function setAirTemperature(plan: Plan, celsius: number | undefined): EditResult {
  const next: Plan = { ...plan, version: PLAN_VERSION };
  if (celsius === undefined) delete next.airTemperatureC;
  else next.airTemperatureC = celsius;
  return validated(next);
}

/** A gate time as typed: "2", "2 ms", "0,5 ms" (ms; "s" and "us" also read), >= 0. */
export function parseGateMs(text: string): Parsed {
  const t = text.trim().toLowerCase().replace(/\s+/g, '').replace(/,/g, '.');
  const m = /^(.*?)(ms|us|\u00b5s|s)?$/.exec(t)!;
  const n = parsePlainNumber(m[1]);
  if (!n.ok) return { ok: false, reason: `"${text.trim()}" is not a time (try 2 ms)` };
  const ms = n.value * (m[2] === 's' ? 1000 : m[2] === 'us' || m[2] === '\u00b5s' ? 1e-3 : 1);
  if (!(ms >= 0)) return { ok: false, reason: 'a gate time is 0 ms or more' };
  return { ok: true, value: ms };
}

/** An air temperature as typed: "20", "20 C", "20 °C", "-5" (degrees Celsius, within the contract's range). */
export function parseAirTemperatureC(text: string): Parsed {
  const t = text.trim().replace(/\u2212/g, '-').replace(/,/g, '.').replace(/\s*(\u00b0\s*c|c|\u00b0)$/i, '');
  const n = parsePlainNumber(t);
  if (!n.ok) return { ok: false, reason: `"${text.trim()}" is not a temperature (try 20 °C)` };
  if (n.value < LIMITS.airTemperatureCMin || n.value > LIMITS.airTemperatureCMax) {
    return { ok: false, reason: `air temperature must be from ${LIMITS.airTemperatureCMin} to ${LIMITS.airTemperatureCMax} °C` };
  }
  return { ok: true, value: n.value };
}
