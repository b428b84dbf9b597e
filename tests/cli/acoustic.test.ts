/**
 * The command line's measurement commands (README): `attach` adds a measurement to a plan and
 * writes the plan to stdout; `response --acoustic` adds the predicted acoustic response beside
 * the electrical one, which stays exactly as it was. Exit codes as everywhere: 1 a bad plan or
 * file (with its line or field), 2 a usage error.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { measurementId } from '../../src/cli/attach';
import { predictAcoustic } from '../../src/measure/acoustic';
import { readPlanText, readPlanValue } from '../../src/plan/read';

function memoryIo(files: Record<string, string>): CliIo {
  return {
    readText(path: string) {
      if (!(path in files)) throw new Error(`ENOENT: no such file, open '${path}'`);
      return files[path];
    },
  };
}

const PLAN = {
  format: 'biquadrant.plan',
  version: 2,
  name: 'Two-way',
  sampleRate: 48000,
  input: { bands: [] },
  outputs: [
    { id: 'woofer', lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 } },
    { id: 'tweeter', highPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 } },
    { id: 'sub', mute: true },
  ],
};

/** A flat driver from 100 Hz to 20 kHz as text columns (semicolons, decimal commas). */
const FLAT = ['# flat test driver, invented', 'Hz;dB;deg', ...[100, 1000, 10000, 20000].map((f) => `${f};0,0;0,0`)].join('\n');
const files: Record<string, string> = {
  'plan.bqplan': JSON.stringify(PLAN),
  'dir/Woofer 1m.txt': FLAT,
  'tw.txt': FLAT,
  'room.csv': '20, -3\n200, 4\n2000, 0\n',
  'bad.txt': '100 0\n90 1\n',
  'x.wav': 'RIFF',
};
const io = memoryIo(files);
const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const run = (...argv: string[]) => runCli(argv, io);

function attachBoth(): string {
  const a = run('attach', 'plan.bqplan', 'dir/Woofer 1m.txt', '--output', 'woofer', '--offset-mm', '34.3');
  expect(a.code).toBe(0);
  files['p1.bqplan'] = a.stdout;
  const b = run('attach', 'p1.bqplan', 'tw.txt', '--output', 'tweeter', '--name', 'Dome');
  expect(b.code).toBe(0);
  files['p2.bqplan'] = b.stdout;
  return b.stdout;
}

describe('attach', () => {
  it('adds a driver measurement (named after the file, id from the name) and the offset; writes version 3', () => {
    const text = attachBoth();
    const r = readPlanText(text);
    if (!r.ok) throw r.error;
    expect(r.plan.version).toBe(3);
    const [wf, tw] = r.plan.measurements!;
    expect(wf).toMatchObject({ id: 'woofer-1m', name: 'Woofer 1m', source: { fileName: 'Woofer 1m.txt', kind: 'text' }, frequencyHz: [100, 1000, 10000, 20000], notes: ['flat test driver, invented', 'Hz;dB;deg'] });
    expect(tw).toMatchObject({ id: 'dome', name: 'Dome' });
    expect(r.plan.outputs[0]).toMatchObject({ driverMeasurementId: 'woofer-1m', acousticOffset: { value: 34.3, unit: 'mm' } });
    expect(r.plan.outputs[1].driverMeasurementId).toBe('dome');
    expect(run('attach', 'plan.bqplan', 'tw.txt', '--output', 'woofer').stderr).toMatch(/attached "tw" \(id tw, 4 points, with phase\) as the driver measurement of output "woofer"/);
  });

  it('--system adds a system measurement; the plan file itself is not changed', () => {
    const before = files['plan.bqplan'];
    const r = run('attach', 'plan.bqplan', 'room.csv', '--system');
    expect(r.code).toBe(0);
    const p = readPlanText(r.stdout);
    if (!p.ok) throw p.error;
    expect(p.plan.systemMeasurementIds).toEqual(['room']);
    expect(p.plan.measurements![0].phaseDeg).toBeNull();
    expect(files['plan.bqplan']).toBe(before);
  });

  it('a second attach with the same name gets a new id; replacing a driver says so', () => {
    attachBoth();
    const r = run('attach', 'p2.bqplan', 'tw.txt', '--output', 'tweeter', '--name', 'Dome');
    const p = readPlanText(r.stdout);
    if (!p.ok) throw p.error;
    expect(p.plan.measurements!.map((m) => m.id)).toEqual(['woofer-1m', 'dome', 'dome-2']);
    expect(r.stderr).toMatch(/no longer uses measurement "dome" \(it stays in the plan\)/);
  });

  it('ids: lower case, other characters as "-", at most 32, unique', () => {
    const p = readPlanValue({ ...PLAN, version: 3, measurements: [{ id: 'a', source: { fileName: '', kind: 'text' }, frequencyHz: [1, 2], magnitudeDb: [0, 0] }] });
    if (!p.ok) throw p.error;
    expect(measurementId(p.plan, 'Ä b/C')).toBe('b-c');
    expect(measurementId(p.plan, 'A')).toBe('a-2');
    expect(measurementId(p.plan, '***')).toBe('measurement');
    expect(measurementId(p.plan, 'x'.repeat(40))).toHaveLength(32);
  });

  it.each([
    [['attach', 'plan.bqplan', 'tw.txt'], 2, /exactly one of --output ID .* or --system/],
    [['attach', 'plan.bqplan', 'tw.txt', '--output', 'woofer', '--system'], 2, /exactly one of/],
    [['attach', 'plan.bqplan', 'tw.txt', '--system', '--offset-mm', '3'], 2, /--offset-mm belongs to an output/],
    [['attach', 'plan.bqplan', 'tw.txt', '--output', 'mid'], 2, /--output mid: no such output/],
    [['attach', 'plan.bqplan', '--output', 'woofer'], 2, /a PLAN file and a measurement FILE/],
    [['attach', 'plan.bqplan', 'tw.txt', '--output', 'woofer', '--offset-mm', 'far'], 2, /--offset-mm must be a number/],
    [['attach', 'plan.bqplan', 'bad.txt', '--output', 'woofer'], 1, /bad\.txt: line 2: frequency 90 Hz is below the previous one/],
    [['attach', 'plan.bqplan', 'missing.txt', '--output', 'woofer'], 1, /missing\.txt: cannot read/],
    [['attach', 'plan.bqplan', 'x.wav', '--output', 'woofer'], 1, /x\.wav: this host reads text files only/],
    [['attach', 'plan.bqplan', 'tw.txt', '--output', 'woofer', '--offset-mm', '1e6'], 1, /outputs\[0\]\.acousticOffset\.value: must be within \+\/-100000 mm/],
    [['attach', 'plan.bqplan', 'tw.txt', '--output', 'woofer', '--name', 'a\u0007b'], 1, /measurements\[0\]\.name: must not contain control characters/],
  ])('%j -> exit %i', (argv, code, message) => {
    const r = run(...(argv as string[]));
    expect(r.code).toBe(code);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(message);
    expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
  });
});

