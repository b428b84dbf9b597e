/**
 * The `fit` command through runCli with an in-memory file system (README command table): the
 * fitted plan on stdout, the report on stderr (text or JSON), exit 1 with the field path for a
 * bad plan or target, 2 for a usage error, 0 with the report when limits bound.
 */
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { readPlanText } from '../../src/plan/read';
import { writePlanText } from '../../src/plan/write';
import { driverPlan, inverseCase, roomCase, systemPlan } from '../fit/helpers';

const FILES: Record<string, string> = {
  'room.bqplan': writePlanText(systemPlan(roomCase)),
  'driver.bqplan': writePlanText(driverPlan(inverseCase)),
  'target.txt': '# a house curve (invented)\n20 4\n100 2\n1000 0\n20000 -3\n',
  'bad-target.txt': '100 0\n50 1\n',
};
const io: CliIo = {
  readText(path) {
    if (!(path in FILES)) throw new Error(`ENOENT: no such file, open '${path}'`);
    return FILES[path];
  },
};
const run = (...argv: string[]) => runCli(argv, io);

describe('fit', () => {
  it('writes the plan with fitted input bands for --system and the text report on stderr', () => {
    const r = run('fit', 'room.bqplan', '--system', '--from', '30', '--to', '300', '--bands', '6');
    expect(r.code).toBe(0);
    const read = readPlanText(r.stdout);
    if (!read.ok) throw read.error;
    const bands = read.plan.input.bands;
    expect(bands.length).toBeGreaterThan(0);
    expect(bands.length).toBeLessThanOrEqual(6);
    expect(bands.every((b) => b.fitted === true && b.id.startsWith('fit'))).toBe(true);
    expect(read.plan.targets?.[0]).toMatchObject({ scope: 'system', fromHz: 30, toHz: 300 });
    expect(r.stderr).toMatch(/^fit of the system/);
    expect(r.stderr).toMatch(/error before: RMS \d+\.\d\d dB/);
    expect(r.stderr).toMatch(/error after: +RMS \d+\.\d\d dB/);
    expect(r.stderr).toContain('Caution:');
  });

  it('--report json: the figures as numbers, bands with the ids the plan gives them', () => {
    const r = run('fit', 'room.bqplan', '--system', '--from', '30', '--to', '300', '--bands', '6', '--report', 'json');
    expect(r.code).toBe(0);
    const rep = JSON.parse(r.stderr);
    const read = readPlanText(r.stdout);
    if (!read.ok) throw read.error;
    expect(rep.bands.map((b: { id: string }) => b.id)).toEqual(read.plan.input.bands.map((b) => b.id));
    expect(rep.after.rmsDb).toBeLessThan(rep.before.rmsDb);
    expect(rep.limits).toMatchObject({ bands: 6, maxBoostDb: 6, maxCutDb: 15, qMin: 0.5, qMax: 12 });
    expect(rep.smoothing).toBe('1/6');
  });

  it('honours the limits: --max-boost 0 places cuts only, --q-max bounds Q', () => {
    const r = run('fit', 'room.bqplan', '--system', '--from', '30', '--to', '300', '--max-boost', '0', '--q-min', '1', '--q-max', '3', '--bands', '5');
    expect(r.code).toBe(0);
    const read = readPlanText(r.stdout);
    if (!read.ok) throw read.error;
    for (const b of read.plan.input.bands) {
      expect(b.gainDb ?? 0).toBeLessThanOrEqual(0);
      expect(b.q ?? 0).toBeGreaterThanOrEqual(1);
      expect(b.q ?? 0).toBeLessThanOrEqual(3);
    }
  });

  it('a target FILE becomes a points target; tilt:DB@HZ a tilt', () => {
    const a = readPlanText(run('fit', 'driver.bqplan', '--output', 'main', '--target', 'target.txt', '--bands', '2').stdout);
    expect(a.ok && a.plan.targets?.[0].parts).toEqual([{ kind: 'points', points: [[20, 4], [100, 2], [1000, 0], [20000, -3]] }]);
    const b = readPlanText(run('fit', 'driver.bqplan', '--output', 'main', '--target', 'tilt:-0.5@1000', '--bands', '2').stdout);
    expect(b.ok && b.plan.targets?.[0].parts).toEqual([{ kind: 'tilt', dbPerOctave: -0.5, pivotHz: 1000 }]);
  });

  it('exit 1 for a bad target or a plan with nothing to fit, naming the line or field; stdout empty', () => {
    const bad = run('fit', 'driver.bqplan', '--output', 'main', '--target', 'bad-target.txt');
    expect(bad.code).toBe(1);
    expect(bad.stdout).toBe('');
    expect(bad.stderr).toMatch(/bad-target\.txt: line 2/);
    const tilt = run('fit', 'driver.bqplan', '--output', 'main', '--target', 'tilt:steep');
    expect(tilt.code).toBe(1);
    expect(run('fit', 'driver.bqplan', '--output', 'main', '--target', 'tilt:1@30000').stderr).toMatch(/target\.parts\[0\]\.pivotHz: must be below Nyquist/);
    const none = run('fit', 'room.bqplan', '--output', 'left');
    expect(none.code).toBe(1);
    expect(none.stderr).toMatch(/outputs\[0\]\.driverMeasurementId: is not set/);
  });

  it('exit 2 for usage errors: neither or both of --output and --system, bad numbers', () => {
    for (const argv of [
      ['fit', 'room.bqplan'],
      ['fit', 'room.bqplan', '--system', '--output', 'left'],
      ['fit', 'room.bqplan', '--system', '--bands', '2.5'],
      ['fit', 'room.bqplan', '--system', '--q-min', '4', '--q-max', '2'],
      ['fit', 'room.bqplan', '--system', '--smooth', 'var'],
      ['fit', 'room.bqplan', '--system', '--from', '300', '--to', '30'],
      ['fit', 'room.bqplan', '--output', 'nope'],
    ]) {
      const r = run(...argv);
      expect(r.code, argv.join(' ')).toBe(2);
      expect(r.stdout).toBe('');
    }
  });

  it('exit 0 with the report when limits bound: more bands asked than the budget leaves', () => {
    const plan = systemPlan(roomCase);
    plan.profile = { name: 'tiny', sampleRate: null, order: ['b0', 'b1', 'b2', 'a1', 'a2'], feedbackSign: 'as-computed', writeA0: false, number: { kind: 'decimal', significantDigits: null }, coefficientScale: 1, gain: 'separate', delayUnit: 'samples', maxDelaySamples: null, sectionBudget: 3 };
    FILES['tiny.bqplan'] = writePlanText(plan);
    const r = run('fit', 'tiny.bqplan', '--system', '--from', '30', '--to', '300', '--bands', '8');
    expect(r.code).toBe(0);
    const read = readPlanText(r.stdout);
    expect(read.ok && read.plan.input.bands.length).toBeLessThanOrEqual(3);
    expect(r.stderr).toContain('more were asked for than the budget leaves');
    expect(r.stderr).toContain('limits that bound:');
    expect(r.stderr).toContain('the section budget');
  });
});
