/**
 * Measurement benchmarks for `npm run bench` (and its --json output), at the sizes of the goals:
 * a 1,000,000-sample float WAV impulse response imported with the default gate and FFT (goal
 * under 300 ms), 1/48-octave smoothing of a 2,000-point measurement (under 5 ms), a 100,000-line
 * text file (well under a second: goal 250 ms), and the minimum phase of 1/48-octave data from
 * 20 Hz to 20 kHz (no goal; it runs once per import of a magnitude-only file).
 */
import * as wavefileModule from 'wavefile';
import { minimumPhaseDeg } from '../../src/measure/minphase';
import { smoothColumns } from '../../src/measure/smooth';
import { parseMeasurementText } from '../../src/measure/text';
import { parseImpulseWav } from '../../src/measure/wav';

type WaveFileClass = typeof wavefileModule.WaveFile;
const wavefileExports = wavefileModule as unknown as Record<string, unknown>;
const DEFAULT_KEY = 'default'; // the CommonJS build under Node (see src/measure/wav.ts)
const WaveFile: WaveFileClass = (wavefileExports.WaveFile as WaveFileClass | undefined) ?? (wavefileExports[DEFAULT_KEY] as { WaveFile: WaveFileClass }).WaveFile;

export interface MeasureBenchCase {
  name: string;
  medianMs: number;
  bestMs: number;
  goalMs: number | null;
  ok: boolean | null;
}

function time(name: string, goalMs: number | null, runs: number, fn: () => unknown): MeasureBenchCase {
  for (let i = 0; i < 2; i++) fn(); // warm-up (JIT, FFT tables)
  const ms: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    ms.push(performance.now() - t0);
  }
  ms.sort((a, b) => a - b);
  const medianMs = +ms[ms.length >> 1].toFixed(3);
  return { name, medianMs, bestMs: +ms[0].toFixed(3), goalMs, ok: goalMs === null ? null : medianMs < goalMs };
}

/** A decaying, deterministic impulse response (a small LCG, no Math.random) after 5 ms of silence. */
function floatWav(samples: number, sampleRate: number): Uint8Array {
  let seed = 2024;
  const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648) - 0.5;
  const x = new Float32Array(samples);
  const pre = Math.round(0.005 * sampleRate);
  for (let i = pre; i < samples; i++) x[i] = Math.exp(-(i - pre) / (0.05 * sampleRate)) * rand() * (i === pre + 3 ? 8 : 1);
  const wav = new WaveFile();
  wav.fromScratch(1, sampleRate, '32f', x);
  return wav.toBuffer();
}

export function runMeasureBench(): MeasureBenchCase[] {
  const out: MeasureBenchCase[] = [];
  const wav = floatWav(1_000_000, 48000);
  out.push(time('WAV import, 1,000,000 float samples, default gate + FFT', 300, 7, () => parseImpulseWav(wav, { name: 'bench' })));

  const freqs = Array.from({ length: 2000 }, (_, i) => 20 * Math.pow(1000, i / 1999));
  const mag = freqs.map((f, i) => 6 * Math.sin(i / 13) + 3 * Math.cos(i / 5));
  const phase = freqs.map((f, i) => -30 * Math.log2(f / 20) + 20 * Math.sin(i / 7));
  out.push(time('smoothing 1/48 octave, 2,000 points (magnitude and phase)', 5, 21, () => smoothColumns(freqs, mag, phase, { kind: 'octave', n: 48 })));
  out.push(time('smoothing variable, 2,000 points (magnitude and phase)', null, 21, () => smoothColumns(freqs, mag, phase, { kind: 'variable' })));

  const lines = ['Frequency Magnitude Phase'];
  for (let i = 0; i < 100_000; i++) lines.push(`${(10 * Math.pow(2, i / 5000)).toPrecision(12)}\t${(Math.sin(i / 1000) * 6).toFixed(4)}\t${((i * 7) % 360) - 180}`);
  const text = lines.join('\n');
  out.push(time('text import, 100,000 lines', 250, 7, () => parseMeasurementText(text, 'bench')));

  const grid = Array.from({ length: 481 }, (_, i) => 20 * Math.pow(2, i / 48));
  const gridMag = grid.map((f) => -10 * Math.log10(1 + Math.pow(f / 2000, 8)) - 10 * Math.log10(1 + Math.pow(40 / f, 4)));
  out.push(time('minimum phase, 1/48 octave 20 Hz - 20 kHz', null, 7, () => minimumPhaseDeg(grid, gridMag)));
  return out;
}

export function measureBenchText(cases: MeasureBenchCase[]): string {
  const rows = ['measurements                                                  median ms   best ms   goal'];
  for (const c of cases) {
    const goal = c.goalMs === null ? '-' : `< ${c.goalMs} ms ${c.ok ? 'ok' : 'MISSED'}`;
    rows.push(`${c.name.padEnd(62)}${c.medianMs.toFixed(2).padStart(9)}${c.bestMs.toFixed(2).padStart(10)}   ${goal}`);
  }
  return rows.join('\n');
}
