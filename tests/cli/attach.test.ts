/**
 * `attach` reads a WAV impulse response with the same channel and gate options as `measure`
 * (README command table), and takes an output's acoustic offset in mm or in ms. The imported
 * spectrum is checked against scipy.signal.sosfreqz of the cascade the file holds
 * (tests/reference/make_measure_fixtures.py), as the WAV importer's own tests do.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { readPlanText } from '../../src/plan/read';
import { loadFixture } from '../helpers/reference';

interface WavCase {
  file: string;
  channels: number;
  channel: number;
  sampleRate: number;
  peakSample: number;
  gate: { startMs: number; lengthMs: number };
  frequencyHz: number[];
  magnitudeDb: number[];
}
const FIXTURES = fileURLToPath(new URL('../reference/fixtures/', import.meta.url));
const stereo = loadFixture<WavCase>('measure-wav.json').cases.find((c) => c.channels === 2)!;

const PLAN = {
  format: 'biquadrant.plan',
  version: 3,
  name: 'Two-way, invented',
  sampleRate: 48000,
  input: { bands: [] },
  outputs: [{ id: 'woofer' }, { id: 'tweeter' }],
};
const FILES: Record<string, Uint8Array> = {
  'plan.bqplan': new TextEncoder().encode(JSON.stringify(PLAN)),
  'ir.wav': new Uint8Array(readFileSync(FIXTURES + stereo.file)),
  'flat.txt': new TextEncoder().encode('100 0\n1000 0\n10000 0\n'),
};
const io: CliIo = {
  readText: (path) => {
    if (!(path in FILES)) throw new Error(`ENOENT: ${path}`);
    return new TextDecoder().decode(FILES[path]);
  },
  readBytes: (path) => {
    if (!(path in FILES)) throw new Error(`ENOENT: ${path}`);
    return FILES[path];
  },
};
const run = (...argv: string[]) => runCli(argv, io);

function planOf(stdout: string) {
  const r = readPlanText(stdout);
  if (!r.ok) throw r.error;
  return r.plan;
}

describe('attach --channel and --gate (as measure reads a WAV file)', () => {
  it('the chosen channel and gate give the reference spectrum of that channel within 0.05 dB (scipy.signal.sosfreqz)', () => {
    const { startMs, lengthMs } = stereo.gate;
    const r = run('attach', 'plan.bqplan', 'ir.wav', '--output', 'woofer', '--channel', String(stereo.channel + 1), '--gate', `${startMs},${lengthMs}`);
    expect(r.stderr).toMatch(/attached "ir"/);
    expect(r.code).toBe(0);
    const m = planOf(r.stdout).measurements![0];
    expect(m.source).toEqual({ fileName: 'ir.wav', kind: 'wav' });
    expect(m.delayMs).toBeCloseTo((stereo.peakSample * 1000) / stereo.sampleRate, 9);
    let worst = 0;
    stereo.frequencyHz.forEach((f, i) => {
      const j = m.frequencyHz.findIndex((g) => Math.abs(g / f - 1) < 1e-12);
      worst = Math.max(worst, Math.abs(m.magnitudeDb[j] - stereo.magnitudeDb[i]));
    });
    expect(worst).toBeLessThan(0.05);
    // The same options through measure give the same numbers (one importer).
    const j = JSON.parse(run('measure', 'ir.wav', '--channel', String(stereo.channel + 1), '--gate', `${startMs},${lengthMs}`).stdout);
    expect(m.magnitudeDb).toEqual(j.magnitudeDb);
  });

  it('the first channel is a different response from the second (the option is used)', () => {
    const first = planOf(run('attach', 'plan.bqplan', 'ir.wav', '--system').stdout).measurements![0];
    const second = planOf(run('attach', 'plan.bqplan', 'ir.wav', '--system', '--channel', '2').stdout).measurements![0];
    const differs = first.magnitudeDb.some((v, i) => Math.abs(v - second.magnitudeDb[i]) > 0.5);
    expect(differs).toBe(true);
  });

  it('refuses a channel the file lacks (exit 1, the field), a bad gate (exit 2) and both options on a text file (exit 2)', () => {
    const a = run('attach', 'plan.bqplan', 'ir.wav', '--system', '--channel', '3');
    expect(a.code).toBe(1);
    expect(a.stderr).toMatch(/channel: channel 3 asked for; the file has 2/);
    const b = run('attach', 'plan.bqplan', 'ir.wav', '--system', '--gate', '5');
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/--gate must be START_MS,LENGTH_MS/);
    const c = run('attach', 'plan.bqplan', 'flat.txt', '--system', '--gate', '1,5');
    expect(c.code).toBe(2);
    expect(c.stderr).toMatch(/WAV impulse responses only/);
  });
});

describe('attach --offset-ms', () => {
  it('keeps the offset as a time in ms (it does not follow the air temperature)', () => {
    const r = run('attach', 'plan.bqplan', 'flat.txt', '--output', 'tweeter', '--offset-ms', '-0.25');
    expect(r.code).toBe(0);
    const out = planOf(r.stdout).outputs.find((o) => o.id === 'tweeter')!;
    expect(out.acousticOffset).toEqual({ value: -0.25, unit: 'ms' });
  });

  it('refuses both units at once, an offset on a system measurement, and an offset beyond the contract (300 ms)', () => {
    expect(run('attach', 'plan.bqplan', 'flat.txt', '--output', 'tweeter', '--offset-ms', '1', '--offset-mm', '3').code).toBe(2);
    const s = run('attach', 'plan.bqplan', 'flat.txt', '--system', '--offset-ms', '1');
    expect(s.code).toBe(2);
    expect(s.stderr).toMatch(/--offset-ms belongs to an output/);
    const big = run('attach', 'plan.bqplan', 'flat.txt', '--output', 'tweeter', '--offset-ms', '301');
    expect(big.code).toBe(1);
    expect(big.stderr).toMatch(/acousticOffset/);
  });
});
