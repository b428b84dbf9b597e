/**
 * Plan version 3 (measurements, driver references, acoustic offsets, air temperature), against the
 * contract in docs/plan-format.md: version 2 files open unchanged and are written as version 3
 * differing only in the version line; every version 3 field round-trips; every bad field is
 * refused with its path; a dangling or doubled reference is refused; a version 2 file carrying a
 * version 3 field is refused at that field.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readPlanText, readPlanValue, type PlanError } from '../../src/plan/read';
import { LIMITS, PLAN_VERSION } from '../../src/plan/types';
import { planToJson, writePlanText } from '../../src/plan/write';

/** A valid version 2 document with a profile (every version 2 field present). */
function v2(): Record<string, any> {
  return {
    format: 'biquadrant.plan',
    version: 2,
    name: 'Two-way',
    notes: 'n',
    sampleRate: 48000,
    input: { bands: [{ id: 'b1', type: 'peaking', frequency: 63, gainDb: -4, q: 4, enabled: true }] },
    outputs: [
      { id: 'woofer', name: 'Woofer', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2200 }, bands: [] },
      { id: 'tweeter', name: 'Tweeter', gainDb: -2, delayMs: 0.1, invert: true, mute: false, highPass: { family: 'linkwitz-riley', order: 4, frequency: 2200 }, lowPass: null, bands: [] },
    ],
    profile: {
      name: 'Board',
      sampleRate: null,
      order: ['b0', 'b1', 'b2', 'a1', 'a2'],
      feedbackSign: 'negated',
      writeA0: false,
      number: { kind: 'decimal', significantDigits: null },
      coefficientScale: 1,
      gain: 'separate',
      delayUnit: 'samples',
      maxDelaySamples: null,
      sectionBudget: 10,
    },
  };
}

function measurement(id: string, extra: Record<string, unknown> = {}): Record<string, any> {
  return {
    id,
    name: `Measured ${id}`,
    source: { fileName: `${id}.txt`, kind: 'text' },
    frequencyHz: [20, 100, 1000, 20000],
    magnitudeDb: [-10, 0, 0.5, -3],
    phaseDeg: [170, 30, -20, -400],
    phaseEstimated: false,
    delayMs: 2.9,
    notes: ['invented data', 'col\tumns'],
    ...extra,
  };
}

/** A valid version 3 document using every version 3 field. */
function v3(): Record<string, any> {
  const p = v2();
  p.version = 3;
  p.outputs[0].driverMeasurementId = 'wf';
  p.outputs[0].acousticOffset = { value: 25, unit: 'mm' };
  p.outputs[1].driverMeasurementId = 'tw';
  p.outputs[1].acousticOffset = { value: -0.05, unit: 'ms' };
  p.airTemperatureC = 24.5;
  p.systemMeasurementIds = ['room'];
  p.measurements = [
    measurement('wf'),
    measurement('tw', { phaseEstimated: true, source: { fileName: 'tw.wav', kind: 'wav' } }),
    measurement('room', { phaseDeg: null, delayMs: 0, notes: [], source: { fileName: '', kind: 'generated' } }),
  ];
  return p;
}

function errorOf(edit: (p: Record<string, any>) => void, base = v3): PlanError {
  const p = base();
  edit(p);
  const r = readPlanValue(p);
  if (r.ok) throw new Error('expected the plan to be refused');
  return r.error;
}