describe('attach with a byte reader (the Node command line)', () => {
  // The WAV fixtures are written by tests/reference/make_measure_fixtures.py (scipy.io.wavfile,
  // the impulse response of a known biquad cascade by scipy.signal.sosfilt).
  const WAV = 'tests/reference/fixtures/wav/ir-pcm24-48000.wav';
  const bytesIo: CliIo = {
    readText: (path) => (path in files ? files[path] : readFileSync(ROOT + path, 'utf8')),
    readBytes: (path) => (path in files ? new TextEncoder().encode(files[path]) : new Uint8Array(readFileSync(ROOT + path))),
  };

  it('a WAV impulse response is told by its header and attached with its phase and arrival delay', () => {
    const r = runCli(['attach', 'plan.bqplan', WAV, '--output', 'tweeter', '--offset-mm', '-12'], bytesIo);
    expect(r.stderr).toMatch(/attached "ir-pcm24-48000"/);
    expect(r.code).toBe(0);
    const p = readPlanText(r.stdout);
    if (!p.ok) throw p.error;
    const m = p.plan.measurements![0];
    expect(m.source).toEqual({ fileName: 'ir-pcm24-48000.wav', kind: 'wav' });
    expect(m.phaseDeg).not.toBeNull();
    expect(m.delayMs).toBeGreaterThan(0);
    expect(p.plan.outputs[1]).toMatchObject({ driverMeasurementId: 'ir-pcm24-48000', acousticOffset: { value: -12, unit: 'mm' } });
  });

  it('text through the byte reader is still text', () => {
    const r = runCli(['attach', 'plan.bqplan', 'tw.txt', '--system'], bytesIo);
    expect(r.code).toBe(0);
    const p = readPlanText(r.stdout);
    expect(p.ok && p.plan.measurements![0].source.kind).toBe('text');
  });

  it('a broken WAV header is refused with its field, no stack trace', () => {
    files['broken.wav'] = 'RIFF\u0004\u0000\u0000\u0000WAVEfmt ';
    const r = runCli(['attach', 'plan.bqplan', 'broken.wav', '--output', 'woofer'], bytesIo);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^error: broken\.wav: /);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });
});

