/**
 * The command line's export commands through `runCli` (the same code the binary runs): exit codes
 * and messages of cli.md (0 success, 1 invalid plan or input, 2 usage), `export`, `import`,
 * `profiles`, and `response --quantize`; a profile file with a bare non-finite number; the gain of
 * the suggested arrangement within the plan's limits.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { profileToJson } from '../../src/plan/write';
import { BUILT_IN_PROFILES } from '../../src/export/profiles';
import { toFixed } from '../../src/export/fixed';
import { designPlan } from '../../src/design/chain';
import { readPlanText } from '../../src/plan/read';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
const PLAN = ASSETS + 'two-way-monitor.bqplan';

function io(extra: Record<string, string> = {}): CliIo {
  return {
    readText: (path) => {
      if (path in extra) return extra[path];
      return readFileSync(path, 'utf8');
    },
  };
}

describe('export', () => {
  it('writes the text list in the plan default (float) profile', () => {
    const r = runCli(['export', PLAN], io());
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^# Biquadrant export: Two-way studio monitor/);
    expect(r.stdout).toMatch(/# Board profile: float, a1\/a2 as computed/);
    expect(r.stdout).toMatch(/\noutput woofer\ngain 1\ndelay 0 samples\n/);
  });

  it('uses a built-in by key, one output, in CSV; flags saturation on stderr', () => {
    const r = runCli(['export', PLAN, '--profile', 'q1.31-negated', '--format', 'csv', '--output', 'tweeter'], io());
    expect(r.code).toBe(0);
    const rows = r.stdout.trim().split('\n');
    expect(rows[0]).toBe('output,section,from,b0,b1,b2,a1,a2,gain,delaySamples,flags');
    expect(rows).toHaveLength(5);
    // a1 of the 32 Hz input high-pass is about -1.996: negated it saturates Q1.31 at its top; the
    // output gain 1.0 (0 dB) saturates too: Q1.31 ends at 1 - 2^-31.
    expect(rows[1]).toMatch(/^tweeter,1,input\/b1,.*,2147483647,.*,SATURATED b1 a1; SATURATED gain$/);
    expect(rows.every((row, i) => i === 0 || row.startsWith('tweeter,'))).toBe(true);
    expect(r.stderr).toMatch(/warning: saturated coefficients: tweeter section 1/);
  });

  it('reads a profile file, and the plan\'s own profile by default', () => {
    const custom = { ...profileToJson(BUILT_IN_PROFILES[2].profile), name: 'file board', sectionBudget: 3 };
    const r = runCli(['export', PLAN, '--profile', 'board.json'], io({ 'board.json': JSON.stringify(custom) }));
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(
      `error: ${PLAN}: output "woofer" needs 4 sections, 1 more than the board's 3: remove or merge 1 band(s) or crossover section(s)\n` +
        `error: ${PLAN}: output "tweeter" needs 4 sections, 1 more than the board's 3: remove or merge 1 band(s) or crossover section(s)\n`,
    );
    expect(r.stdout).toBe('');
    const plan = { ...JSON.parse(readFileSync(PLAN, 'utf8')), version: 2, profile: { ...custom, sectionBudget: 4 } };
    const own = runCli(['export', 'p.bqplan', '--format', 'json'], io({ 'p.bqplan': JSON.stringify(plan) }));
    expect(own.code).toBe(0);
    expect(JSON.parse(own.stdout).profile.name).toBe('file board');
  });

  it('refuses a bad profile file with the field path, and an unknown name', () => {
    const bad = { ...profileToJson(BUILT_IN_PROFILES[0].profile), coefficientScale: 3 };
    const r = runCli(['export', PLAN, '--profile', 'bad.json'], io({ 'bad.json': JSON.stringify(bad) }));
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^error: bad\.json: coefficientScale: must be a power of two/);
    const u = runCli(['export', PLAN, '--profile', 'no-such-board'], io());
    expect(u.code).toBe(1);
    expect(u.stderr).toMatch(/neither a built-in profile \(float, q1\.31-negated, q5\.23, q2\.30-halved\) nor a readable file/);
  });

  it('is a usage error for an unknown format or output', () => {
    expect(runCli(['export', PLAN, '--format', 'xml'], io()).code).toBe(2);
    expect(runCli(['export', PLAN, '--output', 'sub'], io()).code).toBe(2);
  });
});

describe('import', () => {
  it('turns an export back into a plan of raw bands (float: exact)', () => {
    const exported = runCli(['export', PLAN, '--format', 'c'], io()).stdout;
    const r = runCli(['import', 'list.h', '--profile', 'float', '--name', 'Back'], io({ 'list.h': exported }));
    expect(r.code).toBe(0);
    const back = readPlanText(r.stdout);
    if (!back.ok) throw back.error;
    expect(back.plan.name).toBe('Back');
    expect(back.plan.outputs[0].bands.every((b) => b.type === 'raw')).toBe(true);
    const original = readPlanText(readFileSync(PLAN, 'utf8'));
    if (!original.ok) throw original.error;
    const a = designPlan(original.plan)[0].sections.map(({ from: _f, ...s }) => s);
    const b = designPlan(back.plan)[0].sections.map(({ from: _f, ...s }) => s);
    expect(b).toEqual(a);
  });
  it('names the line of a bad list', () => {
    const r = runCli(['import', 'x.txt', '--profile', 'q5.23'], io({ 'x.txt': '0x00800000 0 0 zz 0\n' }));
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/x\.txt: line 1: "zz"/);
  });
});

describe('profiles', () => {
  it('lists the four built-ins, named by what they are', () => {
    const r = runCli(['profiles', '--format', 'json'], io());
    expect(JSON.parse(r.stdout).map((p: { profile: { name: string } }) => p.profile.name)).toEqual([
      'float, a1/a2 as computed',
      'Q1.31, negated feedback',
      'Q5.23 in 32-bit words',
      'Q2.30 with halved coefficients',
    ]);
  });
});

describe('response --quantize', () => {
  it('computes the response from Q5.23 integers: differs from the exact one by the quantization only', () => {
    const exact = JSON.parse(runCli(['response', PLAN, '--freqs', '20,63,1000,2200,10000'], io()).stdout);
    const q = runCli(['response', PLAN, '--freqs', '20,63,1000,2200,10000', '--quantize', 'Q5.23'], io());
    expect(q.code).toBe(0);
    const quant = JSON.parse(q.stdout);
    expect(quant.quantize).toBe('Q5.23');
    expect(quant.frequencies).toEqual(exact.frequencies);
    for (let o = 0; o < 2; o++) {
      const a = exact.outputs[o].magnitudeDb as number[];
      const b = quant.outputs[o].magnitudeDb as number[];
      const diffs = a.map((x, i) => Math.abs(x - b[i]));
      // 23 fraction bits: not zero, and largest at 20 Hz below the 32 Hz high-pass, where
      // 1 + a1 + a2 ~ w0^2 ~ 2e-5 is only ~150 LSBs (references.md: low-frequency sections lose precision).
      expect(Math.max(...diffs)).toBeGreaterThan(0);
      expect(diffs[0]).toBe(Math.max(...diffs));
      expect(Math.max(...diffs.slice(2))).toBeLessThan(0.01);
    }
  });

  it('matches a one-section plan computed by hand from its Q5.23 integers', () => {
    const plan = JSON.parse(readFileSync(PLAN, 'utf8'));
    plan.input.bands = [];
    plan.outputs = [{ id: 'o', name: 'o', bands: [{ id: 'p', type: 'peaking', frequency: 1000, gainDb: 6, q: 2 }] }];
    const text = JSON.stringify(plan);
    const r = runCli(['response', 'p.bqplan', '--freqs', '1000', '--quantize', 'Q5.23'], io({ 'p.bqplan': text }));
    const read = readPlanText(text);
    if (!read.ok) throw read.error;
    const s = designPlan(read.plan)[0].sections[0];
    const k = [s.b0, s.b1, s.b2, s.a1, s.a2].map((x) => toFixed(x, { integerBits: 5, fractionBits: 23, wordBits: 32 }).integer / 2 ** 23);
    const w = (2 * Math.PI * 1000) / 48000;
    const re = (c: number[]) => c[0] + c[1] * Math.cos(w) + c[2] * Math.cos(2 * w);
    const im = (c: number[]) => -c[1] * Math.sin(w) - c[2] * Math.sin(2 * w);
    const num = [k[0], k[1], k[2]];
    const den = [1, k[3], k[4]];
    const mag = 10 * Math.log10((re(num) ** 2 + im(num) ** 2) / (re(den) ** 2 + im(den) ** 2));
    expect(JSON.parse(r.stdout).outputs[0].magnitudeDb[0]).toBeCloseTo(mag, 10);
  });

  it('is a usage error for a malformed Q format', () => {
    const r = runCli(['response', PLAN, '--quantize', 'Q40.1'], io());
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--quantize must be Qm\.n/);
  });
});

/**
 * A profile file (`export --profile FILE`) with a bare NaN or Infinity: not JSON (RFC 8259,
 * section 6), and the command line (README, "Exit codes") exits 1 with a one-line message naming
 * the file and the field path.
 */