describe('version 2 files open unchanged and are saved as version 3', () => {
  it('the current version is 3', () => expect(PLAN_VERSION).toBe(3));

  it('a version 2 file with a profile: every field kept, only the version line changes', () => {
    const doc = v2();
    const r = readPlanValue(doc);
    if (!r.ok) throw r.error;
    expect(r.plan.version).toBe(3);
    expect(r.plan.measurements).toBeUndefined();
    expect(r.plan.airTemperatureC).toBeUndefined();
    expect(planToJson(r.plan)).toEqual({ ...doc, version: 3 });
    // and as text: the very same lines but the version's
    const before = JSON.stringify(doc, null, 2).split('\n');
    const after = writePlanText(r.plan).trimEnd().split('\n');
    expect(after.length).toBe(before.length);
    const changed = after.filter((line, i) => line !== before[i]);
    expect(changed).toEqual(['  "version": 3,']);
  });

  it('a version 1 file migrates through 2 to 3', () => {
    const doc = v2();
    doc.version = 1;
    delete doc.profile;
    const r = readPlanValue(doc);
    if (!r.ok) throw r.error;
    expect(planToJson(r.plan)).toEqual({ ...doc, version: 3 });
  });

  it.each([
    ['airTemperatureC', (p: any) => (p.airTemperatureC = 20)],
    ['measurements', (p: any) => (p.measurements = [])],
    ['systemMeasurementIds', (p: any) => (p.systemMeasurementIds = [])],
    ['outputs[1].driverMeasurementId', (p: any) => (p.outputs[1].driverMeasurementId = 'x')],
    ['outputs[0].acousticOffset', (p: any) => (p.outputs[0].acousticOffset = { value: 1, unit: 'mm' })],
  ])('a version 2 file carrying %s is refused there (it came with version 3)', (path, edit) => {
    const e = errorOf(edit, v2);
    expect(e.path).toBe(path);
    expect(e.message).toMatch(/not a field of plan version 2.*came with version 3/);
  });

  it('a version 1 file with a measurement is refused at it, as one with a profile still is', () => {
    const e = errorOf((p) => {
      p.version = 1;
      delete p.profile;
      p.measurements = [];
    }, v2);
    expect(e.path).toBe('measurements');
    expect(errorOf((p) => (p.version = 1), v2).message).toMatch(/^profile: is not a field of plan version 1 \(board profiles came with version 2\)/);
  });
});

describe('version 3 round trips', () => {
  it('every field reads as written and writes back identically', () => {
    const doc = v3();
    const r = readPlanValue(doc);
    if (!r.ok) throw r.error;
    expect(r.plan.measurements?.map((m) => m.id)).toEqual(['wf', 'tw', 'room']);
    expect(r.plan.outputs[0].acousticOffset).toEqual({ value: 25, unit: 'mm' });
    expect(planToJson(r.plan)).toEqual(doc);
    const text = writePlanText(r.plan);
    const again = readPlanText(text);
    expect(again.ok && again.plan).toEqual(r.plan);
    expect(again.ok && writePlanText(again.plan)).toBe(text);
  });

  it('key order: version 3 plan fields follow the profile, measurements last; output fields after bands', () => {
    const r = readPlanValue(v3());
    if (!r.ok) throw r.error;
    const json = planToJson(r.plan);
    expect(Object.keys(json)).toEqual(['format', 'version', 'name', 'notes', 'sampleRate', 'input', 'outputs', 'profile', 'airTemperatureC', 'systemMeasurementIds', 'measurements']);
    expect(Object.keys((json.outputs as any[])[0]).slice(-3)).toEqual(['bands', 'driverMeasurementId', 'acousticOffset']);
    expect(Object.keys((json.measurements as any[])[0])).toEqual(['id', 'name', 'source', 'frequencyHz', 'magnitudeDb', 'phaseDeg', 'phaseEstimated', 'delayMs', 'notes']);
  });

  it('defaults: name = id, phase null, not estimated, delay 0, no notes', () => {
    const r = readPlanValue({ ...v2(), version: 3, measurements: [{ id: 'm', source: { fileName: 'm.csv', kind: 'text' }, frequencyHz: [1, 2], magnitudeDb: [0, 0] }] });
    if (!r.ok) throw r.error;
    expect(r.plan.measurements![0]).toEqual({ id: 'm', name: 'm', source: { fileName: 'm.csv', kind: 'text' }, frequencyHz: [1, 2], magnitudeDb: [0, 0], phaseDeg: null, phaseEstimated: false, delayMs: 0, notes: [] });
  });

  it('a measurement may be attached to nothing (imported, shown, not yet assigned)', () => {
    const r = readPlanValue({ ...v2(), version: 3, measurements: [measurement('loose')] });
    expect(r.ok).toBe(true);
  });

  it('random valid measurements round-trip exactly (fast-check)', () => {
    // JSON has no -0 (it reads back as 0, the same number), so the arbitrary leaves it out.
    const dbl = (min: number, max: number) => fc.double({ min, max, noNaN: true }).map((x) => (x === 0 ? 0 : x));
    const point = fc.tuple(dbl(0.001, 1e5), dbl(-300, 300), dbl(-1e6, 1e6));
    fc.assert(
      fc.property(fc.uniqueArray(point, { minLength: 2, maxLength: 40, selector: (p) => p[0] }), fc.boolean(), dbl(-100, 100), (pts, withPhase, delayMs) => {
        pts.sort((a, b) => a[0] - b[0]);
        const m = {
          id: 'm',
          name: 'M',
          source: { fileName: 'f.txt', kind: 'text' },
          frequencyHz: pts.map((p) => p[0]),
          magnitudeDb: pts.map((p) => p[1]),
          phaseDeg: withPhase ? pts.map((p) => p[2]) : null,
          phaseEstimated: false,
          delayMs,
          notes: [],
        };
        const doc = { ...v2(), version: 3, measurements: [m] };
        const r = readPlanText(JSON.stringify(doc));
        if (!r.ok) throw r.error;
        const again = readPlanText(writePlanText(r.plan));
        expect(again.ok && again.plan.measurements).toEqual([m]);
      }),
      { numRuns: 200 },
    );
  });
});

