/**
 * Seeded mutation fuzzing of the measurement commands: text measurement files and WAV impulse
 * responses mutated the ways broken or hostile files are (tests/fuzz/mutate.ts for text; flipped,
 * truncated and overwritten header and data bytes for WAV), run through `measure` (JSON and CSV,
 * smoothing, minimum phase, gates), `attach` (to an output and to the system) and
 * `response --acoustic` on every plan `attach` wrote. The invariants are those of cli-fuzz.test.ts
 * (README "Exit codes"): nothing throws out of runCli, exit 0, 1 or 2, a refusal is one
 * "error: ..." line, no NaN or Infinity in successful output, and every plan `attach` writes is one
 * the plan reader accepts. The seed is fixed so a failure reproduces.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import type { CliIo } from '../../src/cli/run';
import { run, type Stats } from './invariants';
import { readPlanText } from '../../src/plan/read';
import { mulberry32, mutateText, pick, type Rng } from './mutate';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const SEED = 20261203;
/** About 6 command runs per file: 360 files give over 2,000 cases. */
const FILES = Number(process.env.FUZZ_MEASUREMENTS ?? 360);

const PLAN = readFileSync(`${ROOT}assets/two-way-monitor.bqplan`, 'utf8');
const OUTPUT_ID = (() => {
  const r = readPlanText(PLAN);
  if (!r.ok) throw r.error;
  return r.plan.outputs[0].id;
})();

/** An invented measurement in text columns: a smooth band-pass driver, with a header and phase. */
function textMeasurement(rng: Rng): string {
  const lines = ['# invented driver for fuzzing', 'Freq(Hz)\tdB\tdeg'];
  const n = 20 + Math.floor(rng() * 200);
  for (let i = 0; i < n; i++) {
    const f = 20 * Math.pow(1000, i / (n - 1));
    const db = -10 * Math.log10(1 + (60 / f) ** 4) - 10 * Math.log10(1 + (f / 8000) ** 4);
    const deg = (180 / Math.PI) * (Math.atan(60 / f) - Math.atan(f / 8000));
    const sep = pick(rng, ['\t', ' ', ',', ';']);
    const num = (x: number) => (sep === ';' && rng() < 0.5 ? x.toFixed(4).replace('.', ',') : x.toFixed(4));
    lines.push([num(f), num(db), num(deg)].join(sep));
  }
  return lines.join(pick(rng, ['\n', '\r\n'])) + '\n';
}

const WAVS = ['ir-float32-48000-stereo.wav', 'ir-float64-44100.wav', 'ir-pcm16-44100.wav', 'ir-pcm24-48000.wav', 'ir-pcm32-96000.wav'].map(
  (f) => new Uint8Array(readFileSync(`${ROOT}tests/reference/fixtures/wav/${f}`)),
);

/** A WAV with some header or data bytes changed, or cut short. */
function mutatedWav(rng: Rng): Uint8Array {
  const w = Uint8Array.from(pick(rng, WAVS));
  const kind = rng();
  if (kind < 0.2) return w.subarray(0, Math.floor(rng() * w.length));
  const count = 1 + Math.floor(rng() * 4);
  for (let k = 0; k < count; k++) {
    // Mostly the 44-byte header (sizes, format, channels, rate, bits), sometimes the samples.
    const at = rng() < 0.8 ? Math.floor(rng() * Math.min(60, w.length)) : Math.floor(rng() * w.length);
    w[at] = pick(rng, [0, 1, 2, 3, 0x7f, 0x80, 0xff, Math.floor(rng() * 256)]);
  }
  return w;
}

const io = (text: Record<string, string>, bytes: Record<string, Uint8Array>): CliIo => ({
  readText: (p) => {
    if (p in text) return text[p];
    if (p in bytes) return new TextDecoder().decode(bytes[p]);
    throw new Error(`ENOENT: no such file '${p}'`);
  },
  readBytes: (p) => {
    if (p in bytes) return bytes[p];
    if (p in text) return new TextEncoder().encode(text[p]);
    throw new Error(`ENOENT: no such file '${p}'`);
  },
});

describe('seeded mutation fuzzing of the measurement commands', () => {
  it(`${FILES} mutated text and WAV measurements through measure, attach and response --acoustic`, () => {
    const rng = mulberry32(SEED);
    const stats: Stats = { cases: 0, ok: 0, failures: [] };
    for (let i = 0; i < FILES; i++) {
      const label = `seed ${SEED} file ${i}`;
      const wav = rng() < 0.4;
      const name = wav ? 'm.wav' : 'm.txt';
      const text: Record<string, string> = { 'p.bqplan': PLAN };
      const bytes: Record<string, Uint8Array> = {};
      if (wav) bytes[name] = rng() < 0.85 ? mutatedWav(rng) : pick(rng, WAVS);
      else text[name] = rng() < 0.6 ? mutateText(rng, textMeasurement(rng)) : textMeasurement(rng);
      const f = io(text, bytes);
      run(stats, label, ['measure', name, '--format', pick(rng, ['json', 'csv'])], f);
      run(stats, label, ['measure', name, '--smooth', pick(rng, ['1/3', '1/48', 'var', '1/0', 'x'])], f);
      run(stats, label, ['measure', name, '--min-phase'], f);
      if (wav) run(stats, label, ['measure', name, '--gate', pick(rng, ['0,10', '2,500', '-1,5', '1e9,1', '5'])], f);
      for (const target of [['--output', OUTPUT_ID], ['--system']]) {
        const a = run(stats, label, ['attach', 'p.bqplan', name, ...target], f);
        if (!a || a.code !== 0) continue;
        const back = readPlanText(a.stdout);
        if (!back.ok) {
          stats.failures.push(`${label}: attach wrote a plan the reader refuses: ${back.error.message}`);
          continue;
        }
        run(stats, label, ['response', 'attached.bqplan', '--acoustic', '--points', '40', '--format', pick(rng, ['json', 'csv'])], io({ 'attached.bqplan': a.stdout }, {}));
      }
    }
    expect(stats.failures.slice(0, 20)).toEqual([]);
    expect(stats.cases).toBeGreaterThanOrEqual(FILES < 360 ? 0 : 2000);
    expect(stats.ok).toBeGreaterThan(stats.cases / 5);
  }, 600000);
});
