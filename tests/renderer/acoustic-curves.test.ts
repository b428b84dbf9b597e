// The Response view's measured curves (renderer/src/lib/acoustic-curves.ts) draw exactly what the
// core computes: the driver and system measurements smoothed by src/measure/smooth.ts (its
// definition is checked against scipy.integrate.quad in tests/measure/smooth.test.ts) and
// interpolated on the plot grid, predictions from the core's predictAcoustic, the excess phase as
// the stored phase (docs/measurements.md, "What is and is not preserved"). A drag edits one chain:
// no measurement is smoothed or interpolated again then (the drag goal of npm run bench:ui).
import { describe, expect, it } from 'vitest';
import measuredText from '../../assets/two-way-measured.bqplan?raw';
import { interpolateMeasurement, predictAcoustic } from '../../src/measure/acoustic';
import { smoothMeasurement } from '../../src/measure/smooth';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import { logFrequencies } from '../../src/response/chain-response';
import * as edits from '../../src/ui/edits';
import { setMeasurementUse } from '../../src/ui/measurement-edits';
import { AcousticCache } from '../../renderer/src/lib/acoustic-curves';
import { ResponseCache } from '../../renderer/src/lib/response-cache';

function demo(): Plan {
  const r = readPlanText(measuredText);
  if (!r.ok) throw r.error;
  return r.plan;
}
function ok(r: edits.EditResult): Plan {
  if (!r.ok) throw new Error(JSON.stringify(r.diagnostic));
  return r.plan;
}
const grid = logFrequencies(700, 20, 20000);

/** Largest |a - b| where the reference is a number; NaN exactly where it has none. */
function worst(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let w = 0;
  for (let i = 0; i < b.length; i++) {
    if (Number.isNaN(b[i])) expect(a[i]).toBeNaN();
    else w = Math.max(w, Math.abs(a[i] - b[i]));
  }
  return w;
}

describe('AcousticCache', () => {
  it('smoothed: the drawn driver is the core smoothing interpolated, and the prediction the core prediction of the smoothed driver', () => {
    const plan = demo();
    const smoothing = { kind: 'octave' as const, n: 6 };
    const f = new ResponseCache().frame(plan, grid, []);
    const a = new AcousticCache().frame(f, { smoothing, phase: 'full' });
    const core = predictAcoustic(plan, grid, { measurement: (m) => smoothMeasurement(m, smoothing) });
    expect(a.curves.length).toBe(core.outputs.length);
    for (const c of a.curves) {
      const ref = interpolateMeasurement(smoothMeasurement(c.measurement, smoothing), grid);
      expect(worst(c.measured.magnitudeDb, ref.magnitudeDb)).toBeLessThan(1e-12);
      const p = core.outputs.find((o) => o.id === c.output.id)!;
      expect(worst(c.predicted.magnitudeDb, p.response.magnitudeDb)).toBeLessThan(1e-9);
      expect(worst(c.predicted.phaseUnwrappedRad, p.response.phaseUnwrappedRad)).toBeLessThan(1e-9);
    }
    expect(worst(a.sum!.magnitudeDb, core.sum!.magnitudeDb)).toBeLessThan(1e-9);
    // Smoothing changed what is drawn (the unsmoothed curve differs somewhere by more than 0.01 dB).
    const plain = new AcousticCache().frame(f);
    expect(worst(plain.curves[0].measured.magnitudeDb, a.curves[0].measured.magnitudeDb)).toBeGreaterThan(0.01);
  });

  it('excess phase: the measured curve is drawn with its delay removed, the prediction keeps the full phase', () => {
    const plan = demo();
    const f = new ResponseCache().frame(plan, grid, []);
    const full = new AcousticCache().frame(f, { smoothing: { kind: 'none' }, phase: 'full' });
    const excess = new AcousticCache().frame(f, { smoothing: { kind: 'none' }, phase: 'excess' });
    const withDelay = full.curves.find((c) => c.measurement.delayMs !== 0)!;
    expect(withDelay).toBeDefined();
    const e = excess.curves.find((c) => c.output.id === withDelay.output.id)!;
    const m = withDelay.measurement;
    const stored = interpolateMeasurement({ ...m, delayMs: 0 }, grid);
    expect(worst(e.measured.phaseUnwrappedRad, stored.phaseRad)).toBeLessThan(1e-12);
    // Full minus excess is the delay's phase, -2 pi f delay.
    let w = 0;
    for (let i = 0; i < grid.length; i++) {
      if (Number.isNaN(stored.phaseRad[i])) continue;
      w = Math.max(w, Math.abs(withDelay.measured.phaseUnwrappedRad[i] - e.measured.phaseUnwrappedRad[i] + 2 * Math.PI * grid[i] * (m.delayMs / 1000)));
    }
    expect(w).toBeLessThan(1e-9);
    expect(worst(e.predicted.phaseUnwrappedRad, withDelay.predicted.phaseUnwrappedRad)).toBe(0);
    // Group delay of the excess curve: the full one minus the delay.
    expect(worst(e.measured.groupDelayMs, Float64Array.from(withDelay.measured.groupDelayMs, (v) => v - m.delayMs))).toBeLessThan(1e-9);
  });

  it('system measurements are drawn as the core interpolates them, in the plan order', () => {
    let plan = demo();
    const driver = plan.outputs[0].driverMeasurementId!;
    plan = ok(setMeasurementUse(plan, driver, { kind: 'system' }));
    const f = new ResponseCache().frame(plan, grid, []);
    const a = new AcousticCache().frame(f);
    const ids = a.systems.map((s) => s.measurement.id);
    expect(ids).toEqual(plan.systemMeasurementIds);
    const s = a.systems.find((x) => x.measurement.id === driver)!;
    const ref = interpolateMeasurement(s.measurement, grid);
    expect(worst(s.measured.magnitudeDb, ref.magnitudeDb)).toBe(0);
    // The driver it was is no longer predicted.
    expect(a.curves.some((c) => c.measurement.id === driver)).toBe(false);
  });

  it('a drag frame (one band of one output changed) smooths and interpolates no measurement again and keeps the other outputs prediction', () => {
    let plan = demo();
    const cache = new ResponseCache();
    const acoustic = new AcousticCache();
    const display = { smoothing: { kind: 'variable' as const }, phase: 'full' as const };
    const first = acoustic.frame(cache.frame(plan, grid, []), display);
    const prepared = acoustic.preparedCount;
    expect(prepared).toBeGreaterThanOrEqual(2);
    const out = plan.outputs[0];
    for (let k = 1; k <= 5; k++) {
      const r = edits.addBand(plan, out.id, { type: 'peaking', frequency: 300 * k, gainDb: 2, q: 2 });
      plan = ok(r);
      const next = acoustic.frame(cache.frame(plan, grid, []), display);
      expect(acoustic.preparedCount).toBe(prepared);
      expect(next.curves[1].predicted).toBe(first.curves[1].predicted);
      expect(next.curves[0].predicted).not.toBe(first.curves[0].predicted);
    }
    // Another display setting prepares them again, once.
    acoustic.frame(cache.frame(plan, grid, []), { smoothing: { kind: 'octave', n: 3 }, phase: 'full' });
    expect(acoustic.preparedCount).toBe(prepared + first.curves.length + first.systems.length);
  });
});
