/**
 * Seeded mutation fuzzing of every command line command: plans, board profiles, exports and
 * imports mutated the ways hostile or broken files are (tests/fuzz/mutate.ts), run through coeffs,
 * response (plain and --quantize), check, export (every built-in profile and format, both
 * arrangements), import and profiles. Invariants (docs/plan-format.md, README "Exit codes"):
 *   - nothing throws out of runCli (a throw is a stack trace for the user);
 *   - exit code 0, 1 or 2; a refusal (1) is one "error: ..." line per problem;
 *   - successful output holds no NaN or Infinity;
 *   - every successful export imports back, and every successful import is a plan the reader
 *     accepts (and `check` accepts).
 * Hangs are caught by the test's own timeout. The seed is fixed so a failure reproduces; the
 * failures list names the seed, case and arguments.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import type { CliIo, CliResult } from '../../src/cli/run';
import { run, type Stats } from './invariants';
import { readPlanText } from '../../src/plan/read';
import { BUILT_IN_PROFILES } from '../../src/export/profiles';
import { EXPORT_FORMATS } from '../../src/export/format';
import { profileToJson } from '../../src/plan/write';
import { mulberry32, mutateMildly, mutateText, mutateValue, pick, type Rng } from './mutate';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const SEED = 20261202;
/** About 13 command runs per plan: 940 plans give over 10,000 cases. */
const PLANS = Number(process.env.FUZZ_PLANS ?? 940);

/** Invented plans: the two demo plans and three small ones that reach raw bands, shelves and fixed-point profiles. */
const BASES: string[] = [
  readFileSync(`${ROOT}assets/two-way-monitor.bqplan`, 'utf8'),
  readFileSync(`${ROOT}assets/three-way-hall.bqplan`, 'utf8'),
  JSON.stringify({
    format: 'biquadrant.plan',
    version: 2,
    name: 'raw and shelves (invented)',
    sampleRate: 96000,
    input: { bands: [{ id: 'ls', type: 'lowShelf', frequency: 120, gainDb: 4, slope: 1.5 }] },
    outputs: [
      {
        id: 'sub',
        name: 'Sub',
        gainDb: -2,
        delayMs: 1.5,
        lowPass: { family: 'linkwitz-riley', order: 8, frequency: 90 },
        bands: [
          { id: 'r1', type: 'raw', coefficients: { b0: 1.0005, b1: -1.99, b2: 0.99, a0: 1, a1: -1.99, a2: 0.9905 } },
          { id: 'p', type: 'peaking', frequency: 45, gainDb: 6, q: 8 },
        ],
      },
    ],
    profile: { name: 'Q5.23 board', number: { kind: 'fixed', integerBits: 5, fractionBits: 23, wordBits: 32, notation: 'hex' }, sectionBudget: 24 },
  }),
  JSON.stringify({
    format: 'biquadrant.plan',
    version: 1,
    name: 'version 1 (invented)',
    sampleRate: 44100,
    input: { bands: [] },
    outputs: [
      { id: 'a', highPass: { family: 'bessel', order: 5, frequency: 300, normalization: 'delay' }, bands: [{ id: 'h', type: 'highShelf', frequency: 8000, gainDb: -6, q: 0.9 }] },
      { id: 'b', invert: true, mute: true, bands: [{ id: 'n', type: 'notch', frequency: 60, q: 30 }, { id: 'x', type: 'allPass1', frequency: 900 }] },
    ],
  }),
];

const PROFILE_KEYS = BUILT_IN_PROFILES.map((b) => b.key);
const PROFILE_FILES = BUILT_IN_PROFILES.map((b) => JSON.stringify({ ...profileToJson(b.profile), sectionBudget: 200 }));

const io = (files: Record<string, string>): CliIo => ({
  readText: (p) => {
    if (!(p in files)) throw new Error(`ENOENT: no such file '${p}'`);
    return files[p];
  },
});

