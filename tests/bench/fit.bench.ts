/**
 * Band fitter benchmarks for `npm run bench` (and its --json output as "fit"): 10 and 20 bands
 * fitted to a 1/48-octave response from 20 Hz to 20 kHz (about 480 points) at 48 kHz, toward a
 * flat target with a 0.1 dB tolerance so every band of the budget is placed. Goals: 10 bands under
 * 1 s, 20 bands under 3 s on a 2-core machine. The response is deterministic (a small LCG, no
 * Math.random): 24 cookbook peaking bands of +/-2 to 8 dB and Q 1 to 8, inverted.
 */
import { designBand } from '../../src/design/cookbook';
import { addSectionDb, gridTrig } from '../../src/fit/bands';
import { fitPlan } from '../../src/fit/plan-fit';
import { flatTarget } from '../../src/fit/target';
import type { Plan } from '../../src/plan/types';

export interface FitBenchCase {
  bands: number;
  points: number;
  ms: number;
  bestMs: number;
  goalMs: number;
  ok: boolean;
  /** The per-octave RMS error after the fit, dB (how far the bands got). */
  rmsAfterDb: number;
}

const FS = 48000;

function benchPlan(): Plan {
  const frequencyHz = Array.from({ length: 479 }, (_, k) => 20 * Math.pow(2, k / 48));
  const db = new Float64Array(frequencyHz.length);
  const trig = gridTrig(frequencyHz, FS);
  let seed = 2024;
  const rand = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
  for (let k = 0; k < 24; k++) {
    const f = 25 * Math.pow(700, (k + 0.5 * rand()) / 24);
    const g = (rand() < 0.5 ? -1 : 1) * (2 + 6 * rand());
    for (const s of designBand({ id: 'x', type: 'peaking', frequency: f, gainDb: g, q: 1 + 7 * rand(), enabled: true }, FS)) addSectionDb(s, trig, db, -1);
  }
  return {
    format: 'biquadrant.plan',
    version: 3,
    name: 'bench',
    sampleRate: FS,
    input: { bands: [] },
    outputs: [{ id: 'main', name: 'main', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [], driverMeasurementId: 'm' }],
    measurements: [
      { id: 'm', name: 'bench (invented)', source: { fileName: '', kind: 'generated' }, frequencyHz, magnitudeDb: Array.from(db), phaseDeg: null, phaseEstimated: false, delayMs: 0, notes: [] },
    ],
  };
}

export function runFitBench(): FitBenchCase[] {
  const plan = benchPlan();
  const target = { ...flatTarget('output', 'main'), toleranceDb: 0.1 };
  return [
    { bands: 10, goalMs: 1000 },
    { bands: 20, goalMs: 3000 },
  ].map(({ bands, goalMs }) => {
    const run = () => fitPlan(plan, { kind: 'output', outputId: 'main' }, target, { bands, maxBoostDb: 8, maxCutDb: 15 });
    let last = run(); // warm-up (JIT)
    const ms: number[] = [];
    for (let i = 0; i < 3; i++) {
      const t0 = performance.now();
      last = run();
      ms.push(performance.now() - t0);
    }
    ms.sort((a, b) => a - b);
    const median = ms[1];
    return {
      bands,
      points: plan.measurements?.[0].frequencyHz.length ?? 0,
      ms: +median.toFixed(1),
      bestMs: +ms[0].toFixed(1),
      goalMs,
      ok: median < goalMs,
      rmsAfterDb: +last.result.after.rmsDb.toFixed(3),
    };
  });
}

export function fitBenchText(cases: FitBenchCase[]): string {
  const lines = ['band fitter (1/48-octave response, 20 Hz - 20 kHz, flat target):', ' bands  points   median ms   best ms   goal ms   RMS after'];
  for (const c of cases) {
    lines.push(`${String(c.bands).padStart(6)}  ${String(c.points).padStart(6)}  ${c.ms.toFixed(1).padStart(10)}  ${c.bestMs.toFixed(1).padStart(8)}  ${String(c.goalMs).padStart(8)}   ${c.rmsAfterDb.toFixed(3)} dB${c.ok ? '' : '  (goal missed)'}`);
  }
  return lines.join('\n');
}
