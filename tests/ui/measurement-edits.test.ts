// Edits of a plan's measurements (src/ui/measurement-edits.ts) keep the contract of
// docs/plan-format.md ("Measurement"): every reference names a measurement of the plan, a
// measurement is of drivers or of the system, never both, and the result is read back by the
// plan reader. The field parsers refuse what the contract refuses (air temperature -40 .. 60 °C).
import { describe, expect, it } from 'vitest';
import { readPlanValue } from '../../src/plan/read';
import { LIMITS, type Plan } from '../../src/plan/types';
import type { MeasuredResponse } from '../../src/measure/types';
import type { EditResult } from '../../src/ui/edits';
import { speedOfSoundMps } from '../../src/measure/acoustic';
import {
  addMeasurement,
  measurementUse,
  parseAirTemperatureC,
  parseGateMs,
  removeMeasurement,
  renameMeasurement,
  replaceMeasurementData,
  setAirTemperature,
  setMeasurementUse,
  systemMeasurements,
} from '../../src/ui/measurement-edits';

const PLAN: Plan = {
  format: 'biquadrant.plan',
  version: 3,
  name: 'Two-way, invented',
  sampleRate: 48000,
  input: { bands: [] },
  outputs: ['woofer', 'tweeter'].map((id) => ({ id, name: id, gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [] })),
} as Plan;

const FLAT: MeasuredResponse = { name: 'Near field: woofer', frequencyHz: [100, 1000, 10000], magnitudeDb: [0, 1, 2], phaseDeg: null, phaseEstimated: false, delayMs: 0, notes: ['# invented'] };

function ok<T extends EditResult>(r: T): Extract<T, { ok: true }> {
  if (!r.ok) throw new Error(JSON.stringify(r.diagnostic));
  expect(readPlanValue(r.plan).ok).toBe(true);
  return r as Extract<T, { ok: true }>;
}
const reason = (r: EditResult) => (r.ok ? null : (r.diagnostic.values as { reason?: string }).reason);

describe('adding a measurement', () => {
  it('adds it with an id from its name, as a system measurement or an output driver, and leaves the given plan alone', () => {
    const a = ok(addMeasurement(PLAN, FLAT, { fileName: 'C:\\data\\wf.txt', kind: 'text' }, { kind: 'system' }));
    expect(a.measurementId).toBe('near-field-woofer');
    expect(a.plan.measurements![0]).toMatchObject({ id: 'near-field-woofer', name: 'Near field: woofer', source: { fileName: 'wf.txt', kind: 'text' } });
    expect(a.plan.systemMeasurementIds).toEqual(['near-field-woofer']);
    expect(PLAN.measurements).toBeUndefined();
    const b = ok(addMeasurement(a.plan, FLAT, { fileName: 'wf.txt', kind: 'text' }, { kind: 'driver', outputId: 'woofer' }));
    expect(b.measurementId).toBe('near-field-woofer-2');
    expect(b.plan.outputs[0].driverMeasurementId).toBe('near-field-woofer-2');
    expect(measurementUse(b.plan, 'near-field-woofer-2')).toEqual({ kind: 'driver', outputId: 'woofer' });
    expect(systemMeasurements(b.plan).map((m) => m.id)).toEqual(['near-field-woofer']);
  });

  it('refuses an unknown output, a measurement the reader refuses (its field path), and more than the contract holds', () => {
    expect(reason(addMeasurement(PLAN, FLAT, { fileName: 'x', kind: 'text' }, { kind: 'driver', outputId: 'mid' }))).toMatch(/no output "mid"/);
    const r = addMeasurement(PLAN, { ...FLAT, magnitudeDb: [0, 1, 2000] }, { fileName: 'x', kind: 'text' }, { kind: 'none' });
    expect(r.ok).toBe(false);
    expect(r.ok ? '' : JSON.stringify(r.diagnostic.target)).toMatch(/measurements\[0\]\.magnitudeDb/);
    let p = PLAN;
    for (let i = 0; i < LIMITS.measurementsMax; i++) p = ok(addMeasurement(p, FLAT, { fileName: 'x', kind: 'text' }, { kind: 'none' })).plan;
    expect(reason(addMeasurement(p, FLAT, { fileName: 'x', kind: 'text' }, { kind: 'none' }))).toMatch(/at most 64 measurements/);
  });
});