/** An import's plan must be one the reader accepts, and (every `checkEvery`-th one) `check` too. */
function importReadsBack(stats: Stats, label: string, r: CliResult | null, withCheck: boolean): void {
  if (!r || r.code !== 0) return;
  const back = readPlanText(r.stdout);
  if (!back.ok) {
    stats.failures.push(`${label}: import wrote a plan the reader refuses: ${back.error.message}`);
    return;
  }
  if (!withCheck) return;
  const c = run(stats, `${label} check of import`, ['check', 'imported.bqplan'], io({ 'imported.bqplan': r.stdout }));
  if (c && c.code !== 0) stats.failures.push(`${label}: check refused the imported plan: ${c.stderr.trim()}`);
}

function mutatedPlan(rng: Rng): string {
  const value = { value: JSON.parse(pick(rng, BASES)) };
  // About half the plans get changes a valid plan usually survives, so the successful paths
  // (export, import back, quantized response) are exercised as much as the refusals.
  if (rng() < 0.5) {
    for (let k = 0; k < 3; k++) mutateMildly(rng, value);
    return JSON.stringify(value.value, null, 2);
  }
  const count = 1 + Math.floor(rng() * 3);
  for (let k = 0; k < count; k++) mutateValue(rng, value);
  let text = JSON.stringify(value.value, null, 2);
  if (rng() < 0.3) text = mutateText(rng, text);
  return text;
}

function mutatedProfile(rng: Rng): string {
  const value = { value: JSON.parse(pick(rng, PROFILE_FILES)) };
  if (rng() < 0.7) mutateValue(rng, value);
  let text = JSON.stringify(value.value);
  if (rng() < 0.15) text = mutateText(rng, text);
  return text;
}

describe('seeded mutation fuzzing of every command', () => {
  it(`${PLANS} mutated plans, profiles, exports and imports: no throw, no NaN/Infinity, every export and import reads back`, () => {
    const rng = mulberry32(SEED);
    const stats: Stats = { cases: 0, ok: 0, failures: [] };
    run(stats, 'profiles', ['profiles'], io({}));
    run(stats, 'profiles', ['profiles', '--format', 'json'], io({}));
    for (let i = 0; i < PLANS; i++) {
      const label = `seed ${SEED} plan ${i}`;
      const files: Record<string, string> = { 'p.bqplan': mutatedPlan(rng), 'board.json': mutatedProfile(rng) };
      const f = io(files);
      for (const format of ['json', 'csv', 'text', 'c']) run(stats, label, ['coeffs', 'p.bqplan', '--format', format], f);
      for (const format of ['json', 'csv']) run(stats, label, ['response', 'p.bqplan', '--points', '40', '--format', format], f);
      run(stats, label, ['response', 'p.bqplan', '--freqs', '0,20,1000,23999', '--quantize', pick(rng, ['Q5.23', 'Q1.15', 'Q2.30'])], f);
      run(stats, label, ['check', 'p.bqplan', '--format', pick(rng, ['text', 'json'])], f);
      for (const profile of [pick(rng, PROFILE_KEYS), 'board.json']) {
        const format = pick(rng, EXPORT_FORMATS);
        const argv = ['export', 'p.bqplan', '--profile', profile, '--format', format];
        if (rng() < 0.4) argv.push('--arrange', 'suggested');
        const exp = run(stats, label, argv, f);
        if (!exp || exp.code !== 0) continue;
        // Every export of a valid plan imports back with the same profile.
        const back = run(stats, `${label} import of ${argv.join(' ')}`, ['import', 'list', '--profile', profile, '--format', format], io({ ...files, list: exp.stdout }));
        if (back && back.code !== 0) stats.failures.push(`${label}: export did not import back (${argv.join(' ')}): ${back.stderr.trim().slice(0, 200)}`);
        importReadsBack(stats, label, back, i % 4 === 0);
        // The same export, mutated: refused cleanly or read back.
        const mutated = run(stats, `${label} mutated import`, ['import', 'list', '--profile', profile], io({ ...files, list: mutateText(rng, exp.stdout) }));
        importReadsBack(stats, `${label} mutated import`, mutated, i % 4 === 2);
      }
    }
    // Enough cases, and enough of them accepted that the successful paths were exercised.
    expect(stats.failures.slice(0, 20)).toEqual([]);
    expect(stats.cases).toBeGreaterThanOrEqual(PLANS < 940 ? 0 : 10000);
    expect(stats.ok).toBeGreaterThan(stats.cases / 4);
  }, 600000);
});