describe('response --acoustic', () => {
  const FREQS = '50,100,1000,2000,5000,20000';

  it('without --acoustic nothing changes: the electrical JSON is the same with and without measurements', () => {
    attachBoth();
    const plain = JSON.parse(run('response', 'plan.bqplan', '--freqs', FREQS).stdout);
    const measured = JSON.parse(run('response', 'p2.bqplan', '--freqs', FREQS).stdout);
    expect(measured).toEqual(plain);
    expect(measured.acoustic).toBeUndefined();
    const withAcoustic = JSON.parse(run('response', 'p2.bqplan', '--freqs', FREQS, '--acoustic').stdout);
    const { acoustic, ...electrical } = withAcoustic;
    expect(electrical).toEqual(plain);
    expect(acoustic).toBeDefined();
  });

  it('per measured unmuted output and the sum, null outside the measured range (100 Hz .. 20 kHz), never extrapolated', () => {
    attachBoth();
    const r = run('response', 'p2.bqplan', '--freqs', FREQS, '--acoustic');
    expect(r.code).toBe(0);
    const a = JSON.parse(r.stdout).acoustic;
    expect(a.airTemperatureC).toBe(20);
    expect(a.speedOfSoundMps).toBeCloseTo(343.21, 2);
    expect(a.smoothing).toBe('none');
    expect(a.outputs.map((o: { id: string }) => o.id)).toEqual(['woofer', 'tweeter']);
    expect(a.summed).toEqual(['woofer', 'tweeter']);
    expect(a.unmeasured).toEqual([]); // the sub is muted
    const wf = a.outputs[0];
    expect(wf.offsetMs).toBeCloseTo(0.1, 3); // 34.3 mm at 343.2 m/s
    expect(wf.magnitudeDb[0]).toBeNull();
    expect(wf.phaseDeg[0]).toBeNull();
    expect(wf.groupDelayMs[0]).toBeNull();
    expect(a.sum.magnitudeDb[0]).toBeNull();
    expect(a.sum.magnitudeDb[5]).not.toBeNull(); // 20 kHz: the last measured point, inclusive
    // Flat drivers: the predicted outputs are the electrical ones, plus the woofer's 0.1 ms.
    const electrical = JSON.parse(r.stdout).outputs;
    for (let i = 1; i < 6; i++) {
      expect(wf.magnitudeDb[i]).toBeCloseTo(electrical[0].magnitudeDb[i], 9);
      expect(wf.groupDelayMs[i] - electrical[0].groupDelayMs[i]).toBeCloseTo(0.1, 3);
    }
    // and the sum at 2 kHz matches the core's prediction
    const plan = (readPlanText(files['p2.bqplan']) as { ok: true; plan: any }).plan;
    const core = predictAcoustic(plan, [2000]);
    expect(a.sum.magnitudeDb[3]).toBeCloseTo(core.sum!.magnitudeDb[0], 12);
  });

  it('CSV: acoustic columns after the electrical ones, empty cells where there is no value', () => {
    attachBoth();
    const r = run('response', 'p2.bqplan', '--freqs', '50,1000', '--acoustic', '--format', 'csv');
    const [header, row50, row1k] = r.stdout.trim().split('\n').map((l) => l.split(','));
    expect(header.slice(-9)).toEqual([
      'acoustic.woofer.magnitudeDb', 'acoustic.woofer.phaseDeg', 'acoustic.woofer.groupDelayMs',
      'acoustic.tweeter.magnitudeDb', 'acoustic.tweeter.phaseDeg', 'acoustic.tweeter.groupDelayMs',
      'acoustic.sum.magnitudeDb', 'acoustic.sum.phaseDeg', 'acoustic.sum.groupDelayMs',
    ]);
    expect(row50.slice(-9)).toEqual(Array(9).fill(''));
    expect(row1k.slice(-9).every((c) => c !== '' && Number.isFinite(Number(c)))).toBe(true);
  });

  it('--smooth smooths the drivers first (a flat driver stays flat); notes name unmeasured outputs', () => {
    attachBoth();
    const plain = JSON.parse(run('response', 'p2.bqplan', '--freqs', FREQS, '--acoustic').stdout).acoustic;
    const smooth = JSON.parse(run('response', 'p2.bqplan', '--freqs', FREQS, '--acoustic', '--smooth', '1/3').stdout).acoustic;
    expect(smooth.smoothing).toBe('1/3 oct');
    for (let i = 1; i < 6; i++) expect(smooth.sum.magnitudeDb[i]).toBeCloseTo(plain.sum.magnitudeDb[i], 9);
    const partial = run('response', 'p1.bqplan', '--freqs', FREQS, '--acoustic');
    expect(partial.stderr).toMatch(/the predicted sum leaves out "tweeter": no driver measurement/);
    expect(JSON.parse(partial.stdout).acoustic.unmeasured).toEqual(['tweeter']);
    const none = run('response', 'plan.bqplan', '--acoustic');
    expect(none.code).toBe(0);
    expect(JSON.parse(none.stdout).acoustic.sum).toBeNull();
    expect(none.stderr).toMatch(/no output has a driver measurement/);
  });

  it.each([
    [['response', 'plan.bqplan', '--smooth', '1/3'], /--smooth applies to the acoustic prediction: add --acoustic/],
    [['response', 'plan.bqplan', '--acoustic', '--smooth', 'lots'], /--smooth must be none, 1\/N/],
    [['response', 'plan.bqplan', '--acoustic', '--quantize', 'Q5.23'], /--acoustic cannot be combined with --quantize/],
    [['response', 'plan.bqplan', '--acoustic=yes'], /--acoustic takes no value/],
  ])('%j is a usage error', (argv, message) => {
    const r = run(...(argv as string[]));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
  });
});