describe('using, renaming, replacing and removing', () => {
  const base = ok(addMeasurement(PLAN, FLAT, { fileName: 'wf.txt', kind: 'text' }, { kind: 'driver', outputId: 'woofer' })).plan;
  const id = base.measurements![0].id;

  it('a measurement moves between uses, never a driver and the system at once', () => {
    const sys = ok(setMeasurementUse(base, id, { kind: 'system' })).plan;
    expect(sys.outputs[0].driverMeasurementId).toBeUndefined();
    expect(sys.systemMeasurementIds).toEqual([id]);
    const tw = ok(setMeasurementUse(sys, id, { kind: 'driver', outputId: 'tweeter' })).plan;
    expect(tw.systemMeasurementIds).toBeUndefined();
    expect(tw.outputs.map((o) => o.driverMeasurementId)).toEqual([undefined, id]);
    const none = ok(setMeasurementUse(tw, id, { kind: 'none' })).plan;
    expect(measurementUse(none, id)).toEqual({ kind: 'none' });
    expect(none.measurements).toHaveLength(1);
  });

  it('rename keeps the id and refuses an empty name; replacing the data keeps id, name, source and use', () => {
    const r = ok(renameMeasurement(base, id, '  Woofer, 1 m  ')).plan;
    expect(r.measurements![0]).toMatchObject({ id, name: 'Woofer, 1 m' });
    expect(reason(renameMeasurement(base, id, '   '))).toMatch(/needs a name/);
    const next = ok(replaceMeasurementData(r, id, { ...FLAT, name: 'other', magnitudeDb: [3, 4, 5], delayMs: 1.5 })).plan;
    expect(next.measurements![0]).toMatchObject({ id, name: 'Woofer, 1 m', source: { fileName: 'wf.txt', kind: 'text' }, magnitudeDb: [3, 4, 5], delayMs: 1.5 });
    expect(next.outputs[0].driverMeasurementId).toBe(id);
  });

  it('remove takes every reference with it; the last one leaves no empty list', () => {
    const sys = ok(addMeasurement(base, FLAT, { fileName: 'room.txt', kind: 'text' }, { kind: 'system' }));
    const r1 = ok(removeMeasurement(sys.plan, id)).plan;
    expect(r1.outputs[0].driverMeasurementId).toBeUndefined();
    expect(r1.measurements!.map((m) => m.id)).toEqual([sys.measurementId]);
    const r2 = ok(removeMeasurement(r1, sys.measurementId!)).plan;
    expect(r2.measurements).toBeUndefined();
    expect(r2.systemMeasurementIds).toBeUndefined();
    expect(reason(removeMeasurement(r2, 'gone'))).toMatch(/no measurement "gone"/);
  });
});

describe('air temperature and the fields', () => {
  it('sets and clears the plan field; the contract range is -40 .. 60 °C', () => {
    const warm = ok(setAirTemperature(PLAN, 30)).plan;
    expect(warm.airTemperatureC).toBe(30);
    expect(ok(setAirTemperature(warm, undefined)).plan.airTemperatureC).toBeUndefined();
    expect(setAirTemperature(PLAN, 61).ok).toBe(false);
    // c = 331.3 sqrt(1 + T/273.15): 349.0 m/s at 30 °C (ideal-gas approximation, docs/references.md).
    expect(speedOfSoundMps(30)).toBeCloseTo(349.0, 1);
  });

  it('parses temperatures and gate times as typed', () => {
    expect(parseAirTemperatureC('20')).toEqual({ ok: true, value: 20 });
    expect(parseAirTemperatureC('-5,5 °C')).toEqual({ ok: true, value: -5.5 });
    expect(parseAirTemperatureC('25 C')).toEqual({ ok: true, value: 25 });
    expect(parseAirTemperatureC('70').ok).toBe(false);
    expect(parseAirTemperatureC('warm').ok).toBe(false);
    expect(parseGateMs('2')).toEqual({ ok: true, value: 2 });
    expect(parseGateMs('0,5 ms')).toEqual({ ok: true, value: 0.5 });
    expect(parseGateMs('0.1 s')).toEqual({ ok: true, value: 100 });
    expect(parseGateMs('500 us')).toEqual({ ok: true, value: 0.5 });
    expect(parseGateMs('-1').ok).toBe(false);
    expect(parseGateMs('five').ok).toBe(false);
  });
});

describe('edits that keep the measurement list (a drag frame) still check the references', () => {
  it('a kept list is not read again, but a reference to a measurement it lacks is refused; a new list is read in full', async () => {
    const { updateOutput, validated } = await import('../../src/ui/edits');
    const p = ok(addMeasurement(PLAN, FLAT, { fileName: 'wf.txt', kind: 'text' }, { kind: 'system' })).plan;
    expect(validated({ ...p, name: 'renamed' }).ok).toBe(true);
    const dangling = updateOutput(p, 'woofer', { driverMeasurementId: 'nothing' });
    expect(dangling.ok ? '' : JSON.stringify(dangling.diagnostic)).toMatch(/driverMeasurementId/);
    const both = updateOutput(p, 'woofer', { driverMeasurementId: p.measurements![0].id });
    expect(both.ok ? '' : JSON.stringify(both.diagnostic)).toMatch(/systemMeasurementIds/);
    const bad = validated({ ...p, measurements: [{ ...p.measurements![0], delayMs: Number.NaN }] });
    expect(bad.ok).toBe(false);
  });
});
