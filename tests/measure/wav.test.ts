/**
 * WAV impulse-response import against reference files written by scipy.io.wavfile (16/32-bit PCM,
 * 32/64-bit float) and Python's wave module (24-bit PCM), holding the impulse response of a known
 * biquad cascade from scipy.signal.sosfilt; reference values from scipy.signal.sosfreqz
 * (tests/reference/make_measure_fixtures.py). Plus the gate, the grid, and fuzzed headers.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { MeasurementFileError } from '../../src/measure/errors';
import { DEFAULT_GATE, findPeak, gateWeights, gateWindow, resolveGate } from '../../src/measure/gate';
import { GRID_POINTS_PER_OCTAVE, impulseResponseToMeasurement, logGridHz, measurementGridHz } from '../../src/measure/spectrum';
import { looksLikeWav, parseImpulseWav, readWavHeader } from '../../src/measure/wav';
import * as wavefileModule from 'wavefile';
import { angleDiffDeg, loadFixture } from '../helpers/reference';

interface WavCase {
  file: string;
  format: string;
  sampleRate: number;
  channels: number;
  channel: number;
  preDelaySamples: number;
  peakSample: number;
  gate: { startMs: number; lengthMs: number; fadeOutMs: number };
  frequencyHz: number[];
  magnitudeDb: number[];
  phaseDeg: number[];
}

const FIXTURES = fileURLToPath(new URL('../reference/fixtures/', import.meta.url));
const wavFixture = loadFixture<WavCase>('measure-wav.json');
const bytesOf = (file: string) => new Uint8Array(readFileSync(FIXTURES + file));

describe('WAV import against scipy.signal.sosfreqz (make_measure_fixtures.py), 20 Hz - 20 kHz', () => {
  for (const c of wavFixture.cases) {
    it(`${c.format}, ${c.sampleRate} Hz, ${c.channels} channel(s): within 0.05 dB and 1 degree (delay removed)`, () => {
      const bytes = bytesOf(c.file);
      expect(looksLikeWav(bytes)).toBe(true);
      for (const gate of [c.gate, undefined]) {
        const m = parseImpulseWav(bytes, { name: 'ir', channel: c.channel, gate });
        // The arrival time is the peak's sample, counted from the file's first sample.
        expect(m.delayMs).toBeCloseTo((c.peakSample * 1000) / c.sampleRate, 9);
        expect(m.phaseEstimated).toBe(false);
        expect(m.notes[0]).toMatch(new RegExp(`${c.sampleRate} Hz`));
        let worstDb = 0;
        let worstDeg = 0;
        c.frequencyHz.forEach((f, i) => {
          // The reference frequencies are points of the importer's grid (1 kHz 2^(k/96)).
          const j = m.frequencyHz.findIndex((g) => Math.abs(g / f - 1) < 1e-12);
          expect(j).toBeGreaterThanOrEqual(0);
          worstDb = Math.max(worstDb, Math.abs(m.magnitudeDb[j] - c.magnitudeDb[i]));
          // Full phase from the file's start = excess phase - 360 f delay; the reference starts at
          // the impulse response's first sample, preDelaySamples later.
          const full = m.phaseDeg![j] - 360 * f * (m.delayMs / 1000) + (360 * f * c.preDelaySamples) / c.sampleRate;
          worstDeg = Math.max(worstDeg, angleDiffDeg(full, c.phaseDeg[i]));
        });
        // The tolerances. 16-bit samples reach about 0.014 dB (quantization of the
        // slow low-frequency tail); the others stay below 0.001 dB.
        expect(worstDb).toBeLessThan(0.05);
        expect(worstDeg).toBeLessThan(1);
      }
    });
  }

  it('the other channel of the stereo file is a different response (the channel choice matters)', () => {
    const c = wavFixture.cases.find((x) => x.channels === 2)!;
    const right = parseImpulseWav(bytesOf(c.file), { name: 'r', channel: 1 });
    const left = parseImpulseWav(bytesOf(c.file), { name: 'l' });
    // Channel 1 is a halved, sign-flipped copy delayed by 10 samples (see the script).
    expect(left.delayMs - right.delayMs).toBeCloseTo((10 * 1000) / c.sampleRate, 9);
    const i = left.frequencyHz.findIndex((f) => f >= 1000);
    expect(left.magnitudeDb[i] - right.magnitudeDb[i]).toBeCloseTo(20 * Math.log10(0.5), 3);
    expect(() => parseImpulseWav(bytesOf(c.file), { name: 'x', channel: 2 })).toThrow(/channel: channel 3 asked for; the file has 2/);
  });
});

describe('header variants written by the wavefile library', () => {
  type WaveFileClass = typeof wavefileModule.WaveFile;
  const exportsOf = wavefileModule as unknown as Record<string, unknown>;
  const DEFAULT_KEY = 'default';
  const WaveFile = (exportsOf.WaveFile as WaveFileClass | undefined) ?? (exportsOf[DEFAULT_KEY] as { WaveFile: WaveFileClass }).WaveFile;
  const impulse = (n: number, at: number, value: number) => {
    const x = new Array<number>(n).fill(0);
    x[at] = value;
    return x;
  };

  it('extensible PCM 24-bit with 3 channels, RIFX (big-endian) 16-bit, extensible float 64', () => {
    const ext = new WaveFile();
    // Three channels: wavefile writes WAVE_FORMAT_EXTENSIBLE; the impulse is on channel 3.
    ext.fromScratch(3, 48000, '24', [impulse(256, 0, 0), impulse(256, 0, 0), impulse(256, 7, 4194304)]);
    const e = parseImpulseWav(ext.toBuffer(), { name: 'e', channel: 2 });
    expect(readWavHeader(ext.toBuffer()).info).toMatchObject({ sampleFormat: 'pcm', bitsPerSample: 24, channels: 3 });
    expect(e.delayMs).toBeCloseTo((7 * 1000) / 48000, 12);
    // A single sample of 2^22 at 24 bits is 0.5 of full scale: -6.02 dB everywhere, no excess phase.
    expect(Math.max(...e.magnitudeDb.map((m) => Math.abs(m - 20 * Math.log10(0.5))))).toBeLessThan(1e-9);
    expect(Math.max(...e.phaseDeg!.map(Math.abs))).toBeLessThan(1e-9);

    const rifx = new WaveFile();
    rifx.fromScratch(1, 44100, '16', impulse(128, 3, -16384), { container: 'RIFX' });
    const r = parseImpulseWav(rifx.toBuffer(), { name: 'r' });
    expect(readWavHeader(rifx.toBuffer()).info.bigEndian).toBe(true);
    expect(r.magnitudeDb[100]).toBeCloseTo(20 * Math.log10(0.5), 9);
    expect(Math.abs(r.phaseDeg![100])).toBeCloseTo(180, 9); // a negative impulse

    const f64 = new WaveFile();
    f64.fromScratch(1, 96000, '64', impulse(64, 0, 0.25));
    expect(readWavHeader(f64.toBuffer()).info).toMatchObject({ sampleFormat: 'float', bitsPerSample: 64 });
    expect(parseImpulseWav(f64.toBuffer(), { name: 'f' }).magnitudeDb[500]).toBeCloseTo(20 * Math.log10(0.25), 9);
  });
});

describe('the grid', () => {
  it(`is ${GRID_POINTS_PER_OCTAVE} points per octave anchored at 1 kHz, 10 Hz to 0.95 x Nyquist or 40 kHz`, () => {
    const g = measurementGridHz(48000);
    expect(g[0]).toBeGreaterThanOrEqual(10);
    expect(g[0] * Math.pow(2, -1 / 96)).toBeLessThan(10);
    expect(g[g.length - 1]).toBeLessThanOrEqual(22800);
    expect(g).toContain(1000);
    for (let i = 1; i < g.length; i++) expect(g[i] / g[i - 1]).toBeCloseTo(Math.pow(2, 1 / 96), 12);
    expect(measurementGridHz(192000).at(-1)).toBeLessThanOrEqual(40000);
    expect(logGridHz(1000, 2000, 3)).toEqual([1000, 1000 * Math.pow(2, 1 / 3), 1000 * Math.pow(2, 2 / 3), 2000]);
  });
});

describe('the gate', () => {
  it('defaults: 2 ms before the peak, 500 ms long, fade-in 1 ms, fade-out 100 ms', () => {
    expect(resolveGate()).toEqual({ startMs: 2, lengthMs: 500, fadeInMs: 1, fadeOutMs: 100 });
    expect(resolveGate({ startMs: 4, lengthMs: 10 })).toEqual({ startMs: 4, lengthMs: 10, fadeInMs: 2, fadeOutMs: 2 });
    expect(DEFAULT_GATE.lengthMs).toBe(500);
  });

  it('half-Hann tapers: 0 at the outer ends, 1 at the peak, symmetric shape (Harris 1978)', () => {
    const w = gateWindow(100, 1000, { startMs: 10, lengthMs: 40, fadeInMs: 4, fadeOutMs: 8 });
    expect(w).toEqual({ start: 90, peak: 100, end: 130, fadeIn: 4, fadeOut: 8 });
    const x = gateWeights(w);
    expect(x[0]).toBe(0);
    expect(x[2]).toBeCloseTo(0.5, 15); // half-way up the 4-sample half-Hann
    expect(x[w.peak - w.start]).toBe(1);
    expect(x[x.length - 1]).toBe(0);
    expect(x[x.length - 1 - 4]).toBeCloseTo(0.5, 15);
    for (let i = 1; i < 8; i++) expect(x[x.length - 1 - i]).toBeCloseTo(1 - x[x.length - 1 - (8 - i)], 14);
  });

  it('a gate past the ends of the file reads zeros there and keeps its tapers where it puts them', () => {
    const ir = new Float64Array(200);
    ir[5] = 1; // a unit impulse 5 samples in: flat 0 dB and zero excess phase
    const m = impulseResponseToMeasurement(ir, 48000, { name: 'd' });
    expect(Math.max(...m.magnitudeDb.map(Math.abs))).toBeLessThan(1e-9);
    expect(Math.max(...m.phaseDeg!.map(Math.abs))).toBeLessThan(1e-9);
    expect(m.delayMs).toBeCloseTo((5 * 1000) / 48000, 12);
  });

  it('refuses a bad gate by name, and a silent file', () => {
    expect(() => resolveGate({ startMs: -1, lengthMs: 10 })).toThrow(/gate start/);
    expect(() => resolveGate({ startMs: 5, lengthMs: 5 })).toThrow(/gate length/);
    expect(() => resolveGate({ startMs: 5, lengthMs: 50, fadeInMs: 6 })).toThrow(/fade-in/);
    expect(() => resolveGate({ startMs: 5, lengthMs: 50, fadeOutMs: 46 })).toThrow(/fade-out/);
    expect(findPeak([0, -3, 2, 3])).toBe(1);
    expect(findPeak([0, 0])).toBe(-1);
    expect(() => impulseResponseToMeasurement(new Float64Array(10), 48000, { name: 's' })).toThrow(/silent/);
    const c = wavFixture.cases[0];
    expect(() => parseImpulseWav(bytesOf(c.file), { name: 'x', gate: { startMs: 3, lengthMs: 1 } })).toThrow(/^gate: gate length/);
  });
});

describe('bad WAV files are refused with the field, never another error', () => {
  const good = bytesOf(wavFixture.cases[0].file);
  const withByte = (at: number, value: number) => {
    const b = good.slice();
    b[at] = value;
    return b;
  };
  const refusal = (bytes: Uint8Array): MeasurementFileError => {
    try {
      parseImpulseWav(bytes, { name: 'x' });
    } catch (e) {
      expect(e).toBeInstanceOf(MeasurementFileError);
      expect((e as Error).message).not.toMatch(/\n\s+at /);
      return e as MeasurementFileError;
    }
    throw new Error('expected a refusal');
  };

  it('names the field of each damaged header value', () => {
    // Canonical 44-byte header: audioFormat at 20, channels at 22, rate at 24, blockAlign at 32,
    // bitsPerSample at 34 (the layout scipy.io.wavfile writes for PCM).
    expect(readWavHeader(good).info).toMatchObject({ sampleFormat: 'pcm', bitsPerSample: 16, channels: 1, sampleRate: 44100 });
    expect(refusal(withByte(20, 2)).field).toBe('fmt.audioFormat'); // ADPCM
    expect(refusal(withByte(34, 12)).field).toBe('fmt.bitsPerSample');
    expect(refusal(withByte(32, 4)).field).toBe('fmt.blockAlign');
    expect(refusal(withByte(22, 0)).field).toBe('fmt.numChannels');
    const rate0 = good.slice();
    rate0.set([0, 0, 0, 0], 24);
    expect(refusal(rate0).field).toBe('fmt.sampleRate');
    expect(refusal(withByte(8, 0x58)).message).toMatch(/^RIFF\.format: /); // "XAVE"
    expect(refusal(good.slice(0, 8)).field).toBe('RIFF');
    expect(refusal(good.slice(0, 40)).field).toBe('data');
    const silent = good.slice();
    silent.fill(0, 44);
    expect(refusal(silent).message).toMatch(/^data: the impulse response is silent/);
  });

  it('fuzzed headers: a measurement or a MeasurementFileError (fast-check, 400 runs)', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: 0, max: 63 }), fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 6 }), fc.integer({ min: 0, max: 3 }), (edits, cut) => {
        const b = good.slice(0, cut === 0 ? good.length : 44 + cut * 7);
        for (const [at, v] of edits) if (at < b.length) b[at] = v;
        try {
          const m = parseImpulseWav(b, { name: 'f' });
          expect(m.magnitudeDb.every(Number.isFinite)).toBe(true);
          expect(m.phaseDeg!.every(Number.isFinite)).toBe(true);
          expect(Number.isFinite(m.delayMs)).toBe(true);
        } catch (e) {
          if (!(e instanceof MeasurementFileError)) throw e;
        }
      }),
      { numRuns: 400, seed: 7 },
    );
  });
});
