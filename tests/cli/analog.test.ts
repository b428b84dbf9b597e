/**
 * The command line's cramping, analog curves, sample-rate change and board delays:
 * - `check` reports a band more than 1 dB from its analog prototype (thresholds.ts), with a figure
 *   at least the deviation found against scipy.signal.freqs at the fixture's frequencies
 *   (tests/reference/make_analog_fixtures.py), and none once the band is matched;
 * - `response --analog` gives the analog prototype's curves, equal to scipy.signal.freqs;
 * - `retarget` 48 -> 96 -> 48 kHz gives the same coefficients within 1e-12 (bilinear designs);
 * - `response` uses the delays the board runs (whole samples, its profile's unit).
 */
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { designBand } from '../../src/design/cookbook';
import type { Band } from '../../src/plan/types';
import { loadFixture } from '../helpers/reference';

const memoryIo = (files: Record<string, string>): CliIo => ({
  readText(path: string) {
    if (!(path in files)) throw new Error(`ENOENT: no such file, open '${path}'`);
    return files[path];
  },
});

const output = (id: string, extra: Record<string, unknown> = {}) => ({ id, name: id, gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [], ...extra });
const planText = (outputs: unknown[], extra: Record<string, unknown> = {}, sampleRate = 48000) =>
  JSON.stringify({ format: 'biquadrant.plan', version: 3, name: 'analog checks (invented)', sampleRate, input: { bands: [] }, outputs, ...extra });

interface BandCase {
  kind: string;
  band?: Band;
  frequencies: number[];
  magnitudeDb: number[];
  phaseDeg: number[];
}
const bandCases = loadFixture<BandCase>('analog.json').cases.filter((c) => c.kind === 'band');
const peak16k = bandCases.find((c) => c.band!.type === 'peaking' && c.band!.frequency === 16000)!;

function digitalDb(band: Band, f: number, fs: number): number {
  const [s] = designBand(band, fs);
  const w = (2 * Math.PI * f) / fs;
  const nr = s.b0 + s.b1 * Math.cos(w) + s.b2 * Math.cos(2 * w);
  const ni = -s.b1 * Math.sin(w) - s.b2 * Math.sin(2 * w);
  const dr = 1 + s.a1 * Math.cos(w) + s.a2 * Math.cos(2 * w);
  const di = -s.a1 * Math.sin(w) - s.a2 * Math.sin(2 * w);
  return 10 * Math.log10((nr * nr + ni * ni) / (dr * dr + di * di));
}

describe('check: cramping', () => {
  it('reports a bilinear peaking band at 16 kHz, 48 kHz by at least its deviation from scipy.signal.freqs', () => {
    const text = planText([output('tw', { bands: [peak16k.band] })]);
    const r = runCli(['check', 'p.bqplan', '--format', 'json'], memoryIo({ 'p.bqplan': text }));
    expect(r.code).toBe(0);
    const w = (JSON.parse(r.stdout) as { warnings: { code: string; where: string; message: string }[] }).warnings.filter((x) => x.code === 'cramping');
    expect(w.length).toBe(1);
    expect(w[0].where).toBe('tw/b');
    let worstAtFixture = 0;
    peak16k.frequencies.forEach((f, i) => {
      if (f <= 20000) worstAtFixture = Math.max(worstAtFixture, Math.abs(digitalDb(peak16k.band!, f, 48000) - peak16k.magnitudeDb[i]));
    });
    const reported = Math.abs(Number(/by ([-+][\d.]+) dB/.exec(w[0].message)![1]));
    expect(worstAtFixture).toBeGreaterThan(1);
    expect(reported).toBeGreaterThanOrEqual(worstAtFixture - 0.005);
    expect(reported).toBeLessThan(worstAtFixture + 0.5);
    expect(w[0].message).toMatch(/"design": "matched"/);
  });

  it('says nothing of the same band matched, or of a band well below Nyquist', () => {
    const matched = planText([output('tw', { bands: [{ ...peak16k.band, design: 'matched' }] })]);
    const low = planText([output('tw', { bands: [{ id: 'p', type: 'peaking', frequency: 1000, gainDb: 6, q: 1.41 }] })]);
    for (const t of [matched, low]) {
      const r = runCli(['check', 'p.bqplan'], memoryIo({ 'p.bqplan': t }));
      expect(r.stdout).not.toMatch(/analog prototype/);
    }
  });
});

