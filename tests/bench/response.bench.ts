/**
 * `npm run bench`: nanoseconds per point x section of the response kernel (complex H, exact group
 * delay and log-magnitude slope, in the WebAssembly kernel where the host has it), at sizes that
 * match real use, and the same sections and points through scipy.signal.sosfreqz (complex value
 * only) when python3 with scipy is present. Also per size: the first call on a new frequency grid
 * (the per-point sines included), the JavaScript fallback, and the presentation step (dB and phase)
 * per point. Times are the best of several runs (as Python's timeit recommends: the others only add
 * what the rest of the machine was doing); the spread of the runs is reported beside it, and so is
 * the machine's load average before and after (on a shared machine the figures depend on it).
 * `npm run --silent bench -- --json` prints one JSON object.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import { packSections, type Section } from '../../src/design/section';
import {
  allocateComplexResponse,
  cascadeComplex,
  cascadeComplexJs,
  normalizedOmega,
  presentMagnitudePhase,
  useWasmKernel,
  wasmKernel,
} from '../../src/response/kernel';
import { logFrequencies } from '../../src/response/chain-response';
import { measureBenchText, runMeasureBench } from './measure.bench';
import { fitBenchText, runFitBench } from './fit.bench';

const SIZES = [
  { sections: 16, points: 2048 },
  { sections: 128, points: 2048 },
  { sections: 200, points: 65536 },
];
const FS = 48000;

/** A deterministic mix of crossover and EQ sections (a small LCG, no Math.random). */
function makeSections(count: number): Section[] {
  let seed = 12345;
  const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
  const out: Section[] = [];
  while (out.length < count) {
    if (out.length % 8 === 0) out.push(...designEdge({ family: 'linkwitz-riley', order: 4, frequency: 200 + 3000 * rand() }, 'lowPass', FS));
    else {
      const frequency = 20 * Math.pow(1000, rand());
      out.push(...designBand({ id: 'x', type: 'peaking', frequency, gainDb: -12 + 24 * rand(), q: 0.3 + 6 * rand(), enabled: true }, FS));
    }
  }
  return out.slice(0, count);
}

/** Goals of the kernel (DEVELOPERS.md, "Response kernel"). */
const GOAL_NS = 3;
const GOAL_SCIPY_RATIO = 15;

interface KernelTiming {
  /** Best run, ns per point x section, the grid prepared (as during a drag). */
  best: number;
  /** Median and worst of the runs. */
  median: number;
  worst: number;
  /** The first call on a grid not seen before (per-point sines included). */
  firstCall: number;
  /** The JavaScript fallback, best run. */
  js: number;
  /** dB and phase from the complex result, ns per point. */
  presentPerPoint: number;
}

function bestOf(runs: number, reps: number, f: () => void): number[] {
  const out: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = process.hrtime.bigint();
    for (let i = 0; i < reps; i++) f();
    const t1 = process.hrtime.bigint();
    out.push(Number(t1 - t0) / reps);
  }
  return out.sort((a, b) => a - b);
}

function timeKernel(sections: Section[], points: number): KernelTiming {
  const packed = packSections(sections);
  const n = sections.length;
  const omega = normalizedOmega(logFrequencies(points, 20, 20000), FS);
  const out = allocateComplexResponse(points);
  const work = n * points;
  // Short runs, many of them: on a shared machine a run that fits in one time slice is the one
  // that shows what the kernel costs.
  const reps = Math.max(1, Math.min(50, Math.round(2e6 / work)));
  const runs = work > 5e6 ? 9 : 25;
  useWasmKernel(true);
  if (!wasmKernel()) throw new Error('WebAssembly SIMD is not available here');
  for (let i = 0; i < 3; i++) cascadeComplex(packed, n, omega, out); // warm-up (JIT, tier-up)
  // The first call on a grid new to the kernel (a hair off the real one).
  const fresh = Float64Array.from(omega, (w) => w * (1 + 1e-12));
  const t0 = process.hrtime.bigint();
  cascadeComplex(packed, n, fresh, out);
  const firstCall = Number(process.hrtime.bigint() - t0) / work;
  const t = bestOf(runs, reps, () => cascadeComplex(packed, n, omega, out)).map((x) => x / work);
  if (!Number.isFinite(out.re[points >> 1]) || !Number.isFinite(out.groupDelaySamples[points >> 1])) throw new Error('kernel produced a non-finite value');
  const js = bestOf(Math.max(3, runs >> 2), Math.max(1, reps >> 3), () => cascadeComplexJs(packed, n, omega, out))[0] / work;
  const db = new Float64Array(points);
  const ph = new Float64Array(points);
  const present = bestOf(runs, reps, () => presentMagnitudePhase(out, db, ph))[0] / points;
  return { best: t[0], median: t[t.length >> 1], worst: t[t.length - 1], firstCall, js, presentPerPoint: present };
}

