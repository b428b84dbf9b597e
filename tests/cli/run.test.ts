/**
 * The command line (README, the command table) through runCli with an in-memory file system,
 * and once through the real `npm run --silent cli` to prove it runs without a build step.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { designPlan } from '../../src/design/chain';
import { readPlanValue } from '../../src/plan/read';
import { designedResponse, logFrequencies } from '../../src/response/chain-response';
import { angleDiffDeg, DB_PER_NEPER, EPS, loadFixture, RAD2DEG, sensitivity } from '../helpers/reference';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));

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
  name: 'CLI test plan',
  sampleRate: 48000,
  input: { bands: [{ id: 'b1', type: 'highPass', frequency: 25, q: 0.7071, enabled: true }, { id: 'off', type: 'peaking', frequency: 500, gainDb: 9, q: 2, enabled: false }] },
  outputs: [
    { id: 'woofer', name: 'Woofer', gainDb: -1.5, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: { family: 'linkwitz-riley', order: 8, frequency: 100 }, bands: [{ id: 'n1', type: 'notch', frequency: 1000, q: 5, enabled: true }] },
    { id: 'tweeter', name: 'Tweeter', gainDb: 0, delayMs: 0.1234, invert: true, mute: false, highPass: { family: 'linkwitz-riley', order: 8, frequency: 100 }, lowPass: null, bands: [] },
    { id: 'spare', name: 'Spare', gainDb: 0, delayMs: 0, invert: false, mute: true, highPass: null, lowPass: null, bands: [] },
  ],
};
const FILES = { 'plan.bqplan': JSON.stringify(PLAN) };
const io = memoryIo(FILES);
const run = (...argv: string[]) => runCli(argv, io);
const designed = () => {
  const r = readPlanValue(PLAN);
  if (!r.ok) throw new Error(r.error.message);
  return { plan: r.plan, outs: designPlan(r.plan) };
};

describe('exit codes and messages', () => {
  it('0 on success, nothing on stderr', () => {
    for (const argv of [['coeffs', 'plan.bqplan'], ['response', 'plan.bqplan', '--points', '5'], ['check', 'plan.bqplan']]) {
      const r = run(...argv);
      expect(r.code, argv.join(' ')).toBe(0);
      expect(r.stderr).toBe('');
      expect(r.stdout.length).toBeGreaterThan(0);
    }
  });
  it('1 for an invalid plan: one line naming the file and the field path', () => {
    const bad = structuredClone(PLAN) as any;
    bad.outputs[1].bands = [{ id: 'x', type: 'peaking', frequency: 1000, gainDb: 1, q: 0 }];
    const files = memoryIo({ 'bad.bqplan': JSON.stringify(bad), 'broken.bqplan': '{', 'nan.bqplan': JSON.stringify(PLAN).replace('"sampleRate":48000', '"sampleRate":"48000"') });
    for (const cmd of ['coeffs', 'response', 'check']) {
      const r = runCli([cmd, 'bad.bqplan'], files);
      expect(r.code).toBe(1);
      expect(r.stdout).toBe('');
      expect(r.stderr).toBe('error: bad.bqplan: outputs[1].bands[0].q: must be from 0.01 to 1000\n');
    }
    const broken = runCli(['coeffs', 'broken.bqplan'], files);
    expect(broken.code).toBe(1);
    expect(broken.stderr).toMatch(/^error: broken\.bqplan: not valid JSON/);
    expect(broken.stderr.trim().split('\n').length).toBe(1);
    const str = runCli(['response', 'nan.bqplan'], files);
    expect(str.code).toBe(1);
    expect(str.stderr).toBe('error: nan.bqplan: sampleRate: must be a number, not the string "48000"\n');
  });
  it('1 for a file that cannot be read, naming it', () => {
    const r = run('coeffs', 'missing.bqplan');
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^error: missing\.bqplan: cannot read/);
    expect(r.stderr.trim().split('\n').length).toBe(1);
  });
  it('2 for usage errors, with the usage text', () => {
    const cases: string[][] = [
      [],
      ['frobnicate'],
      ['coeffs'],
      ['coeffs', 'plan.bqplan', 'other.bqplan'],
      ['coeffs', 'plan.bqplan', '--format', 'xml'],
      ['coeffs', 'plan.bqplan', '--bogus', '1'],
      ['coeffs', 'plan.bqplan', '--output', 'nosuch'],
      ['response', 'plan.bqplan', '--freqs', '100,abc'],
      ['response', 'plan.bqplan', '--freqs', '30000'],
      ['response', 'plan.bqplan', '--freqs', '100', '--points', '3'],
      ['response', 'plan.bqplan', '--points', '0'],
      ['response', 'plan.bqplan', '--points', '2.5'],
      ['response', 'plan.bqplan', '--from', '-1'],
      ['response', 'plan.bqplan', '--to', '30000'],
      ['response', 'plan.bqplan', '--format', 'c'],
    ];
    for (const argv of cases) {
      const r = run(...argv);
      expect(r.code, argv.join(' ')).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toContain('usage: biquadrant <command>');
    }
  });
  it('--help prints the usage on stdout with exit 0', () => {
    const r = run('--help');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('coeffs PLAN');
  });
});

describe('coeffs', () => {
  const json = JSON.parse(run('coeffs', 'plan.bqplan').stdout);
  const { outs } = designed();
  it('JSON shape per cli.md, values from the core, input bands first, disabled bands left out', () => {
    expect(Object.keys(json)).toEqual(['sampleRate', 'outputs']);
    expect(json.sampleRate).toBe(48000);
    expect(json.outputs.map((o: any) => o.id)).toEqual(['woofer', 'tweeter', 'spare']);
    json.outputs.forEach((o: any, k: number) => {
      expect(Object.keys(o)).toEqual(['id', 'exportName', 'gain', 'delayMs', 'delaySamples', 'sections']);
      expect(o.sections.length).toBe(outs[k].sections.length);
      o.sections.forEach((s: any, i: number) => {
        expect(Object.keys(s)).toEqual(['b0', 'b1', 'b2', 'a1', 'a2', 'from']);
        const d = outs[k].sections[i];
        expect([s.b0, s.b1, s.b2, s.a1, s.a2]).toEqual([d.b0, d.b1, d.b2, d.a1, d.a2]);
      });
      expect(o.sections[0]?.from ?? 'input/b1').toBe('input/b1');
    });
    expect(json.outputs[0].sections.map((s: any) => s.from)).toEqual(['input/b1', 'woofer/lowPass', 'woofer/lowPass', 'woofer/lowPass', 'woofer/lowPass', 'woofer/n1']);
    expect(json.outputs.flatMap((o: any) => o.sections.map((s: any) => s.from))).not.toContain('input/off');
  });
  it('gain is linear with polarity; delaySamples is rounded to the nearest sample', () => {
    expect(json.outputs[0].gain).toBeCloseTo(Math.pow(10, -1.5 / 20), 15);
    expect(json.outputs[1].gain).toBe(-1);
    expect(json.outputs[1].delayMs).toBe(0.1234);
    expect(json.outputs[1].delaySamples).toBe(Math.round(0.1234 * 48)); // 5.92 -> 6
    expect(json.outputs[1].delaySamples).toBe(6);
  });
  it('--output picks one output', () => {
    const one = JSON.parse(run('coeffs', 'plan.bqplan', '--output', 'tweeter').stdout);
    expect(one.outputs.map((o: any) => o.id)).toEqual(['tweeter']);
  });
  const flat = (j: any) => j.outputs.flatMap((o: any) => o.sections.map((s: any) => [o.id, s.from, s.b0, s.b1, s.b2, s.a1, s.a2]));
  it('csv parses back to the same numbers (exact: shortest round-trip decimals)', () => {
    const lines = run('coeffs', 'plan.bqplan', '--format', 'csv').stdout.trimEnd().split('\n');
    expect(lines[0]).toBe('output,section,from,b0,b1,b2,a1,a2,gain,delayMs,delaySamples');
    const rows = lines.slice(1).map((l) => l.split(','));
    const sectionRows = rows.filter((r) => r[1] !== '0');
    expect(sectionRows.map((r) => [r[0], r[2], ...r.slice(3, 8).map(Number)])).toEqual(flat(json));
    for (const r of rows) {
      const o = json.outputs.find((x: any) => x.id === r[0]);
      expect([Number(r[8]), Number(r[9]), Number(r[10])]).toEqual([o.gain, o.delayMs, o.delaySamples]);
    }
    // An output with no sections still has its row (section 0, empty coefficients).
    const bare = { ...PLAN, input: { bands: [] }, outputs: [{ id: 'bare', gainDb: 6 }] };
    const b = runCli(['coeffs', 'b.bqplan', '--format', 'csv'], memoryIo({ 'b.bqplan': JSON.stringify(bare) })).stdout.trimEnd().split('\n');
    expect(b.length).toBe(2);
    const cells = b[1].split(',');
    expect([cells[0], cells[1], cells[3]]).toEqual(['bare', '0', '']);
    expect(Number(cells[8])).toBeCloseTo(Math.pow(10, 6 / 20), 15);
  });
  it('text parses back to the same numbers', () => {
    const out = run('coeffs', 'plan.bqplan', '--format', 'text').stdout;
    const rows: unknown[][] = [];
    let current = '';
    for (const line of out.split('\n')) {
      const head = /^output (\S+): gain (\S+) .*delay (\S+) ms = (\d+) samples/.exec(line);
      if (head) {
        current = head[1];
        const o = json.outputs.find((x: any) => x.id === current);
        expect([Number(head[2]), Number(head[3]), Number(head[4])]).toEqual([o.gain, o.delayMs, o.delaySamples]);
      }
      const m = /^\s+\d+\s+b0=(\S+) b1=(\S+) b2=(\S+) a1=(\S+) a2=(\S+)\s+\((.+)\)$/.exec(line);
      if (m) rows.push([current, m[6], ...m.slice(1, 6).map(Number)]);
    }
    expect(rows).toEqual(flat(json));
  });
  it('C parses back to the same numbers', () => {
    const out = run('coeffs', 'plan.bqplan', '--format', 'c').stdout;
    const rows: unknown[][] = [];
    let current = '';
    for (const line of out.split('\n')) {
      const head = /^\/\* output (\S+) \*\/$/.exec(line);
      if (head) current = head[1];
      const g = /^static const double bq_(\w+)_gain = (\S+);$/.exec(line);
      if (g) expect(Number(g[2])).toBe(json.outputs.find((x: any) => x.id === current).gain);
      const d = /^#define BQ_(\w+)_DELAY_SAMPLES (\d+)$/.exec(line);
      if (d) expect(Number(d[2])).toBe(json.outputs.find((x: any) => x.id === current).delaySamples);
      const m = /^\s+\{ (\S+), (\S+), (\S+), (\S+), (\S+) \},? \/\* (.+) \*\/$/.exec(line);
      if (m) rows.push([current, m[6], ...m.slice(1, 6).map(Number)]);
    }
    expect(rows).toEqual(flat(json));
    expect(out).toContain('#define BQ_SAMPLE_RATE 48000');
  });
});

describe('response', () => {
  const { plan, outs } = designed();
  it('JSON shape per cli.md; muted outputs left out; values are the core response', () => {
    const freqs = [0, 20, 100, 1000, 5000, 20000, 24000];
    const r = run('response', 'plan.bqplan', '--freqs', freqs.join(','));
    const j = JSON.parse(r.stdout);
    expect(Object.keys(j)).toEqual(['sampleRate', 'frequencies', 'outputs', 'sum']);
    expect(j.frequencies).toEqual(freqs);
    expect(j.outputs.map((o: any) => o.id)).toEqual(['woofer', 'tweeter']);
    for (const o of j.outputs) expect(Object.keys(o)).toEqual(['id', 'magnitudeDb', 'phaseDeg', 'groupDelayMs']);
    expect(Object.keys(j.sum)).toEqual(['magnitudeDb', 'phaseDeg', 'groupDelayMs']);
    const core = designedResponse(outs, freqs, plan.sampleRate);
    const cols = [...j.outputs, j.sum];
    const ref = [core.outputs[0].response, core.outputs[1].response, core.sum];
    cols.forEach((c: any, k: number) => {
      freqs.forEach((f, i) => {
        const m = ref[k].magnitudeDb[i];
        expect(Number.isNaN(m), `core magnitude at ${f}`).toBe(false);
        if (Number.isFinite(m)) {
          expect(c.magnitudeDb[i]).toBe(m);
          const deg = c.phaseDeg[i];
          expect(deg).toBeGreaterThan(-180);
          expect(deg).toBeLessThanOrEqual(180);
          expect(angleDiffDeg(deg, ref[k].phaseRad[i] * RAD2DEG)).toBeLessThan(1e-12);
        } else {
          expect(m).toBe(-Infinity); // an exact zero (0 Hz through a high-pass, Nyquist through a low-pass)
          expect(c.magnitudeDb[i]).toBeNull();
          expect(c.phaseDeg[i]).toBeNull();
        }
        // Group delay: null exactly where the magnitude is below -200 dB (cli.md).
        if (m < -200) expect(c.groupDelayMs[i]).toBeNull();
        else expect(c.groupDelayMs[i]).toBe(ref[k].groupDelayMs[i]);
      });
    });
    // The notch at 1 kHz on the woofer and the LR8 stop bands put values below -200 dB on this grid.
    expect(j.outputs[0].groupDelayMs.filter((x: unknown) => x === null).length).toBeGreaterThan(0);
    expect(j.outputs[0].magnitudeDb[5]).toBeLessThan(-200);
    expect(typeof j.outputs[0].magnitudeDb[5]).toBe('number');
  });
  it('--points/--from/--to give log-spaced frequencies, endpoints included; defaults 512 from 20 Hz to 20 kHz', () => {
    const j = JSON.parse(run('response', 'plan.bqplan', '--points', '7', '--from', '50', '--to', '5000').stdout);
    expect(j.frequencies.length).toBe(7);
    expect(j.frequencies[0]).toBe(50);
    expect(j.frequencies[6]).toBe(5000);
    for (let i = 1; i < 7; i++) expect(j.frequencies[i] / j.frequencies[i - 1]).toBeCloseTo(Math.pow(100, 1 / 6), 12);
    const d = JSON.parse(run('response', 'plan.bqplan').stdout);
    expect(d.frequencies.length).toBe(512);
    expect(d.frequencies[0]).toBe(20);
    expect(d.frequencies[511]).toBe(20000);
    expect(Array.from(logFrequencies(512, 20, 20000))).toEqual(d.frequencies);
  });
  it('the default top is clipped below Nyquist at low sample rates', () => {
    const low = { ...PLAN, sampleRate: 8000, outputs: [{ id: 'a' }] };
    const r = runCli(['response', 'low.bqplan'], memoryIo({ 'low.bqplan': JSON.stringify(low) }));
    const j = JSON.parse(r.stdout);
    expect(j.frequencies[j.frequencies.length - 1]).toBeLessThan(4000);
    expect(j.frequencies[j.frequencies.length - 1]).toBeGreaterThan(3900);
  });
  it('csv parses back to the JSON numbers; empty cells where JSON has null', () => {
    const freqs = '0,20,100,1000,20000';
    const j = JSON.parse(run('response', 'plan.bqplan', '--freqs', freqs).stdout);
    const lines = run('response', 'plan.bqplan', '--freqs', freqs, '--format', 'csv').stdout.trimEnd().split('\n');
    expect(lines[0]).toBe('frequencyHz,woofer.magnitudeDb,woofer.phaseDeg,woofer.groupDelayMs,tweeter.magnitudeDb,tweeter.phaseDeg,tweeter.groupDelayMs,sum.magnitudeDb,sum.phaseDeg,sum.groupDelayMs');
    const cols = [...j.outputs, j.sum];
    lines.slice(1).forEach((line, i) => {
      const cells = line.split(',');
      expect(Number(cells[0])).toBe(j.frequencies[i]);
      cols.forEach((c: any, k: number) => {
        const back = (s: string) => (s === '' ? null : Number(s));
        expect(back(cells[1 + 3 * k])).toBe(c.magnitudeDb[i]);
        expect(back(cells[2 + 3 * k])).toBe(c.phaseDeg[i]);
        expect(back(cells[3 + 3 * k])).toBe(c.groupDelayMs[i]);
      });
    });
  });
});

describe('response of the reference plans (plans.json) through the command line, end to end', () => {
  interface PlanCase {
    plan: { name: string; sampleRate: number };
    freqs: number[];
    exact: { outputs: { id: string; mute: boolean; magnitudeDb: number[]; phaseDeg: number[]; groupDelayMs: number[] }[]; sum: { magnitudeDb: number[]; phaseDeg: number[]; groupDelayMs: number[] } };
  }
  const fx = loadFixture<PlanCase>('plans.json');
  for (const c of fx.cases) {
    it(c.plan.name, () => {
      const r = runCli(['response', 'p.bqplan', '--freqs', c.freqs.join(',')], memoryIo({ 'p.bqplan': JSON.stringify(c.plan) }));
      expect(r.code).toBe(0);
      const j = JSON.parse(r.stdout);
      const read = readPlanValue(c.plan);
      if (!read.ok) throw new Error(read.error.message);
      const outs = designPlan(read.plan);
      const live = c.exact.outputs.filter((o) => !o.mute);
      expect(j.outputs.map((o: any) => o.id)).toEqual(live.map((o) => o.id));
      // The project's accuracy bar: 1e-6 dB, 1e-4 degrees, 1e-5 relative group delay. Here
      // tighter: 1e-9 dB / 1e-7 degrees plus each output's float64 bound (see response.test.ts).
      [...live.map((o, k) => ({ ref: o, got: j.outputs[k], secs: outs.find((d) => d.id === o.id)!.sections })), { ref: c.exact.sum, got: j.sum, secs: outs.flatMap((d) => d.sections) }].forEach(({ ref, got, secs }) => {
        c.freqs.forEach((f, i) => {
          const u = 64 * EPS * sensitivity(secs, (2 * Math.PI * f) / c.plan.sampleRate);
          expect(Math.abs(got.magnitudeDb[i] - ref.magnitudeDb[i])).toBeLessThan(Math.min(1e-6, 1e-9 + DB_PER_NEPER * u));
          expect(angleDiffDeg(got.phaseDeg[i], ref.phaseDeg[i])).toBeLessThan(Math.min(1e-4, 1e-7 + RAD2DEG * u));
          if (ref.magnitudeDb[i] > -200) expect(Math.abs(got.groupDelayMs[i] - ref.groupDelayMs[i])).toBeLessThan(1e-9 * Math.abs(ref.groupDelayMs[i]) + 1e-12);
        });
      });
    });
  }
});

describe('check', () => {
  it('exit 0 for a valid plan whatever the warnings; headroom and missing high-pass are reported', () => {
    const risky = structuredClone(PLAN) as any;
    risky.outputs[1].highPass = null;
    risky.outputs[0].bands = [{ id: 'boost', type: 'peaking', frequency: 60, gainDb: 8, q: 1 }];
    const files = memoryIo({ 'r.bqplan': JSON.stringify(risky) });
    const r = runCli(['check', 'r.bqplan'], files);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^r\.bqplan: valid plan "CLI test plan", 3 output\(s\) at 48000 Hz/);
    expect(r.stdout).toMatch(/woofer boosts \+\d+\.\d\d dB/);
    expect(r.stdout).toMatch(/output tweeter .*no high-pass edge/);
    expect(r.stdout).toMatch(/Caution: high listening levels/);
    const j = JSON.parse(runCli(['check', 'r.bqplan', '--format', 'json'], files).stdout);
    expect(j.valid).toBe(true);
    const codes = j.warnings.map((w: any) => `${w.code}:${w.where}`);
    expect(codes).toContain('headroom:woofer');
    expect(codes).toContain('no-high-pass:tweeter');
    const wooferHeadroom = j.outputs.find((o: any) => o.id === 'woofer').headroom;
    // 8 dB at 60 Hz minus 1.5 dB output gain, reduced a little by the LR8 and high-pass skirts.
    expect(wooferHeadroom.peakDb).toBeGreaterThan(5);
    expect(wooferHeadroom.peakDb).toBeLessThan(8 - 1.5 + 0.01);
  });
});

describe('the real command, no build step', () => {
  it('npm run --silent cli -- response assets/two-way-monitor.bqplan --freqs 100,1000', () => {
    const out = execFileSync('npm', ['run', '--silent', 'cli', '--', 'response', 'assets/two-way-monitor.bqplan', '--freqs', '100,1000'], {
      cwd: ROOT,
      encoding: 'utf8',
      timeout: 60000,
    });
    const j = JSON.parse(out);
    expect(j.frequencies).toEqual([100, 1000]);
    const inProcess = runCli(['response', 'assets/two-way-monitor.bqplan', '--freqs', '100,1000'], { readText: (p) => readFileSync(ROOT + p, 'utf8') });
    expect(j).toEqual(JSON.parse(inProcess.stdout));
    expect(j.outputs.map((o: any) => o.id)).toEqual(['woofer', 'tweeter']);
  });
  it('exit code 1 and the one-line message come through the real process too', () => {
    let code = 0;
    let stderr = '';
    try {
      execFileSync('npm', ['run', '--silent', 'cli', '--', 'coeffs', 'no/such/plan.bqplan'], { cwd: ROOT, encoding: 'utf8', timeout: 60000, stdio: 'pipe' });
    } catch (e: any) {
      code = e.status;
      stderr = String(e.stderr);
    }
    expect(code).toBe(1);
    expect(stderr).toMatch(/^error: no\/such\/plan\.bqplan: cannot read/);
  });
});