describe('response --analog', () => {
  for (const c of bandCases) {
    it(`${c.band!.type} at ${c.band!.frequency} Hz: analog curves equal scipy.signal.freqs (1e-9 dB)`, () => {
      const fs = 48000;
      const freqs = c.frequencies.filter((f) => f < fs / 2);
      const r = runCli(['response', 'p.bqplan', '--analog', '--freqs', freqs.join(',')], memoryIo({ 'p.bqplan': planText([output('o', { bands: [c.band] })]) }));
      expect(r.code).toBe(0);
      const j = JSON.parse(r.stdout) as { analog: { outputs: { id: string; magnitudeDb: (number | null)[] }[]; sum: { magnitudeDb: (number | null)[] } } };
      freqs.forEach((f, i) => {
        const ref = c.magnitudeDb[c.frequencies.indexOf(f)];
        const got = j.analog.outputs[0].magnitudeDb[i];
        if (ref < -300) return;
        expect(Math.abs(got! - ref), `${f} Hz`).toBeLessThan(1e-9);
        expect(Math.abs(j.analog.sum.magnitudeDb[i]! - ref)).toBeLessThan(1e-9);
      });
    });
  }

  it('adds analog columns to CSV and notes raw bands left out', () => {
    const raw = { id: 'r', type: 'raw', coefficients: { b0: 0.5, b1: 0, b2: 0, a0: 1, a1: 0, a2: 0 } };
    const r = runCli(['response', 'p.bqplan', '--analog', '--format', 'csv', '--points', '4'], memoryIo({ 'p.bqplan': planText([output('o', { bands: [raw] })]) }));
    expect(r.code).toBe(0);
    expect(r.stdout.split('\n')[0]).toMatch(/,analog\.o\.magnitudeDb,analog\.o\.phaseDeg,analog\.o\.groupDelayMs,analog\.sum\.magnitudeDb/);
    expect(r.stderr).toMatch(/raw bands have no analog prototype.*o\/r/);
  });
});

describe('retarget', () => {
  const plan = planText([
    output('wf', { lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2200 }, bands: [{ id: 'p1', type: 'peaking', frequency: 120, gainDb: -4, q: 3 }] }),
    output('tw', {
      highPass: { family: 'bessel', order: 3, frequency: 2200, normalization: 'delay' },
      bands: [
        { id: 'hs', type: 'highShelf', frequency: 9000, gainDb: 2.5, slope: 0.7 },
        { id: 'p2', type: 'peaking', frequency: 16000, gainDb: 5, q: 2 },
        { id: 'n', type: 'notch', frequency: 7000, q: 8 },
      ],
    }),
  ]);

  it('48 -> 96 -> 48 kHz gives the same coefficients within 1e-12', () => {
    const up = runCli(['retarget', 'p.bqplan', '--sample-rate', '96000'], memoryIo({ 'p.bqplan': plan }));
    expect(up.code).toBe(0);
    expect(JSON.parse(up.stdout).sampleRate).toBe(96000);
    const down = runCli(['retarget', 'up.bqplan', '--sample-rate', '48000'], memoryIo({ 'up.bqplan': up.stdout }));
    expect(down.code).toBe(0);
    const a = JSON.parse(runCli(['coeffs', 'p.bqplan'], memoryIo({ 'p.bqplan': plan })).stdout) as unknown;
    const b = JSON.parse(runCli(['coeffs', 'p.bqplan'], memoryIo({ 'p.bqplan': down.stdout })).stdout) as unknown;
    const flat = (x: unknown): number[] => (typeof x === 'number' ? [x] : Array.isArray(x) ? x.flatMap(flat) : x && typeof x === 'object' ? Object.values(x).flatMap(flat) : []);
    const fa = flat(a);
    const fb = flat(b);
    expect(fa.length).toBeGreaterThan(30);
    expect(fb.length).toBe(fa.length);
    fa.forEach((x, i) => expect(Math.abs(x - fb[i])).toBeLessThanOrEqual(1e-12));
  });

  it('reports per band and edge what moves, and --method matched keeps the analog shape of the bands that move', () => {
    const r = runCli(['retarget', 'p.bqplan', '--sample-rate', '96000'], memoryIo({ 'p.bqplan': plan }));
    expect(r.stderr).toMatch(/^48000 Hz -> 96000 Hz/);
    for (const w of ['wf/lowPass', 'wf/p1', 'tw/highPass', 'tw/hs', 'tw/p2', 'tw/n']) expect(r.stderr).toContain(`  ${w} (`);
    expect(r.stderr).toMatch(/tw\/p2 \(peaking 16 kHz, bilinear\): [-+]\d\.\d\d dB at [\d.]+ kHz MOVES/);
    expect(r.stderr).not.toMatch(/wf\/p1.*MOVES/);
    const m = runCli(['retarget', 'p.bqplan', '--sample-rate', '96000', '--method', 'matched'], memoryIo({ 'p.bqplan': plan }));
    expect(m.code).toBe(0);
    const out = JSON.parse(m.stdout) as { outputs: { bands: { id: string; design?: string }[] }[] };
    expect(out.outputs[1].bands.find((b) => b.id === 'p2')!.design).toBe('matched');
    expect(out.outputs[0].bands[0].design).toBeUndefined();
    expect(m.stderr).toMatch(/tw\/p2 \(peaking 16 kHz, matched\): .*; now matched/);
  });

  it('refuses a band above the new Nyquist with its field path, and bad options as usage errors', () => {
    const r = runCli(['retarget', 'p.bqplan', '--sample-rate', '32000'], memoryIo({ 'p.bqplan': plan }));
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/outputs\[1\]\.bands\[1\]\.frequency/);
    expect(runCli(['retarget', 'p.bqplan'], memoryIo({ 'p.bqplan': plan })).code).toBe(2);
    expect(runCli(['retarget', 'p.bqplan', '--sample-rate', '96000', '--method', 'exact'], memoryIo({ 'p.bqplan': plan })).code).toBe(2);
  });
});

