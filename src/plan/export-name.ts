/**
 * Export names: the identifier an output carries in exports (the text and CSV lists, the JSON
 * `id`, the C header's `bq_<name>_sos` arrays and `BQ_<NAME>_SECTIONS` macros, the budget
 * refusal). A plan may set one per output (`exportName`, version 3); without it the name is a
 * slug of the output's name, so it follows renames. Every effective name is a C identifier and
 * unique in the plan ignoring case (the C header upper-cases them for its macros).
 */
import { LIMITS, type Output } from './types';

/** A valid export name: a C identifier of at most 32 characters. */
export const EXPORT_NAME_PATTERN = /^[A-Za-z_][A-Za-z0-9_]{0,31}$/;

/** Why `name` cannot be an export name, or null when it can. */
export function exportNameProblem(name: string): string | null {
  if (name.length === 0) return 'must not be empty';
  if (name.length > LIMITS.exportNameMaxLength) return `must be at most ${LIMITS.exportNameMaxLength} characters`;
  if (!EXPORT_NAME_PATTERN.test(name)) return 'must be a C identifier: letters a-z or A-Z, digits 0-9 and "_", not starting with a digit';
  return null;
}

/**
 * The default export name of an output called `name`: lower case, accents dropped, every run of
 * other characters one "_", a leading digit prefixed with "out_" ("Main L" -> "main_l",
 * "2nd sub" -> "out_2nd_sub"); "output" when nothing is left.
 */
export function slugExportName(name: string): string {
  const ascii = name.normalize('NFKD').replace(/[\u0300-\u036f]/g, '').toLowerCase();
  let s = ascii.replace(/[^a-z0-9]+/g, '_').replace(/^_+|_+$/g, '');
  if (s === '') s = 'output';
  if (/^[0-9]/.test(s)) s = `out_${s}`;
  return trimTo(s, LIMITS.exportNameMaxLength);
}

function trimTo(s: string, n: number): string {
  return s.length <= n ? s : s.slice(0, n).replace(/_+$/, '') || s.slice(0, n);
}

/**
 * The export name of every output, in plan order: its own `exportName` when set, else the slug
 * of its name made unique with "_2", "_3", ... against every name already taken (set names
 * first, so a set name never moves).
 */
export function exportNames(outputs: readonly Pick<Output, 'name' | 'exportName'>[]): string[] {
  const taken = new Set(outputs.filter((o) => o.exportName !== undefined).map((o) => o.exportName!.toLowerCase()));
  return outputs.map((o) => {
    if (o.exportName !== undefined) return o.exportName;
    const base = slugExportName(o.name);
    let name = base;
    for (let k = 2; taken.has(name.toLowerCase()); k++) {
      const suffix = `_${k}`;
      name = trimTo(base, LIMITS.exportNameMaxLength - suffix.length) + suffix;
    }
    taken.add(name.toLowerCase());
    return name;
  });
}
