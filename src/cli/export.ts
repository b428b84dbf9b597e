/**
 * Command-line commands for board exports: `export`, `profiles`, `import`, and the quantized
 * branch of `response --quantize Qm.n`. Registered in run.ts's COMMANDS.
 */
import { designPlan } from '../design/chain';
import { diagnosticMessage } from '../diagnostics';
import { exportSection, buildExportList, type ExportList } from '../export/list';
import { EXPORT_FORMATS, formatExport, printable, type ExportFormat } from '../export/format';
import { importedPlan, parseCoefficientList, type ImportFormat } from '../export/import';
import { BUILT_IN_PROFILES, DEFAULT_PROFILE, describeProfile, findBuiltInProfile, readProfileValue, copyProfile, profileErrorText } from '../export/profiles';
import { quantizeProfile } from '../export/quantized';
import { qName } from '../export/fixed';
import { LIMITS, type BoardProfile, type Plan } from '../plan/types';
import { parseJsonText } from '../plan/read';
import { profileToJson, writePlanText } from '../plan/write';
import { optChoice, optNumber, optString, parseArgs, UsageError, type ParsedArgs } from './args';
import { checkOutputId, InputError, loadPlan, type CliIo, type CliResult } from './io';
import { responseFrequencies, responseResult } from './response';

/** --profile: a built-in by key or name, else a JSON file (a profile, or a plan holding one). */
export function resolveProfile(args: ParsedArgs, io: CliIo, plan: Plan | null): BoardProfile {
  const name = optString(args, 'profile');
  if (name === undefined) return plan?.profile ? copyProfile(plan.profile) : copyProfile(DEFAULT_PROFILE);
  const builtIn = findBuiltInProfile(name);
  if (builtIn) return builtIn;
  let text: string;
  try {
    text = io.readText(name);
  } catch (e) {
    throw new InputError(
      `--profile ${name}: neither a built-in profile (${BUILT_IN_PROFILES.map((b) => b.key).join(', ')}) nor a readable file (${(e as Error).message})`,
    );
  }
  const parsed = parseJsonText(text);
  if (!parsed.ok) throw new InputError(`${name}: ${parsed.error.message}`);
  const r = readProfileValue(parsed.value);
  if (!r.ok) throw new InputError(`${name}: ${profileErrorText(r.error)}`);
  return r.profile;
}

/** Warnings printed before an export: saturation, instability, notes of the list. */
export function exportWarnings(list: ExportList): string[] {
  return list.notes.map((n) => `warning: ${diagnosticMessage(n)}`);
}

export function cmdExport(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['profile', 'format', 'output', 'arrange']);
  const format = optChoice(args, 'format', EXPORT_FORMATS, 'text') as ExportFormat;
  const arrangement = optChoice(args, 'arrange', ['as-designed', 'suggested'] as const, 'as-designed');
  const outputId = optString(args, 'output');
  const { plan, path } = loadPlan(args, io);
  checkOutputId(plan, outputId);
  const profile = resolveProfile(args, io, plan);
  const r = buildExportList(plan, profile, outputId, { arrangement });
  if (!r.ok) {
    return { code: 1, stdout: '', stderr: r.problems.map((p) => `error: ${path}: ${diagnosticMessage(p)}\n`).join('') };
  }
  const warnings = exportWarnings(r.list);
  return { code: 0, stdout: formatExport(r.list, format), stderr: warnings.map((w) => w + '\n').join('') };
}

export function cmdProfiles(argv: string[]): CliResult {
  const args = parseArgs(argv, ['format']);
  const format = optChoice(args, 'format', ['text', 'json'] as const, 'text');
  if (args.positionals.length > 0) throw new UsageError('profiles takes no file');
  if (format === 'json') {
    const json = BUILT_IN_PROFILES.map((b) => ({ key: b.key, profile: profileToJson(b.profile) }));
    return { code: 0, stdout: JSON.stringify(json, null, 2) + '\n', stderr: '' };
  }
  const lines = BUILT_IN_PROFILES.map((b) => `${b.key.padEnd(14)} ${b.profile.name}\n${' '.repeat(15)}${describeProfile(b.profile, 48000).replace('48000 Hz', "plan's rate")}`);
  return { code: 0, stdout: lines.join('\n') + '\n', stderr: '' };
}

export function cmdImport(argv: string[], io: CliIo): CliResult {
  const args = parseArgs(argv, ['profile', 'format', 'name', 'sample-rate']);
  const format = optChoice(args, 'format', ['auto', 'text', 'csv', 'json', 'c'] as const, 'auto') as ImportFormat;
  if (args.positionals.length !== 1) throw new UsageError('import needs one coefficient FILE');
  const path = args.positionals[0];
  const profile = resolveProfile(args, io, null);
  const rate = optNumber(args, 'sample-rate');
  let text: string;
  try {
    text = io.readText(path);
  } catch (e) {
    throw new InputError(`${path}: cannot read (${(e as Error).message})`);
  }
  const r = parseCoefficientList(text, profile, format);
  if (!r.ok) throw new InputError(`${printable(path)}: ${r.error.message}`);
  try {
    // The default name is the file's, on one line and within the name limit.
    const name = optString(args, 'name') ?? `Imported from ${printable(path)}`.slice(0, LIMITS.nameMaxLength);
    const plan = importedPlan(r.list, name, rate ?? r.list.sampleRate ?? 48000, { name: '--name', sampleRate: '--sample-rate' });
    return { code: 0, stdout: writePlanText(plan), stderr: '' };
  } catch (e) {
    throw new InputError(`${printable(path)}: ${(e as Error).message}`);
  }
}

/**
 * `response --quantize Qm.n`: every section quantized to Qm.n (file convention, round to nearest
 * with ties away from zero, saturating), the gain and delay kept exact, so the only difference
 * from `response` is the coefficients' quantization.
 */
export function quantizedResponseText(plan: Plan, args: ParsedArgs, q: string, format: 'json' | 'csv'): CliResult {
  const profile = quantizeProfile(q);
  if (!profile) throw new UsageError(`--quantize must be Qm.n with m >= 1 and m + n <= 32 (e.g. Q5.23), not "${q}"`);
  const freqs = responseFrequencies(args, plan.sampleRate);
  const warnings: string[] = [];
  const designed = designPlan(plan).map((d) => ({
    ...d,
    sections: d.sections.map((s, k) => {
      const e = exportSection(s, k + 1, profile);
      if (e.saturated.length > 0) warnings.push(`warning: ${d.id} section ${k + 1} (${s.from}): ${e.saturated.join(', ')} saturated in ${q}`);
      if (!e.stable) warnings.push(`warning: ${d.id} section ${k + 1} (${s.from}): UNSTABLE in ${q} (pole radius ${e.poleRadius})`);
      return { ...e.quantized, from: s.from };
    }),
  }));
  const quantize = profile.number.kind === 'fixed' ? qName(profile.number) : 'Q';
  return responseResult(designed, plan.sampleRate, freqs, format, { quantize }, warnings.map((w) => w + '\n').join(''));
}
