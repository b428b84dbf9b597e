/**
 * The invariants every fuzzed command run must keep (README "Exit codes"): nothing throws out of
 * runCli (a throw is a stack trace for the user); exit code 0, 1 or 2; a refusal (1) is one
 * "error: ..." line per problem; successful output holds no NaN or Infinity.
 */
import { runCli, type CliIo, type CliResult } from '../../src/cli/run';

const NON_FINITE = /\b(NaN|Infinity)\b/;

export interface Stats {
  cases: number;
  ok: number;
  failures: string[];
}

/** Runs one command and checks the invariants every result must keep. */
export function run(stats: Stats, label: string, argv: string[], files: CliIo): CliResult | null {
  stats.cases++;
  let r: CliResult;
  try {
    r = runCli(argv, files);
  } catch (e) {
    stats.failures.push(`${label} ${argv.join(' ')}: threw ${(e as Error).stack?.split('\n').slice(0, 3).join(' | ')}`);
    return null;
  }
  if (![0, 1, 2].includes(r.code)) stats.failures.push(`${label} ${argv.join(' ')}: exit ${r.code}`);
  if (r.code === 0) {
    stats.ok++;
    if (NON_FINITE.test(r.stdout) || NON_FINITE.test(r.stderr)) stats.failures.push(`${label} ${argv.join(' ')}: NaN/Infinity in output ${(r.stdout.match(/.{0,60}\b(NaN|Infinity)\b.{0,20}/) ?? [''])[0]}`);
  }
  if (r.code === 1) {
    for (const line of r.stderr.replace(/\n$/, '').split('\n')) {
      if (!/^(error|warning): /.test(line)) stats.failures.push(`${label} ${argv.join(' ')}: refusal line "${line.slice(0, 80)}"`);
    }
  }
  return r;
}

