/**
 * `import` writes only plans the plan reader accepts, and refuses anything else naming where in
 * the input the refused value was read; every export of a valid plan imports back.
 * Limits: docs/plan-format.md ("Ranges and why", "Limits"); formats: docs/export.md.
 */
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { readPlanText, readPlanValue } from '../../src/plan/read';
import { LIMITS } from '../../src/plan/types';
import { EXPORT_FORMATS } from '../../src/export/format';
import { BUILT_IN_PROFILES } from '../../src/export/profiles';
import { profileToJson } from '../../src/plan/write';

const io = (files: Record<string, string>): CliIo => ({
  readText: (p) => {
    if (!(p in files)) throw new Error('no such file');
    return files[p];
  },
});

const importOf = (text: string, extra: string[] = [], name = 'list.txt') => runCli(['import', name, '--profile', 'float', ...extra], io({ [name]: text }));

const SECTION = '1 -1.9 0.905 -1.8 0.81';

function expectRefusedAt(r: ReturnType<typeof runCli>, where: string, reason: RegExp): void {
  expect(r.code).toBe(1);
  expect(r.stdout).toBe('');
  // One line: "error: FILE: WHERE: REASON".
  expect(r.stderr.split('\n')).toHaveLength(2);
  expect(r.stderr).toMatch(new RegExp(`^error: [^:]+: ${where.replace(/[[\]().]/g, '\\$&')}: `));
  expect(r.stderr).toMatch(reason);
}

describe('import refuses what the plan reader refuses, at the input line', () => {
  it('gain 2000 (+66 dB, beyond +/-60 dB)', () => {
    expectRefusedAt(importOf(`output a\ngain 2000\n${SECTION}\n`), 'line 2', /gainDb|within \+\/-60 dB/);
  });
  it('a coefficient of 1e400 (Infinity as a double)', () => {
    expectRefusedAt(importOf(`output a\n${SECTION}\n1e400 0 0 0 0\n`), 'line 3', /finite number|within \+\/-1000/);
  });
  it('sample rates 1, 0, -1, 1e308 from --sample-rate, and from the export\'s own rate line', () => {
    for (const rate of ['1', '0', '-1', '1e308']) {
      expectRefusedAt(importOf(`${SECTION}\n`, ['--sample-rate', rate]), '--sample-rate', /between 8000 and 384000 Hz/);
    }
    expectRefusedAt(importOf(`# Sample rate: 1e308 Hz\n${SECTION}\n`), 'line 1', /between 8000 and 384000 Hz/);
  });
  it('negative and non-numeric CSV delays', () => {
    const csv = (d: string) => `output,section,from,b0,b1,b2,a1,a2,gain,delaySamples,flags\na,1,x,${SECTION.split(' ').join(',')},1,${d},\n`;
    for (const d of ['-5', 'soon', '1e400']) expectRefusedAt(importOf(csv(d), [], 'l.csv'), 'line 2, delaySamples', /delay/);
  });
  it('output ids that collide once made plan ids ("A" and "a")', () => {
    expectRefusedAt(importOf(`output A\n${SECTION}\noutput a\n${SECTION}\n`), 'line 3', /used by another output/);
  });
  it('a 201-character output name, and a 201-character --name', () => {
    expectRefusedAt(importOf(`output ${'n'.repeat(201)}\n${SECTION}\n`), 'line 1', /at most 200 characters/);
    expectRefusedAt(importOf(`${SECTION}\n`, ['--name', 'p'.repeat(201)]), '--name', /at most 200 characters/);
  });
  it('an empty CSV: a clear one-line error, not a TypeError', () => {
    for (const text of ['', '\n\n']) {
      const r = importOf(text, ['--format', 'csv'], 'e.csv');
      expect(r.code).toBe(1);
      expect(r.stderr).toBe('error: e.csv: the CSV is empty (no header line)\n');
    }
  });
  it('a file name with a line break does not put one into the plan name', () => {
    const r = runCli(['import', 'odd\nname.txt', '--profile', 'float'], io({ 'odd\nname.txt': `${SECTION}\n` }));
    expect(r.code).toBe(0);
    const back = readPlanText(r.stdout);
    expect(back.ok).toBe(true);
  });
});

