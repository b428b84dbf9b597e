/**
 * The command line, as pure code: arguments and a file reader in, stdout, stderr and an exit code
 * out (0 success, 1 an invalid plan or input file, 2 a usage error). `src/node/cli.ts` is the Node
 * adapter that runs it on process.argv.
 */
import { analyzePlan } from '../analysis/check';
import { diagnosticMessage, targetPath } from '../diagnostics';
import { HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION } from '../analysis/thresholds';
import { designPlan, type DesignedOutput } from '../design/chain';
import { readPlanText } from '../plan/read';
import type { Plan } from '../plan/types';
import { designedResponse, logFrequencies, MAGNITUDE_FLOOR_DB, type Response } from '../response/chain-response';
import { optChoice, optNumber, optString, parseArgs, UsageError, type ParsedArgs } from './args';
import { coeffsCsvText, coeffsCText, coeffsJsonText, coeffsListing, coeffsText } from './coeffs';
import { numText } from '../export/list';
import { cmdExport, cmdImport, cmdProfiles, quantizedResponseText } from './export';

export interface CliIo {
  /** Reads a text file; throws an Error with a readable message when it cannot. */
  readText(path: string): string;
}

export interface CliResult {
  code: 0 | 1 | 2;
  stdout: string;
  stderr: string;
}

/** Each command's usage block, as `COMMAND --help` prints it and the full usage lists it. */
export const COMMAND_USAGE: Record<string, string> = {
  coeffs: `  coeffs PLAN [--format json|csv|text|c] [--output ID]
      the sections of every output (or one) in the file convention
      H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2)`,
  response: `  response PLAN [--freqs F1,F2,...] [--points N --from F --to F] [--format json|csv] [--quantize Qm.n]
      magnitude (dB), phase (degrees) and group delay (ms) of each unmuted output and of their sum
      (default: 512 log-spaced points from 20 Hz to 20 kHz, clipped below Nyquist);
      --quantize Qm.n (e.g. Q5.23): of the sections quantized to Qm.n, from the exact integers`,
  check: `  check PLAN [--format text|json]
      validates the plan and prints the warnings (headroom, stability, Nyquist, missing high-pass)`,
  export: `  export PLAN [--profile NAME|FILE] [--format text|csv|json|c] [--output ID] [--arrange as-designed|suggested]
      the coefficient list a DSP board wants, per its board profile (default: the plan's own,
      else "float"); refused when an output needs more sections than the board runs.
      Saturated coefficients and sections unstable after quantization are flagged on stderr.
      --arrange suggested: sections reordered and scaled so no internal node peaks above 0 dBFS`,
  profiles: `  profiles [--format text|json]
      the built-in board profiles`,
  import: `  import FILE --profile NAME|FILE [--format auto|text|csv|json|c] [--name NAME] [--sample-rate HZ]
      a coefficient list (any export format) as a plan of raw bands, written to stdout`,
};

const EXIT_CODES = 'exit codes: 0 success, 1 invalid plan or input file, 2 usage error';

export const USAGE = `usage: biquadrant <command> [options]

commands:
${Object.values(COMMAND_USAGE).join('\n')}
  --version
      the version of biquadrant

${EXIT_CODES}`;

/** The usage of one command, for `COMMAND --help`. */
export function commandUsage(command: string): string {
  return `usage: biquadrant ${COMMAND_USAGE[command].trimStart()}\n\n${EXIT_CODES}`;
}

/** What the adapter knows that the pure core cannot read: the package's version. */
export interface CliInfo {
  version: string;
}

export class InputError extends Error {}

/** Registered commands; later features add theirs here. */
export const COMMANDS: Record<string, (argv: string[], io: CliIo) => CliResult> = {
  coeffs: cmdCoeffs,
  response: cmdResponse,
  check: cmdCheck,
  export: cmdExport,
  profiles: (argv) => cmdProfiles(argv),
  import: cmdImport,
};