describe('export --profile FILE with a bare non-finite number', () => {
  for (const token of ['NaN', 'Infinity', '-Infinity']) {
    it(`${token} in number.fractionBits: exit 1, one line naming the file and the path`, () => {
      const text = `{ "sectionBudget": 8, "number": { "kind": "fixed", "integerBits": 2, "fractionBits": ${token}, "wordBits": 32 } }`;
      const r = runCli(['export', PLAN, '--profile', 'board.json'], io({ 'board.json': text }));
      expect(r.code).toBe(1);
      expect(r.stdout).toBe('');
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toContain('board.json');
      expect(lines[0]).toContain('number.fractionBits');
      expect(lines[0]).toContain(token);
    });
  }
});

/**
 * `export --arrange suggested` with a separate gain: the gain takes back the level the scaling
 * removed, but never past the plan's +/-60 dB output gain (docs/plan-format.md), so the list still
 * imports as a plan; what it cannot take back is noted. Found by the CLI fuzzer (tests/fuzz).
 */
describe('suggested scaling keeps the make-up gain within +/-60 dB', () => {
  it('an output at +50 dB with a +30 dB peak: gain capped, the shortfall noted, the list imports back', () => {
    const plan = {
      format: 'biquadrant.plan',
      version: 2,
      name: 'loud (invented)',
      sampleRate: 48000,
      input: { bands: [] },
      outputs: [{ id: 'a', gainDb: 50, bands: [{ id: 'p', type: 'peaking', frequency: 1000, gainDb: 30, q: 2 }] }],
    };
    const files = { 'p.bqplan': JSON.stringify(plan) };
    const exp = runCli(['export', 'p.bqplan', '--arrange', 'suggested', '--format', 'csv'], io(files));
    expect(exp.code).toBe(0);
    // +50 dB gain and 30 dB taken out by the scaling: 80 dB wanted, 59.99 dB allowed, 20.01 dB short.
    expect(exp.stderr).toMatch(/leaves the output 20\.01 dB below the design/);
    const imp = runCli(['import', 'l.csv', '--profile', 'float'], io({ 'l.csv': exp.stdout }));
    expect(imp.stderr).toBe('');
    expect(imp.code).toBe(0);
    const back = readPlanText(imp.stdout);
    expect(back.ok).toBe(true);
    if (back.ok) expect(back.plan.outputs[0].gainDb).toBeCloseTo(59.99, 9);
  });
});
