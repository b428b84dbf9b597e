/**
 * The command line, as pure code: arguments and a file reader in, stdout, stderr and an exit code
 * out (0 success, 1 an invalid plan or input file, 2 a usage error). `src/node/cli.ts` is the Node
 * adapter that runs it on process.argv. Shared pieces live in io.ts and response.ts, so the
 * command modules (this one, export.ts) import them and not each other.
 */
import { analyzePlan } from '../analysis/check';
import { diagnosticMessage, targetPath } from '../diagnostics';
import { designPlan } from '../design/chain';
import { optChoice, optString, parseArgs, UsageError } from './args';
import { headroomLine } from '../analysis/headroom-text';
import { coeffsCsvText, coeffsCText, coeffsJsonText, coeffsListing, coeffsText } from './coeffs';
import { cmdExport, cmdImport, cmdProfiles, quantizedResponseText } from './export';
import { checkOutputId, InputError, loadPlan, type CliIo, type CliResult } from './io';
import { responseFrequencies, responseResult } from './response';
import { cmdMeasure } from './measure';
import { acousticCsvColumns, acousticJson, acousticSection, smoothingOption } from './acoustic';
import { cmdAttach } from './attach';
import { cmdRetarget } from './retarget';
import { sensitivityDiagnostics } from '../export/sensitivity';
import { analogAddition } from './analog';
import { delaysRounded, withBoardDelays } from '../design/board-delay';
import { designedResponse } from '../response/chain-response';
import { DELAY_ROUNDING_SHOW_DB } from '../analysis/thresholds';
import { dbText, formatFrequency } from '../format';
import { cmdFit } from './fit';

export { checkOutputId, InputError, loadPlan, type CliIo, type CliResult } from './io';
export { responseColumns, responseCsv, responseFrequencies, responseResult, toDegreesWrapped, type ResponseAddition, type ResponseColumns } from './response';