const SCIPY = `
import json, sys, timeit
import numpy as np, scipy, scipy.signal as ss
d = json.load(open(sys.argv[1]))
res = []
for case in d['cases']:
    sos = np.array([[s[0], s[1], s[2], 1.0, s[3], s[4]] for s in case['sections']])
    f = np.array(case['freqs'])
    work = len(sos) * len(f)
    reps = max(1, min(20, int(2e7 // work)))
    t = min(timeit.repeat(lambda: ss.sosfreqz(sos, worN=f, fs=d['fs']), number=reps, repeat=5)) / reps
    res.append(t * 1e9 / work)
print(json.dumps({'scipy': scipy.__version__, 'ns': res}))
`;

function timeScipy(cases: { sections: Section[]; points: number }[]): { version: string; ns: number[] } | null {
  const dir = mkdtempSync(join(tmpdir(), 'bq-bench-'));
  try {
    const file = join(dir, 'cases.json');
    writeFileSync(
      file,
      JSON.stringify({
        fs: FS,
        cases: cases.map((c) => ({
          sections: c.sections.map((s) => [s.b0, s.b1, s.b2, s.a1, s.a2]),
          freqs: Array.from(logFrequencies(c.points, 20, 20000)),
        })),
      }),
    );
    const r = spawnSync('python3', ['-c', SCIPY, file], { encoding: 'utf8', maxBuffer: 1 << 26 });
    if (r.status !== 0) return null;
    const parsed = JSON.parse(r.stdout.trim().split('\n').pop() ?? '{}');
    return { version: parsed.scipy, ns: parsed.ns };
  } catch {
    return null;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const json = process.argv.includes('--json');
const loadBefore = loadavg();
const cases = SIZES.map((s) => ({ ...s, sections: makeSections(s.sections) }));
const ours = cases.map((c) => timeKernel(c.sections, c.points));
const scipy = timeScipy(cases);
const sizes = SIZES.map((s, i) => {
  const o = ours[i];
  const ratio = scipy ? scipy.ns[i] / o.best : null;
  return {
    sections: s.sections,
    points: s.points,
    nsPerPointSection: +o.best.toFixed(3),
    nsPerPointSectionMedian: +o.median.toFixed(3),
    nsPerPointSectionWorst: +o.worst.toFixed(3),
    nsPerPointSectionFirstCall: +o.firstCall.toFixed(3),
    jsNsPerPointSection: +o.js.toFixed(3),
    presentNsPerPoint: +o.presentPerPoint.toFixed(3),
    scipyNsPerPointSection: scipy ? +scipy.ns[i].toFixed(3) : null,
    ratio: ratio === null ? null : +ratio.toFixed(2),
    meetsGoal: o.best <= GOAL_NS && (ratio === null || ratio >= GOAL_SCIPY_RATIO),
  };
});
const loadAfter = loadavg();
const loadAverage = { before: loadBefore.map((x) => +x.toFixed(2)), after: loadAfter.map((x) => +x.toFixed(2)) };
const measure = runMeasureBench();
const fit = runFitBench();
if (json) {
  process.stdout.write(
    JSON.stringify({ sizes, measure, fit, loadAverage, kernel: 'wasm', goal: { nsPerPointSection: GOAL_NS, scipyRatio: GOAL_SCIPY_RATIO }, node: process.version, scipy: scipy?.version ?? null }) + '\n',
  );
} else {
  console.log(
    `response kernel (complex H, exact group delay and slope; WebAssembly SIMD), node ${process.version}` +
      (scipy ? `; scipy ${scipy.version} sosfreqz (complex only)` : '; scipy not found'),
  );
  console.log('sections  points   ns/(point x section): best  median  first call    js   | present ns/point | scipy sosfreqz  scipy / ours');
  for (const s of sizes) {
    const f = (x: number, w: number) => x.toFixed(2).padStart(w);
    console.log(
      `${String(s.sections).padStart(8)}  ${String(s.points).padStart(6)}   ${f(s.nsPerPointSection, 26)}  ${f(s.nsPerPointSectionMedian, 6)}  ${f(s.nsPerPointSectionFirstCall, 10)}  ${f(s.jsNsPerPointSection, 5)}   | ${f(s.presentNsPerPoint, 16)} | ${s.scipyNsPerPointSection === null ? '-'.padStart(14) : f(s.scipyNsPerPointSection, 14)}  ${s.ratio === null ? '-' : s.ratio.toFixed(1) + 'x'}${s.meetsGoal ? '' : '  (goal missed)'}`,
    );
  }
  console.log(`goal: at most ${GOAL_NS} ns per point x section and at least ${GOAL_SCIPY_RATIO}x faster than sosfreqz at every size`);
  console.log(`load average (1, 5, 15 min) before ${loadAverage.before.join(' ')}, after ${loadAverage.after.join(' ')}`);
  console.log(measureBenchText(measure));
  console.log(fitBenchText(fit));
}