describe('every bad version 3 field is refused with its path', () => {
  const longName = 'x'.repeat(LIMITS.nameMaxLength + 1);
  const cases: [string, (p: Record<string, any>) => void, string, RegExp][] = [
    ['temperature too low', (p) => (p.airTemperatureC = -41), 'airTemperatureC', /between -40 and 60/],
    ['temperature as a string', (p) => (p.airTemperatureC = '20'), 'airTemperatureC', /must be a number/],
    ['measurements not a list', (p) => (p.measurements = {}), 'measurements', /must be a list/],
    ['too many measurements', (p) => (p.measurements = Array.from({ length: 65 }, (_, i) => measurement(`m${i}`))), 'measurements', /at most 64/],
    ['measurement not an object', (p) => (p.measurements[1] = 3), 'measurements[1]', /must be an object/],
    ['unknown measurement field', (p) => (p.measurements[0].colour = 'red'), 'measurements[0].colour', /not a field/],
    ['id missing', (p) => delete p.measurements[0].id, 'measurements[0].id', /required/],
    ['id upper case', (p) => (p.measurements[0].id = 'WF'), 'measurements[0].id', /a-z, 0-9/],
    ['id with a control character', (p) => (p.measurements[0].id = 'w\u0007f'), 'measurements[0].id', /must not contain control characters/],
    ['id doubled', (p) => (p.measurements[1].id = 'wf'), 'measurements[1].id', /used by another measurement/],
    ['name too long', (p) => (p.measurements[0].name = longName), 'measurements[0].name', /at most 200/],
    ['name empty', (p) => (p.measurements[0].name = '  '), 'measurements[0].name', /empty/],
    ['name with a newline', (p) => (p.measurements[0].name = 'a\nb'), 'measurements[0].name', /control characters \(U\+000A at character 2\)/],
    ['name with a C1 control', (p) => (p.measurements[0].name = 'a\u0085'), 'measurements[0].name', /U\+0085/],
    ['name with a line separator', (p) => (p.measurements[0].name = 'a\u2028'), 'measurements[0].name', /U\+2028/],
    ['name with a tab', (p) => (p.measurements[0].name = 'a\tb'), 'measurements[0].name', /U\+0009/],
    ['source missing', (p) => delete p.measurements[0].source, 'measurements[0].source', /must be an object/],
    ['source kind unknown', (p) => (p.measurements[0].source.kind = 'mp3'), 'measurements[0].source.kind', /one of "text", "wav", "generated"/],
    ['source file name with a folder', (p) => (p.measurements[0].source.fileName = 'C:\\m\\wf.txt'), 'measurements[0].source.fileName', /without a folder/],
    ['source file name with a slash', (p) => (p.measurements[0].source.fileName = '../wf.txt'), 'measurements[0].source.fileName', /without a folder/],
    ['source file name too long', (p) => (p.measurements[0].source.fileName = 'f'.repeat(256)), 'measurements[0].source.fileName', /at most 255/],
    ['unknown source field', (p) => (p.measurements[0].source.path = '/x'), 'measurements[0].source.path', /not a field/],
    ['frequencies missing', (p) => delete p.measurements[0].frequencyHz, 'measurements[0].frequencyHz', /must be a list, not missing/],
    ['one frequency', (p) => Object.assign(p.measurements[0], { frequencyHz: [1], magnitudeDb: [0], phaseDeg: [0] }), 'measurements[0].frequencyHz', /at least 2/],
    ['too many frequencies', (p) => (p.measurements[0].frequencyHz = Array.from({ length: 65537 }, (_, i) => i + 1)), 'measurements[0].frequencyHz', /at most 65536/],
    ['frequency 0', (p) => (p.measurements[0].frequencyHz[0] = 0), 'measurements[0].frequencyHz[0]', /> 0 Hz/],
    ['frequency negative', (p) => (p.measurements[0].frequencyHz[0] = -5), 'measurements[0].frequencyHz[0]', /> 0 Hz/],
    ['frequency as a string', (p) => (p.measurements[0].frequencyHz[2] = '1000'), 'measurements[0].frequencyHz[2]', /must be a number/],
    ['frequency null', (p) => (p.measurements[0].frequencyHz[2] = null), 'measurements[0].frequencyHz[2]', /must be a number, not null/],
    ['frequency duplicate', (p) => (p.measurements[0].frequencyHz[2] = 100), 'measurements[0].frequencyHz[2]', /does not increase.*strictly increase/],
    ['frequency stepping back', (p) => (p.measurements[0].frequencyHz[3] = 500), 'measurements[0].frequencyHz[3]', /does not increase/],
    ['frequency too high', (p) => (p.measurements[0].frequencyHz[3] = 2e6), 'measurements[0].frequencyHz[3]', /at most 1000000 Hz/],
    ['magnitude shorter', (p) => p.measurements[0].magnitudeDb.pop(), 'measurements[0].magnitudeDb', /one number per frequency \(4\), not 3/],
    ['magnitude longer', (p) => p.measurements[0].magnitudeDb.push(1), 'measurements[0].magnitudeDb', /at most 4 numbers/],
    ['magnitude out of range', (p) => (p.measurements[0].magnitudeDb[1] = 1e4), 'measurements[0].magnitudeDb[1]', /within \+\/-1000 dB/],
    ['magnitude not a list', (p) => (p.measurements[0].magnitudeDb = 0), 'measurements[0].magnitudeDb', /must be a list/],
    ['phase shorter', (p) => p.measurements[0].phaseDeg.pop(), 'measurements[0].phaseDeg', /one number per frequency/],
    ['phase as a string', (p) => (p.measurements[0].phaseDeg[0] = 'x'), 'measurements[0].phaseDeg[0]', /must be a number/],
    ['phase huge', (p) => (p.measurements[0].phaseDeg[0] = 1e10), 'measurements[0].phaseDeg[0]', /within/],
    ['estimated phase without phase', (p) => Object.assign(p.measurements[0], { phaseDeg: null, phaseEstimated: true }), 'measurements[0].phaseEstimated', /no phase/],
    ['phaseEstimated not a boolean', (p) => (p.measurements[0].phaseEstimated = 1), 'measurements[0].phaseEstimated', /true or false/],
    ['delay out of range', (p) => (p.measurements[0].delayMs = 10001), 'measurements[0].delayMs', /within \+\/-10000 ms/],
    ['delay as a string', (p) => (p.measurements[0].delayMs = '1'), 'measurements[0].delayMs', /must be a number/],
    ['notes not a list', (p) => (p.measurements[0].notes = 'x'), 'measurements[0].notes', /must be a list/],
    ['too many notes', (p) => (p.measurements[0].notes = Array.from({ length: 33 }, () => 'n')), 'measurements[0].notes', /at most 32 lines/],
    ['a note too long', (p) => (p.measurements[0].notes[1] = 'n'.repeat(501)), 'measurements[0].notes[1]', /at most 500/],
    ['a note with a newline', (p) => (p.measurements[0].notes[0] = 'a\r\nb'), 'measurements[0].notes[0]', /U\+000D/],
    ['a note as a number', (p) => (p.measurements[0].notes[0] = 5), 'measurements[0].notes[0]', /must be a string/],
    ['driver id malformed', (p) => (p.outputs[0].driverMeasurementId = 'W F'), 'outputs[0].driverMeasurementId', /a-z, 0-9/],
    ['driver id dangling', (p) => (p.outputs[1].driverMeasurementId = 'nope'), 'outputs[1].driverMeasurementId', /"nope" names no measurement/],
    ['driver id without any measurements', (p) => delete p.measurements && delete p.systemMeasurementIds, 'outputs[0].driverMeasurementId', /names no measurement/],
    ['offset unit unknown', (p) => (p.outputs[0].acousticOffset.unit = 'cm'), 'outputs[0].acousticOffset.unit', /one of "mm", "ms"/],
    ['offset value missing', (p) => delete p.outputs[0].acousticOffset.value, 'outputs[0].acousticOffset.value', /required/],
    ['offset too far (mm)', (p) => (p.outputs[0].acousticOffset.value = 100001), 'outputs[0].acousticOffset.value', /within \+\/-100000 mm/],
    ['offset too long (ms)', (p) => (p.outputs[1].acousticOffset.value = -301), 'outputs[1].acousticOffset.value', /within \+\/-300 ms/],
    ['offset unknown field', (p) => (p.outputs[0].acousticOffset.at = 1), 'outputs[0].acousticOffset.at', /not a field/],
    ['offset as a number', (p) => (p.outputs[0].acousticOffset = 25), 'outputs[0].acousticOffset', /must be an object/],
    ['system ids not a list', (p) => (p.systemMeasurementIds = 'room'), 'systemMeasurementIds', /must be a list/],
    ['system id dangling', (p) => p.systemMeasurementIds.push('gone'), 'systemMeasurementIds[1]', /"gone" names no measurement/],
    ['system id twice', (p) => p.systemMeasurementIds.push('room'), 'systemMeasurementIds[1]', /appears twice/],
    ['system id that is a driver', (p) => p.systemMeasurementIds.push('wf'), 'systemMeasurementIds[1]', /driver measurement.*not both/],
  ];
  it.each(cases)('%s', (_, edit, path, message) => {
    const e = errorOf(edit);
    expect(e.path).toBe(path);
    expect(e.message).toMatch(message);
    expect(e.message.startsWith(`${path}: `)).toBe(true);
  });

  it('NaN and Infinity inside a measurement are refused at the element (bare tokens in the text too)', () => {
    const text = writePlanText((readPlanValue(v3()) as any).plan).replace('"magnitudeDb": [\n        -10,', '"magnitudeDb": [\n        NaN,');
    const r = readPlanText(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.path).toBe('measurements[0].magnitudeDb[0]');
  });
});