/** Each command's usage block, as `COMMAND --help` prints it and the full usage lists it. */
export const COMMAND_USAGE: Record<string, string> = {
  coeffs: `  coeffs PLAN [--format json|csv|text|c] [--output ID]
      the sections of every output (or one) in the file convention
      H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2)`,
  response: `  response PLAN [--freqs F1,F2,...] [--points N --from F --to F] [--format json|csv] [--quantize Qm.n]
           [--acoustic [--smooth 1/N|var]] [--analog] [--exact-delay]
      magnitude (dB), phase (degrees) and group delay (ms) of each unmuted output and of their sum
      (default: 512 log-spaced points from 20 Hz to 20 kHz, clipped below Nyquist);
      --quantize Qm.n (e.g. Q5.23): of the sections quantized to Qm.n, from the exact integers;
      --acoustic: also the predicted acoustic response (driver measurement x chain x offset) of
      each unmuted output with a driver measurement, and their predicted sum; null outside a
      measurement's range; --smooth: the driver measurements smoothed first;
      --analog: also the analog prototype's curves (each band and edge as its s-domain design);
      delays are those the plan's board runs (rounded to whole samples when its profile says
      so; the sum's change is noted on stderr above 0.1 dB); --exact-delay: the exact delays`,
  check: `  check PLAN [--format text|json]
      validates the plan and prints the warnings (headroom, stability, Nyquist, missing high-pass,
      cramping: a band or edge more than 1 dB from its analog prototype over 20 Hz - 20 kHz)`,
  export: `  export PLAN [--profile NAME|FILE] [--format text|csv|json|c] [--output ID] [--arrange as-designed|suggested]
      the coefficient list a DSP board wants, per its board profile (default: the plan's own,
      else "float"); refused when an output needs more sections than the board runs.
      Saturated coefficients and sections unstable after quantization are flagged on stderr.
      --arrange suggested: sections reordered and scaled so no internal node peaks above 0 dBFS`,
  profiles: `  profiles [--format text|json]
      the built-in board profiles`,
  import: `  import FILE --profile NAME|FILE [--format auto|text|csv|json|c] [--name NAME] [--sample-rate HZ]
      a coefficient list (any export format) as a plan of raw bands, written to stdout`,
  measure: `  measure FILE [--format json|csv] [--channel N] [--gate START_MS,LENGTH_MS] [--smooth 1/N|var] [--min-phase]
      a measurement (text columns of Hz, dB, optional degrees; or a WAV impulse response) as
      imported: JSON {name, frequencyHz, magnitudeDb, phaseDeg, phaseEstimated, delayMs, notes}
      or CSV frequencyHz,magnitudeDb,phaseDeg; WAV: --channel from 1 (default 1), --gate ms
      before the peak and length (default 2,500); --min-phase: phase estimated from magnitude`,
  attach: `  attach PLAN FILE (--output ID | --system) [--offset-mm N | --offset-ms N] [--channel N] [--gate START_MS,LENGTH_MS] [--name NAME]
      the plan with the measurement in FILE (text columns, or a WAV impulse response: channel
      and gate as measure reads them) added as the output's driver measurement (with its
      acoustic offset in mm or ms) or as a system measurement, written to stdout`,
  retarget: `  retarget PLAN --sample-rate HZ [--method bilinear|matched] [--tolerance DB]
      the plan at another sample rate, written to stdout; on stderr how far each band and edge
      moves (largest dB difference over 20 Hz - 20 kHz); --method matched: bands moving more
      than the tolerance (default 0.5 dB) get a matched design; bilinear: every band bilinear`,
  fit: `  fit PLAN (--output ID | --system) [--target flat|tilt:DB_PER_OCT@HZ|FILE] [--from HZ --to HZ]
      [--bands N] [--max-boost DB] [--max-cut DB] [--q-min Q] [--q-max Q] [--smooth 1/N]
      [--report json|text]
      the plan with peaking bands fitted so the output's predicted acoustic response (or the
      system measurement, bands in the input chain) meets the target, written to stdout; the
      report (error before and after, bands, limits that bound, where the target is not met and
      why) on stderr. Defaults: the plan's target for it, else flat; 20 Hz to 20 kHz within the
      measurement; the section budget left; boost 6 dB, cut 15 dB, Q 0.5 to 12, 1/6 octave.
      FILE: frequency and dB columns, as measurements are written`,
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

/** Registered commands; later features add theirs here. */
export const COMMANDS: Record<string, (argv: string[], io: CliIo) => CliResult> = {
  coeffs: cmdCoeffs,
  response: cmdResponse,
  check: cmdCheck,
  export: cmdExport,
  profiles: (argv) => cmdProfiles(argv),
  import: cmdImport,
  measure: cmdMeasure,
  attach: cmdAttach,
  retarget: cmdRetarget,
  fit: cmdFit,
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

function cmdResponse(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['freqs', 'points', 'from', 'to', 'format', 'quantize', 'smooth'], ['acoustic', 'analog', 'exact-delay']);
  const format = optChoice(args, 'format', ['json', 'csv'] as const, 'json');
  const acoustic = args.options.get('acoustic') === true;
  const analog = args.options.get('analog') === true;
  const exactDelay = args.options.get('exact-delay') === true;
  if (!acoustic && args.options.has('smooth')) throw new UsageError('--smooth applies to the acoustic prediction: add --acoustic');
  const smoothing = smoothingOption(optString(args, 'smooth'));
  const { plan } = loadPlan(args, io);
  const quantize = optString(args, 'quantize');
  if (quantize !== undefined && acoustic) throw new UsageError('--acoustic cannot be combined with --quantize');
  if (quantize !== undefined && analog) throw new UsageError('--analog cannot be combined with --quantize');
  if (quantize !== undefined) return quantizedResponseText(plan, args, quantize, format);
  const freqs = responseFrequencies(args, plan.sampleRate);
  const exact = designPlan(plan);
  const designed = exactDelay ? exact : withBoardDelays(exact, plan);
  const notes: string[] = [];
  if (!exactDelay && delaysRounded(plan)) notes.push(delayRoundingNote(exact, designed, plan.sampleRate, freqs));
  const json: Record<string, unknown> = {};
  const csv: { header: string[]; row: (i: number) => string[] }[] = [];
  if (acoustic) {
    const a = acousticSection(plan, freqs, smoothing);
    json.acoustic = acousticJson(plan, a);
    csv.push(acousticCsvColumns(a));
    notes.push(...a.notes);
  }
  if (analog) {
    const a = analogAddition(plan, freqs);
    Object.assign(json, a.addition.json);
    csv.push(a.addition.csv);
    if (a.note) notes.push(a.note.trimEnd());
  }
  const addition = csv.length === 0 ? undefined : { json, csv: { header: csv.flatMap((c) => c.header), row: (i: number) => csv.flatMap((c) => c.row(i)) } };
  return responseResult(designed, plan.sampleRate, freqs, format, {}, notes.map((l) => l + '\n').join(''), addition);
}

/** What rounding the delays to the board's resolution does to the sum, for stderr. */
function delayRoundingNote(exact: ReturnType<typeof designPlan>, board: ReturnType<typeof designPlan>, sampleRate: number, freqs: Float64Array): string {
  const a = designedResponse(exact, freqs, sampleRate).sum.magnitudeDb;
  const b = designedResponse(board, freqs, sampleRate).sum.magnitudeDb;
  let worst = 0;
  let at = freqs[0];
  for (let i = 0; i < freqs.length; i++) {
    const d = b[i] - a[i];
    if (Number.isFinite(d) && Math.abs(d) > Math.abs(worst)) {
      worst = d;
      at = freqs[i];
    }
  }
  return Math.abs(worst) > DELAY_ROUNDING_SHOW_DB
    ? `delays rounded to the board's resolution: the sum differs from the exact delays' by ${dbText(worst)} at ${formatFrequency(at)} (--exact-delay for the exact delays)`
    : `delays rounded to the board's resolution (the sum moves by at most ${DELAY_ROUNDING_SHOW_DB} dB; --exact-delay for the exact delays)`;
}

function cmdCheck(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['format']);
  const format = optChoice(args, 'format', ['text', 'json'] as const, 'text');
  const { plan, path } = loadPlan(args, io);
  const analysis = analyzePlan(plan);
  // The board profile's number format, when the plan has one: sections it holds coarsely.
  const a = { ...analysis, warnings: [...analysis.warnings, ...sensitivityDiagnostics(plan)] };
  if (format === 'json') {
    const warnings = a.warnings.map((w) => ({ severity: w.severity, code: w.code, where: targetPath(w.target), message: diagnosticMessage(w) }));
    return { code: 0, stdout: JSON.stringify({ valid: true, outputs: a.outputs, warnings }, null, 2) + '\n', stderr: '' };
  }
  const lines = [`${path}: valid plan "${plan.name}", ${plan.outputs.length} output(s) at ${plan.sampleRate} Hz`];
  for (const o of a.outputs) {
    lines.push(
      `  ${o.id}: ${headroomLine(o)}; largest pole radius ${Number.isFinite(o.largestPoleRadius) ? o.largestPoleRadius.toFixed(6) : 'not computable'}${o.stable ? '' : ' (UNSTABLE)'}`,
    );
  }
  if (a.warnings.length === 0) lines.push('no warnings');
  for (const w of a.warnings) lines.push(`${w.severity}: ${diagnosticMessage(w)}`);
  lines.push('Caution: high listening levels damage hearing and large boosts can destroy drivers; follow local regulations and qualified professionals.');
  return { code: 0, stdout: lines.join('\n') + '\n', stderr: '' };
}