export function runCli(argv: readonly string[], io: CliIo, info: CliInfo = { version: 'unknown' }): CliResult {
  const [command, ...rest] = argv;
  try {
    if (command === undefined || command === '--help' || command === '-h' || command === 'help') {
      return { code: command === undefined ? 2 : 0, stdout: command === undefined ? '' : USAGE + '\n', stderr: command === undefined ? USAGE + '\n' : '' };
    }
    if (command === '--version' || command === '-V') return { code: 0, stdout: `biquadrant ${info.version}\n`, stderr: '' };
    const fn = Object.hasOwn(COMMANDS, command) ? COMMANDS[command] : undefined;
    if (!fn) throw new UsageError(`unknown command "${command}"`);
    // `COMMAND --help` anywhere before a lone `--`: that command's usage, whatever else is given.
    const beforeEnd = rest.indexOf('--') < 0 ? rest : rest.slice(0, rest.indexOf('--'));
    if (beforeEnd.includes('--help') || beforeEnd.includes('-h')) return { code: 0, stdout: commandUsage(command) + '\n', stderr: '' };
    return fn(rest, io);
  } catch (e) {
    if (e instanceof UsageError) return { code: 2, stdout: '', stderr: `error: ${e.message}\n\n${USAGE}\n` };
    if (e instanceof InputError) return { code: 1, stdout: '', stderr: `error: ${e.message}\n` };
    throw e;
  }
}

/** Reads and validates the plan named by the single positional argument. */
export function loadPlan(args: ParsedArgs, io: CliIo): { plan: Plan; path: string } {
  if (args.positionals.length === 0) throw new UsageError('a PLAN file is required');
  if (args.positionals.length > 1) throw new UsageError(`one PLAN file only (got ${args.positionals.join(' ')})`);
  const path = args.positionals[0];
  let text: string;
  try {
    text = io.readText(path);
  } catch (e) {
    throw new InputError(`${path}: cannot read (${(e as Error).message})`);
  }
  const r = readPlanText(text);
  if (!r.ok) throw new InputError(`${path}: ${r.error.message}`);
  return { plan: r.plan, path };
}

export function checkOutputId(plan: Plan, id: string | undefined): void {
  if (id !== undefined && !plan.outputs.some((o) => o.id === id)) {
    throw new UsageError(`--output ${id}: no such output (the plan has ${plan.outputs.map((o) => o.id).join(', ')})`);
  }
}

function cmdCoeffs(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['format', 'output']);
  const format = optChoice(args, 'format', ['json', 'csv', 'text', 'c'] as const, 'json');
  const outputId = optString(args, 'output');
  const { plan } = loadPlan(args, io);
  checkOutputId(plan, outputId);
  const l = coeffsListing(plan, outputId);
  const text =
    format === 'json' ? coeffsJsonText(l) : format === 'csv' ? coeffsCsvText(l) : format === 'text' ? coeffsText(l, plan.name) : coeffsCText(l, plan.name);
  return { code: 0, stdout: text, stderr: '' };
}

/** The frequency list of `response`: --freqs, or --points/--from/--to (defaults 512, 20 Hz, 20 kHz). */
export function responseFrequencies(args: ParsedArgs, sampleRate: number): Float64Array {
  const nyquist = sampleRate / 2;
  const list = optString(args, 'freqs');
  if (list !== undefined) {
    if (args.options.has('points') || args.options.has('from') || args.options.has('to')) {
      throw new UsageError('--freqs cannot be combined with --points, --from or --to');
    }
    const parts = list.split(',').map((s) => s.trim());
    const freqs = parts.map((s) => {
      const f = Number(s);
      if (s === '' || !Number.isFinite(f)) throw new UsageError(`--freqs: "${s}" is not a number`);
      if (f < 0 || f > nyquist) throw new UsageError(`--freqs: ${s} Hz is outside 0 .. ${nyquist} Hz (Nyquist at ${sampleRate} Hz)`);
      return f;
    });
    return Float64Array.from(freqs);
  }
  const points = optNumber(args, 'points') ?? 512;
  if (!Number.isInteger(points) || points < 1 || points > 1_000_000) throw new UsageError('--points must be a whole number from 1 to 1000000');
  const from = optNumber(args, 'from') ?? 20;
  // "Clipped below Nyquist": the default top is 20 kHz or 99.9% of Nyquist, whichever is lower.
  const to = optNumber(args, 'to') ?? Math.min(HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION * nyquist);
  if (!(from > 0)) throw new UsageError('--from must be > 0 Hz');
  if (to > nyquist) throw new UsageError(`--to must be at most Nyquist (${nyquist} Hz)`);
  if (!(to >= from)) throw new UsageError('--to must not be below --from');
  if (points > 1 && to === from) throw new UsageError('--from and --to must differ when --points > 1');
  return logFrequencies(points, from, to);
}

const RAD_TO_DEG = 180 / Math.PI;

/** Degrees wrapped to (-180, 180] from radians in (-pi, pi]. */
export function toDegreesWrapped(rad: number): number {
  const d = rad * RAD_TO_DEG;
  return d <= -180 ? d + 360 : d > 180 ? d - 360 : d;
}

export interface ResponseColumns {
  magnitudeDb: (number | null)[];
  phaseDeg: (number | null)[];
  groupDelayMs: (number | null)[];
}