describe('every export of a valid plan imports back', () => {
  const peaks = (n: number, prefix: string) =>
    Array.from({ length: n }, (_, i) => ({ id: `${prefix}${i + 1}`, type: 'peaking', frequency: 30 * Math.pow(1.09, i), gainDb: ((i % 5) - 2) / 2, q: 2 }));
  const planOf = (input: number, edges: boolean, bands: number) => {
    const r = readPlanValue({
      format: 'biquadrant.plan',
      version: 2,
      name: 'full path',
      sampleRate: 48000,
      input: { bands: peaks(input, 'i') },
      outputs: [
        {
          id: 'a',
          highPass: edges ? { family: 'linkwitz-riley', order: 8, frequency: 80 } : null,
          lowPass: edges ? { family: 'linkwitz-riley', order: 8, frequency: 12000 } : null,
          bands: peaks(bands, 'b'),
        },
      ],
    });
    if (!r.ok) throw r.error;
    return r.plan;
  };
  const cases: [string, number, boolean, number, number][] = [
    // [name, input bands, LR8 edges, output bands, sections per output]
    ['68 sections: 64 bands and an LR8 high-pass', 0, false, 64, 64],
    ['136 sections: 64 input bands, LR8 high- and low-pass, 64 bands', 64, true, 64, 136],
  ];
  for (const [name, input, edges, bands, sections] of cases) {
    it(name, () => {
      const plan = planOf(input, edges, bands);
      if (name.startsWith('68')) plan.outputs[0].highPass = { family: 'linkwitz-riley', order: 8, frequency: 80 };
      const expected = name.startsWith('68') ? 68 : sections;
      const text = JSON.stringify(plan);
      for (const { key, profile } of BUILT_IN_PROFILES) {
        // Each built-in number format, with a budget that runs the whole path.
        const board = JSON.stringify({ ...profileToJson(profile), sectionBudget: LIMITS.sectionBudgetMax });
        for (const format of EXPORT_FORMATS) {
          const files = io({ 'p.bqplan': text, 'board.json': board });
          const exp = runCli(['export', 'p.bqplan', '--profile', 'board.json', '--format', format], files);
          expect(exp.code, `${key} ${format}: ${exp.stderr}`).toBe(0);
          const imp = runCli(['import', 'x', '--profile', 'board.json', '--format', format], io({ x: exp.stdout, 'board.json': board }));
          expect(imp.stderr).toBe('');
          expect(imp.code).toBe(0);
          const back = readPlanText(imp.stdout);
          expect(back.ok).toBe(true);
          if (back.ok) expect(back.plan.outputs[0].bands).toHaveLength(expected);
        }
      }
    });
  }
  it('the reader allows more than 64 bands only while the whole path stays within 136 sections', () => {
    const plan = planOf(64, true, 64);
    const raw = (n: number) => Array.from({ length: n }, (_, i) => ({ id: `r${i}`, type: 'raw', coefficients: { b0: 1, b1: 0, b2: 0, a1: 0, a2: 0 } }));
    const json = JSON.parse(JSON.stringify(plan));
    json.outputs[0].bands = raw(65);
    const r = readPlanValue(json);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.path).toBe('outputs[0].bands');
    json.input.bands = [];
    json.outputs[0].highPass = null;
    json.outputs[0].lowPass = null;
    json.outputs[0].bands = raw(LIMITS.pathSectionsMax);
    expect(readPlanValue(json).ok).toBe(true);
    json.outputs[0].bands = raw(LIMITS.pathSectionsMax + 1);
    expect(readPlanValue(json).ok).toBe(false);
  });
});
