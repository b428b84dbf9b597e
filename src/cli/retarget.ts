/**
 * `retarget PLAN --sample-rate HZ [--method bilinear|matched] [--tolerance DB]`: the plan at
 * another sample rate on stdout, and on stderr what moved: per band and edge the largest
 * magnitude difference between the old and the new design over 20 Hz - 20 kHz
 * (src/analysis/retarget.ts).
 */
import { retargetPlan, type RetargetEntry, type RetargetMethod } from '../analysis/retarget';
import { RETARGET_TOLERANCE_DB } from '../analysis/thresholds';
import { dbText, formatFrequency } from '../format';
import { LIMITS } from '../plan/types';
import { writePlanText } from '../plan/write';
import { optChoice, optNumber, parseArgs, UsageError } from './args';
import { InputError, loadPlan, type CliIo, type CliResult } from './io';

function where(e: RetargetEntry): string {
  return e.target.kind === 'band' ? `${e.target.chain}/${e.target.bandId} (${e.target.type} ${formatFrequency(e.itemFrequencyHz)}, ${e.methodAfter})` : `${e.target.outputId}/${e.target.edge} (edge ${formatFrequency(e.itemFrequencyHz)})`;
}

export function cmdRetarget(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['sample-rate', 'method', 'tolerance']);
  const rate = optNumber(args, 'sample-rate');
  if (rate === undefined) throw new UsageError('--sample-rate HZ is required');
  if (!(rate >= LIMITS.sampleRateMinHz && rate <= LIMITS.sampleRateMaxHz)) {
    throw new UsageError(`--sample-rate must be from ${LIMITS.sampleRateMinHz} to ${LIMITS.sampleRateMaxHz} Hz`);
  }
  const method = args.options.has('method') ? optChoice(args, 'method', ['bilinear', 'matched'] as const, 'bilinear') : 'keep';
  const tolerance = optNumber(args, 'tolerance') ?? RETARGET_TOLERANCE_DB;
  if (!(tolerance >= 0)) throw new UsageError('--tolerance must be a number of dB >= 0');
  const { plan, path } = loadPlan(args, io);
  const r = retargetPlan(plan, rate, method as RetargetMethod, tolerance);
  if (!r.ok) throw new InputError(`${path}: at ${rate} Hz: ${r.error.message}`);
  const res = r.result;
  const lines = [
    `${res.fromHz} Hz -> ${res.toHz} Hz: largest change of each band and edge over ${formatFrequency(res.rangeHz[0])} - ${formatFrequency(res.rangeHz[1])} (tolerance ${tolerance} dB)`,
  ];
  for (const e of res.entries) {
    const switched = e.methodBefore !== e.methodAfter ? `; now ${e.methodAfter}` : '';
    lines.push(`  ${where(e)}: ${dbText(e.deviationDb)} at ${formatFrequency(e.frequencyHz)}${e.moves ? ' MOVES' : ''}${switched}`);
  }
  if (res.entries.length === 0) lines.push('  no bands or edges');
  const moving = res.entries.filter((e) => e.moves && e.target.kind === 'band' && e.methodAfter === 'bilinear');
  if (moving.length > 0 && method !== 'matched') lines.push(`${moving.length} band(s) move more than ${tolerance} dB: --method matched keeps their analog shape where a matched design exists`);
  return { code: 0, stdout: writePlanText(res.plan), stderr: lines.join('\n') + '\n' };
}