describe('response: the delays the board runs', () => {
  const profile = { name: 'whole samples', sampleRate: null, order: ['b0', 'b1', 'b2', 'a1', 'a2'], feedbackSign: 'as-computed', writeA0: false, number: { kind: 'decimal', significantDigits: null }, coefficientScale: 1, gain: 'separate', delayUnit: 'samples', maxDelaySamples: null, sectionBudget: 16 };
  // 0.0104 ms at 48 kHz is 0.4992 samples: the board runs 0. At 20 kHz the exact delay puts the two
  // equal outputs 75 degrees apart (+4.0 dB summed), the board's in phase (+6.02 dB).
  const outs = [output('a'), output('b', { delayMs: 0.0104 })];

  it('rounds to whole samples under a profile in samples, notes the sum change above 0.1 dB, and --exact-delay gives the exact one', () => {
    const text = planText(outs, { profile });
    const board = runCli(['response', 'p.bqplan', '--freqs', '20000'], memoryIo({ 'p.bqplan': text }));
    const exact = runCli(['response', 'p.bqplan', '--freqs', '20000', '--exact-delay'], memoryIo({ 'p.bqplan': text }));
    const sumDb = (r: { stdout: string }) => (JSON.parse(r.stdout) as { sum: { magnitudeDb: number[] } }).sum.magnitudeDb[0];
    // Rounded to 0 samples: two equal outputs in phase, +6.02 dB.
    expect(sumDb(board)).toBeCloseTo(20 * Math.log10(2), 9);
    // Exact: |1 + e^{-j 2 pi f D}| = 2 |cos(pi f D)|.
    expect(sumDb(exact)).toBeCloseTo(20 * Math.log10(2 * Math.abs(Math.cos(Math.PI * 20000 * 0.0104e-3))), 9);
    expect(board.stderr).toMatch(/delays rounded to the board's resolution: the sum differs .* by [-+][\d.]+ dB at 20 kHz/);
    expect(exact.stderr).toBe('');
  });

  it('keeps exact delays without a profile, and under a profile in ms', () => {
    for (const extra of [{}, { profile: { ...profile, delayUnit: 'ms' } }]) {
      const r = runCli(['response', 'p.bqplan', '--freqs', '20000'], memoryIo({ 'p.bqplan': planText(outs, extra) }));
      expect((JSON.parse(r.stdout) as { sum: { magnitudeDb: number[] } }).sum.magnitudeDb[0]).toBeCloseTo(20 * Math.log10(2 * Math.abs(Math.cos(Math.PI * 20000 * 0.0104e-3))), 9);
      expect(r.stderr).toBe('');
    }
  });
});