export function responseColumns(r: Response): ResponseColumns {
  const n = r.magnitudeDb.length;
  const out: ResponseColumns = { magnitudeDb: [], phaseDeg: [], groupDelayMs: [] };
  for (let i = 0; i < n; i++) {
    const m = r.magnitudeDb[i];
    const floor = !(m >= MAGNITUDE_FLOOR_DB);
    out.magnitudeDb.push(Number.isFinite(m) ? m : null);
    out.phaseDeg.push(Number.isFinite(m) ? toDegreesWrapped(r.phaseRad[i]) : null);
    out.groupDelayMs.push(floor || !Number.isFinite(r.groupDelayMs[i]) ? null : r.groupDelayMs[i]);
  }
  return out;
}

export function responseCsv(freqs: Float64Array, named: { id: string; cols: ResponseColumns }[]): string {
  const header = ['frequencyHz'];
  for (const n of named) header.push(`${n.id}.magnitudeDb`, `${n.id}.phaseDeg`, `${n.id}.groupDelayMs`);
  const rows = [header.join(',')];
  const cell = (x: number | null) => (x === null ? '' : numText(x));
  for (let i = 0; i < freqs.length; i++) {
    const row = [numText(freqs[i])];
    for (const n of named) row.push(cell(n.cols.magnitudeDb[i]), cell(n.cols.phaseDeg[i]), cell(n.cols.groupDelayMs[i]));
    rows.push(row.join(','));
  }
  return rows.join('\n') + '\n';
}

function cmdResponse(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['freqs', 'points', 'from', 'to', 'format', 'quantize']);
  const format = optChoice(args, 'format', ['json', 'csv'] as const, 'json');
  const { plan } = loadPlan(args, io);
  const quantize = optString(args, 'quantize');
  if (quantize !== undefined) return quantizedResponseText(plan, args, quantize, format);
  const freqs = responseFrequencies(args, plan.sampleRate);
  return responseResult(designPlan(plan), plan.sampleRate, freqs, format);
}

/**
 * The `response` output of designed outputs: each unmuted output and the sum, as CSV or JSON.
 * `extra` fields follow `sampleRate` in the JSON (the quantized branch names its format there).
 */
export function responseResult(
  designed: readonly DesignedOutput[],
  sampleRate: number,
  freqs: Float64Array,
  format: 'json' | 'csv',
  extra: Record<string, unknown> = {},
  stderr = '',
): CliResult {
  const r = designedResponse(designed, freqs, sampleRate);
  const outputs = r.outputs.filter((o) => !o.mute).map((o) => ({ id: o.id, cols: responseColumns(o.response) }));
  const sum = responseColumns(r.sum);
  if (format === 'csv') {
    return { code: 0, stdout: responseCsv(freqs, [...outputs, { id: 'sum', cols: sum }]), stderr };
  }
  const json = {
    sampleRate,
    ...extra,
    frequencies: Array.from(freqs),
    outputs: outputs.map((o) => ({ id: o.id, ...o.cols })),
    sum,
  };
  return { code: 0, stdout: JSON.stringify(json) + '\n', stderr };
}

function cmdCheck(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['format']);
  const format = optChoice(args, 'format', ['text', 'json'] as const, 'text');
  const { plan, path } = loadPlan(args, io);
  const a = analyzePlan(plan);
  if (format === 'json') {
    const warnings = a.warnings.map((w) => ({ severity: w.severity, code: w.code, where: targetPath(w.target), message: diagnosticMessage(w) }));
    return { code: 0, stdout: JSON.stringify({ valid: true, outputs: a.outputs, warnings }, null, 2) + '\n', stderr: '' };
  }
  const lines = [`${path}: valid plan "${plan.name}", ${plan.outputs.length} output(s) at ${plan.sampleRate} Hz`];
  for (const o of a.outputs) {
    lines.push(
      `  ${o.id}: headroom peak ${o.headroom.peakDb >= 0 ? '+' : ''}${o.headroom.peakDb.toFixed(2)} dB at ${o.headroom.frequencyHz.toPrecision(4)} Hz; largest pole radius ${o.largestPoleRadius.toFixed(6)}${o.stable ? '' : ' (UNSTABLE)'}`,
    );
  }
  if (a.warnings.length === 0) lines.push('no warnings');
  for (const w of a.warnings) lines.push(`${w.severity}: ${diagnosticMessage(w)}`);
  lines.push('Caution: high listening levels damage hearing and large boosts can destroy drivers; follow local regulations and qualified professionals.');
  return { code: 0, stdout: lines.join('\n') + '\n', stderr: '' };
}
