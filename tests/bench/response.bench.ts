/**
 * `npm run bench`: nanoseconds per point x section of the response kernel (magnitude, phase and
 * exact group delay all computed), at sizes that match real use, and the same sections and points
 * through scipy.signal.sosfreqz (complex value only) when python3 with scipy is present.
 * `npm run --silent bench -- --json` prints one JSON object.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import { packSections, type Section } from '../../src/design/section';
import { allocateKernelOutput, cascadeResponse, normalizedOmega } from '../../src/response/kernel';
import { logFrequencies } from '../../src/response/chain-response';
import { measureBenchText, runMeasureBench } from './measure.bench';

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

function timeKernel(sections: Section[], points: number): number {
  const packed = packSections(sections);
  const omega = normalizedOmega(logFrequencies(points, 20, 20000), FS);
  const out = allocateKernelOutput(points);
  const work = sections.length * points;
  const reps = Math.max(3, Math.min(50, Math.round(2e7 / work)));
  for (let i = 0; i < 3; i++) cascadeResponse(packed, sections.length, omega, out); // warm-up (JIT)
  const runs: number[] = [];
  for (let r = 0; r < 7; r++) {
    const t0 = process.hrtime.bigint();
    for (let i = 0; i < reps; i++) cascadeResponse(packed, sections.length, omega, out);
    const t1 = process.hrtime.bigint();
    runs.push(Number(t1 - t0) / reps / work);
  }
  if (!Number.isFinite(out.magnitudeDb[points >> 1])) throw new Error('kernel produced a non-finite value');
  // The best of the runs, as Python's timeit (used for scipy below) recommends: the others only
  // add what the rest of the machine was doing.
  return Math.min(...runs);
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
const cases = SIZES.map((s) => ({ ...s, sections: makeSections(s.sections) }));
const ours = cases.map((c) => timeKernel(c.sections, c.points));
const scipy = timeScipy(cases);
const sizes = SIZES.map((s, i) => ({
  sections: s.sections,
  points: s.points,
  nsPerPointSection: +ours[i].toFixed(3),
  scipyNsPerPointSection: scipy ? +scipy.ns[i].toFixed(3) : null,
  ratio: scipy ? +(scipy.ns[i] / ours[i]).toFixed(2) : null,
}));
const measure = runMeasureBench();
if (json) {
  process.stdout.write(JSON.stringify({ sizes, measure, node: process.version, scipy: scipy?.version ?? null }) + '\n');
} else {
  console.log(`response kernel (magnitude, phase, exact group delay), node ${process.version}` + (scipy ? `; scipy ${scipy.version} sosfreqz (complex only)` : '; scipy not found'));
  console.log('sections  points   ns/(point x section)   scipy sosfreqz   scipy / ours');
  for (const s of sizes) {
    console.log(
      `${String(s.sections).padStart(8)}  ${String(s.points).padStart(6)}   ${s.nsPerPointSection.toFixed(2).padStart(20)}   ${s.scipyNsPerPointSection === null ? '-'.padStart(14) : s.scipyNsPerPointSection.toFixed(2).padStart(14)}   ${s.ratio === null ? '-' : s.ratio.toFixed(1) + 'x'}`,
    );
  }
  console.log('goal: at least 4x faster than sosfreqz at every size');
  console.log(measureBenchText(measure));
}
