// @vitest-environment jsdom
// The import panel and the measurement list as components (jsdom, no canvas): a file read as the
// core reads it is in the plan at once as one undo step; the panel says what it measures, carries
// the caution line and sets a WAV file's channel and gate, taking the spectrum again from the kept
// samples (compared with the core importer, which tests/measure/wav.test.ts holds to
// scipy.signal.sosfreqz); a bad file shows its line and leaves the plan as it was.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { flushSync, mount, unmount } from 'svelte';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import demoText from '../../assets/two-way-monitor.bqplan?raw';
import { importMeasurement } from '../../src/measure/import';
import { readPlanText } from '../../src/plan/read';
import MeasurementImport from '../../renderer/src/components/MeasurementImport.svelte';
import MeasurementList from '../../renderer/src/components/MeasurementList.svelte';
import { importMeasurementFile, removeMeasurement, setImportChannel, setImportGate, setImportMinPhase } from '../../renderer/src/lib/measure-actions';
import { documentState as doc } from '../../renderer/src/state/document.svelte';
import { measurementState as ms } from '../../renderer/src/state/measurements.svelte';

// vitest runs from the repository root; under jsdom import.meta.url is not a file URL.
const FIXTURES = resolve('tests/reference/fixtures') + '/';
const WAV = new Uint8Array(readFileSync(FIXTURES + 'wav/ir-float32-48000-stereo.wav'));
const TEXT = new TextEncoder().encode('# invented woofer, 1 m\nHz dB deg\n50 -6 90\n100 -1 45\n1000 0 0\n5000 -3 -60\n');

let target: HTMLElement;
const mounted: Record<string, unknown>[] = [];

beforeEach(() => {
  const r = readPlanText(demoText);
  if (!r.ok) throw r.error;
  doc.load(r.plan, null);
  ms.close();
  target = document.createElement('div');
  document.body.appendChild(target);
  mounted.push(mount(MeasurementImport, { target }), mount(MeasurementList, { target }));
  flushSync();
});
afterEach(() => {
  for (const m of mounted.splice(0)) unmount(m);
  target.remove();
});

const q = (id: string) => target.querySelector<HTMLElement>(`[data-testid="${id}"]`);
const diff = (a: readonly number[], b: readonly number[]) => a.reduce((w, v, i) => Math.max(w, Math.abs(v - b[i])), 0);

