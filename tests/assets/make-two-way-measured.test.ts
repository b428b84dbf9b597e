/**
 * The measured two-way demo (assets/two-way-measured.bqplan): it is exactly what its generator
 * (assets/make-two-way-measured.ts) writes, its data is marked as invented, and its crossover sums
 * ACOUSTICALLY (driver measurements x chains, src/measure/acoustic.ts) within +/-1.5 dB from
 * 200 Hz to 15 kHz. The model facts are checked at their sources' values.
 */
import { diagnosticMessage } from '../../src/diagnostics';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildMeasuredDemo, DEMO, DEMO_FILE } from '../../assets/make-two-way-measured';
import { interpolateMeasurement, predictAcoustic, speedOfSoundMps } from '../../src/measure/acoustic';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import { writePlanText } from '../../src/plan/write';
import { updateOutput } from '../../src/ui/edits';
import { cascadeWithGainDelay, designedResponse, logFrequencies } from '../../src/response/chain-response';
import { designInput, designPlan } from '../../src/design/chain';
import { normalizedOmega } from '../../src/response/kernel';

const text = readFileSync(DEMO_FILE, 'utf8');
const read = readPlanText(text);
if (!read.ok) throw read.error;
const plan: Plan = read.plan;
/** 1/48 octave from 200 Hz to 15 kHz, both ends included. */
const BAND = logFrequencies(Math.round(48 * Math.log2(15000 / 200)) + 1, 200, 15000);
const sumDb = (p: Plan) => Array.from(predictAcoustic(p, BAND).sum!.magnitudeDb);
const worstAbs = (xs: number[]) => Math.max(...xs.map(Math.abs));

describe('two-way-measured demo', () => {
  it('is exactly the generator output (re-run: npx tsx assets/make-two-way-measured.ts)', () => {
    expect(text).toBe(writePlanText(buildMeasuredDemo()));
  });

  it('marks its data as invented, in the plan notes and in every measurement', () => {
    expect(plan.notes).toMatch(/INVENTED/);
    expect(plan.measurements!.length).toBe(3);
    for (const m of plan.measurements!) {
      expect(m.notes[0]).toMatch(/^INVENTED data/);
      expect(m.name).toMatch(/invented/);
      expect(m.source.kind).toBe('generated');
    }
    expect(plan.systemMeasurementIds).toEqual(['room-seat']);
  });

  it('predicted acoustic sum within +/-1.5 dB from 200 Hz to 15 kHz (1/48-octave check)', () => {
    const s = sumDb(plan);
    expect(s.every(Number.isFinite)).toBe(true);
    expect(worstAbs(s)).toBeLessThan(1.5);
  });

  it('the drivers matter: the same crossover with both edges at 2 kHz (flat electrically) misses the +/-1.5 dB acoustically', () => {
    const naive = structuredClone(plan);
    naive.outputs[0].lowPass!.frequency = 2000;
    // The crossover itself (no pad, no delay) is electrically an all-pass over the input chain:
    // LR4 low-pass + high-pass (Lipshitz and Vanderkooy, JAES 34(11), 1986).
    const bare = structuredClone(naive);
    bare.outputs[1].gainDb = 0;
    bare.outputs[1].delayMs = 0;
    const electrical = designedResponse(designPlan(bare), BAND, bare.sampleRate).sum.magnitudeDb;
    const input = cascadeWithGainDelay(designInput(bare), 1, 0, normalizedOmega(BAND, bare.sampleRate), bare.sampleRate).magnitudeDb;
    expect(worstAbs(Array.from(electrical).map((x, i) => x - input[i]))).toBeLessThan(1e-6);
    expect(worstAbs(sumDb(naive))).toBeGreaterThan(1.5);
  });

  it('time of flight: each driver measurement holds distance / c at 20 C; the tweeter is delayed by the difference', () => {
    const c = speedOfSoundMps(20);
    const [wf, tw] = plan.measurements!;
    expect(wf.delayMs).toBeCloseTo((DEMO.woofer.distanceM / c) * 1000, 6);
    expect(tw.delayMs).toBeCloseTo((1.0 / c) * 1000, 6); // 2.914 ms for 1 m: 343.2 m/s
    expect(plan.outputs[1].delayMs).toBeCloseTo(wf.delayMs - tw.delayMs, 4);
  });

  it('closed-box woofer: |H(fc)| = Qtc at the box resonance (Small 1972), less the baffle step there', () => {
    // At fc = 55 Hz the baffle step is -6.0 dB (fb = 575 Hz is a decade above) and the cone's
    // 3.2 kHz roll-off is 0 dB: the level is 20 log10(0.707) - 6.0 = -9.0 dB.
    const wf = plan.measurements![0];
    const at = interpolateMeasurement(wf, [DEMO.woofer.fcHz]).magnitudeDb[0];
    const wb = 115 / DEMO.baffleWidthM;
    const step = 10 * Math.log10((0.25 + (55 / wb) ** 2) / (1 + (55 / wb) ** 2));
    expect(at).toBeCloseTo(20 * Math.log10(DEMO.woofer.qtc) + step, 1);
  });

  it('room: axial modes (the first at c / 2L = 32.4 Hz) move the seat response more than 3 dB off the bare closed box, 25-200 Hz', () => {
    const room = plan.measurements![2];
    const f1 = speedOfSoundMps(20) / 2 / DEMO.room.dimensionsM[0]; // 32.4 Hz for 5.3 m
    expect(f1).toBeCloseTo(32.4, 1);
    // The modal sum adds resonances of Q 8 on a closed-box low end: between 25 and 200 Hz the
    // measurement must differ from the bare closed box by several dB somewhere (modes are there).
    const freqs = logFrequencies(200, 25, 200);
    const seat = interpolateMeasurement(room, freqs).magnitudeDb;
    const bare = freqs.map((f) => {
      const x = f / DEMO.woofer.fcHz;
      return 20 * Math.log10(x * x / Math.sqrt((1 - x * x) ** 2 + (x / DEMO.woofer.qtc) ** 2));
    });
    const departures = Array.from(seat).map((s, i) => Math.abs(s - bare[i]));
    expect(Math.max(...departures)).toBeGreaterThan(3);
  });

  it('an edit as the app makes it (src/ui/edits.ts) keeps every measurement and reference when saved', () => {
    const r = updateOutput(plan, 'tweeter', { gainDb: -4 });
    if (!r.ok) throw new Error(diagnosticMessage(r.diagnostic));
    const again = readPlanText(writePlanText(r.plan));
    if (!again.ok) throw again.error;
    expect(again.plan.measurements).toEqual(plan.measurements);
    expect(again.plan.outputs.map((o) => o.driverMeasurementId)).toEqual(['woofer-1m', 'tweeter-1m']);
    expect(again.plan.systemMeasurementIds).toEqual(['room-seat']);
    expect(again.plan.airTemperatureC).toBe(20);
  });
});
