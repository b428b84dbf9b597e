/**
 * The `measure` command through runCli with an in-memory file system: text and WAV files, its
 * options, and exit codes (1 with the line or field for a bad file, 2 for a usage error).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { parseMeasurementText } from '../../src/measure/text';
import { loadFixture } from '../helpers/reference';

const FIXTURES = fileURLToPath(new URL('../reference/fixtures/', import.meta.url));
const wavCase = loadFixture<{ file: string; peakSample: number; sampleRate: number }>('measure-wav.json').cases[3]; // float32 stereo
const encoder = new TextEncoder();

const FILES: Record<string, Uint8Array> = {
  'woofer.txt': encoder.encode('* invented woofer, 1 m\nHz dB deg\n20 -12 170\n100 -1 -170\n1000 0 -150\n5000 -3 170\n'),
  'room.csv': encoder.encode('20;-3,5\n40;2,25\n80;-1\n160;0\n'),
  'bad.txt': encoder.encode('100 0\n200 1\n150 2\n'),
  'ir.wav': new Uint8Array(readFileSync(FIXTURES + wavCase.file)),
  'broken.wav': (() => {
    const b = new Uint8Array(readFileSync(FIXTURES + wavCase.file));
    b[34] = 12; // bitsPerSample
    return b;
  })(),
};

const io: CliIo = {
  readText(path) {
    if (!(path in FILES)) throw new Error(`ENOENT: no such file, open '${path}'`);
    return new TextDecoder().decode(FILES[path]);
  },
  readBytes(path) {
    if (!(path in FILES)) throw new Error(`ENOENT: no such file, open '${path}'`);
    return FILES[path];
  },
};
const run = (...argv: string[]) => runCli(argv, io);

describe('measure', () => {
  it('prints a text file as JSON: the issue\'s fields, phase unwrapped, notes kept', () => {
    const r = run('measure', 'woofer.txt');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.name).toBe('woofer');
    expect(j.frequencyHz).toEqual([20, 100, 1000, 5000]);
    expect(j.magnitudeDb).toEqual([-12, -1, 0, -3]);
    expect(j.phaseDeg).toEqual([170, 190, 210, 170]);
    expect(j.delayMs).toBe(0);
    expect(j.phaseEstimated).toBe(false);
    expect(j.notes).toEqual(['invented woofer, 1 m', 'Hz dB deg']);
  });

  it('CSV round-trips through the text importer; magnitude-only files have an empty phase column', () => {
    const r = run('measure', 'room.csv', '--format', 'csv');
    expect(r.stdout.split('\n')[0]).toBe('frequencyHz,magnitudeDb,phaseDeg');
    expect(r.stdout.split('\n')[1]).toBe('20,-3.5,');
    const back = parseMeasurementText(r.stdout, 'room');
    expect(back.magnitudeDb).toEqual([-3.5, 2.25, -1, 0]);
    expect(back.phaseDeg).toBeNull();
  });

  it('--min-phase gives a magnitude-only file an estimated phase; --smooth changes the magnitude', () => {
    const plain = JSON.parse(run('measure', 'room.csv').stdout);
    expect(plain.phaseDeg).toBeNull();
    const mp = JSON.parse(run('measure', 'room.csv', '--min-phase').stdout);
    expect(mp.phaseEstimated).toBe(true);
    expect(mp.phaseDeg).toHaveLength(4);
    const sm = JSON.parse(run('measure', 'room.csv', '--smooth', '1/1').stdout);
    expect(sm.magnitudeDb[1]).toBeLessThan(2.25);
    expect(sm.magnitudeDb[0]).toBe(-3.5); // ends keep their values
    const v = JSON.parse(run('measure', 'room.csv', '--smooth', 'var').stdout);
    expect(v.magnitudeDb).toHaveLength(4);
  });

  it('reads a WAV impulse response: channel, gate and the peak arrival as delay', () => {
    const r = run('measure', 'ir.wav', '--channel', '2', '--gate', '1,100');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.name).toBe('ir');
    expect(j.delayMs).toBeCloseTo((wavCase.peakSample * 1000) / wavCase.sampleRate, 9);
    expect(j.frequencyHz.length).toBeGreaterThan(1000); // 1/96 octave from 10 Hz
    const left = JSON.parse(run('measure', 'ir.wav').stdout);
    expect(left.delayMs).not.toBe(j.delayMs); // channel 1 is the other signal
  });

  it('bad files exit 1 with the line or field, and no stack trace', () => {
    const bad = run('measure', 'bad.txt');
    expect(bad.code).toBe(1);
    expect(bad.stderr).toBe('error: bad.txt: line 3: frequency 150 Hz is below the previous one (200 Hz); frequencies must increase\n');
    const broken = run('measure', 'broken.wav');
    expect(broken.code).toBe(1);
    expect(broken.stderr).toMatch(/^error: broken\.wav: fmt\.bitsPerSample: 12 bits/);
    const missing = run('measure', 'nope.txt');
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/cannot read/);
    const channel = run('measure', 'ir.wav', '--channel', '3');
    expect(channel.code).toBe(1);
    expect(channel.stderr).toMatch(/channel: channel 3 asked for; the file has 2/);
    for (const r of [bad, broken, missing, channel]) expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  it('usage errors exit 2', () => {
    for (const argv of [
      ['measure'],
      ['measure', 'woofer.txt', '--smooth', 'third'],
      ['measure', 'ir.wav', '--gate', '5'],
      ['measure', 'ir.wav', '--channel', '0'],
      ['measure', 'woofer.txt', '--channel', '1'],
      ['measure', 'woofer.txt', '--format', 'xml'],
    ]) {
      expect(run(...argv).code).toBe(2);
    }
    const gate = run('measure', 'ir.wav', '--gate', '5,2');
    expect(gate.code).toBe(1);
    expect(gate.stderr).toMatch(/gate: gate length/);
  });
});