describe('importing a text file', () => {
  it('is in the plan at once, named after the file, a system measurement; one undo takes it out', () => {
    const before = doc.plan;
    expect(importMeasurementFile('Woofer 1m.txt', TEXT)).toBe(true);
    flushSync();
    const m = doc.plan.measurements![0];
    expect(m).toMatchObject({ id: 'woofer-1m', name: 'Woofer 1m', source: { fileName: 'Woofer 1m.txt', kind: 'text' } });
    expect(m.magnitudeDb).toEqual(importMeasurement('Woofer 1m.txt', TEXT).magnitudeDb);
    expect(doc.plan.systemMeasurementIds).toEqual(['woofer-1m']);
    expect(q('measure-panel')).not.toBeNull();
    expect(q('measure-summary')!.textContent).toMatch(/4 points.*with phase/s);
    const caution = q('measure-caution')!.textContent!;
    for (const words of ['start quietly', 'high-pass', 'series capacitor', 'hearing protection', 'local regulations', 'qualified professionals']) expect(caution).toContain(words);
    expect(target.querySelectorAll('[data-testid="measurement-row"]')).toHaveLength(1);
    doc.undo();
    flushSync();
    expect(doc.plan).toBe(before);
    expect(q('measure-panel')).toBeNull();
    expect(target.querySelectorAll('[data-testid="measurement-row"]')).toHaveLength(0);
  });

  it('the panel attaches it to an output and estimates a minimum phase on request (marked estimated)', () => {
    importMeasurementFile('wf.txt', TEXT);
    flushSync();
    const use = q('measure-use') as HTMLSelectElement;
    use.value = 'driver:woofer';
    use.dispatchEvent(new Event('change', { bubbles: true }));
    flushSync();
    expect(doc.plan.outputs.find((o) => o.id === 'woofer')!.driverMeasurementId).toBe('wf');
    expect(doc.plan.systemMeasurementIds).toBeUndefined();
    expect(setImportMinPhase(true)).toBe(true);
    flushSync();
    expect(doc.plan.measurements![0].phaseEstimated).toBe(true);
    expect(q('measure-summary')!.textContent).toMatch(/phase estimated/);
    expect(setImportMinPhase(false)).toBe(true);
    expect(doc.plan.measurements![0].phaseDeg).toEqual(importMeasurement('wf.txt', TEXT).phaseDeg);
  });

  it('Escape closes the panel and the measurement stays; Escape in a gate field only puts its text back', () => {
    importMeasurementFile('ir.wav', WAV);
    flushSync();
    const start = q('measure-gate-start') as HTMLInputElement;
    start.focus();
    start.value = '7';
    start.dispatchEvent(new Event('input', { bubbles: true }));
    start.dispatchEvent(new KeyboardEvent('keydown', { key: 'Escape', bubbles: true, cancelable: true }));
    flushSync();
    expect(q('measure-panel')).not.toBeNull();
    q('measure-panel')!.dispatchEvent(new KeyboardEvent('keydown', { key: 'Escape', bubbles: true, cancelable: true }));
    flushSync();
    expect(q('measure-panel')).toBeNull();
    expect(doc.plan.measurements![0].id).toBe('ir');
  });

  it('a bad file shows the line and field and changes nothing', () => {
    const before = doc.plan;
    expect(importMeasurementFile('bad.txt', new TextEncoder().encode('100 0\n200 1\n150 2\n'))).toBe(false);
    flushSync();
    expect(q('measure-error')!.textContent).toMatch(/^line 3: /);
    expect(doc.plan).toBe(before);
    expect(doc.canUndo).toBe(false);
    const broken = WAV.slice();
    broken[34] = 12; // bitsPerSample
    expect(importMeasurementFile('broken.wav', broken)).toBe(false);
    flushSync();
    expect(q('measure-error')!.textContent).toMatch(/^fmt\.bitsPerSample: /);
    expect(importMeasurementFile('other.bqplan', new TextEncoder().encode('{}'))).toBe(false);
    expect(doc.plan).toBe(before);
  });
});

describe('importing a WAV impulse response', () => {
  it('channel and gate take the spectrum again from the kept samples, as the core imports the file with them', () => {
    expect(importMeasurementFile('ir.wav', WAV)).toBe(true);
    flushSync();
    expect(q('measure-channel')).not.toBeNull();
    expect(q('measure-gate-start')).not.toBeNull();
    expect(setImportChannel(1)).toBe(true);
    expect(setImportGate({ startMs: 1, lengthMs: 115 })).toBeNull();
    const want = importMeasurement('ir.wav', WAV, { channel: 1, gate: { startMs: 1, lengthMs: 115 } });
    const m = doc.plan.measurements![0];
    expect(diff(m.magnitudeDb, want.magnitudeDb)).toBe(0);
    expect(diff(m.phaseDeg!, want.phaseDeg!)).toBe(0);
    expect(m.delayMs).toBe(want.delayMs);
    expect(m.notes[0]).toMatch(/channel 2 used.*gate 1 ms before the peak, 115 ms long/);
  });

  it('a bad gate is refused in the panel and the plan keeps the last good spectrum', () => {
    importMeasurementFile('ir.wav', WAV);
    flushSync();
    const before = doc.plan;
    expect(setImportGate({ startMs: 5, lengthMs: 2 })).toMatch(/gate length 2 ms/);
    // Typed in the panel: the field shows the reason in place.
    const length = q('measure-gate-length') as HTMLInputElement;
    length.focus();
    length.value = '0.5';
    length.dispatchEvent(new Event('input', { bubbles: true }));
    length.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true, cancelable: true }));
    flushSync();
    expect(q('measure-gate-length-error')!.textContent).toMatch(/gate length 0.5 ms/);
    expect(doc.plan).toBe(before);
  });

  it('removing the measurement closes its panel; undo brings it back', () => {
    importMeasurementFile('ir.wav', WAV);
    flushSync();
    expect(removeMeasurement('ir')).toBe(true);
    flushSync();
    expect(q('measure-panel')).toBeNull();
    expect(doc.plan.measurements).toBeUndefined();
    doc.undo();
    expect(doc.plan.measurements![0].id).toBe('ir');
  });
});
