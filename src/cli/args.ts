/** A small argument parser for the command line: `--name value`, `--name=value` and positionals. */

export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export interface ParsedArgs {
  positionals: string[];
  options: Map<string, string | true>;
}

/** `flags` take no value; every other `--name` takes one. Unknown names are a usage error. */
export function parseArgs(argv: readonly string[], valued: readonly string[], flags: readonly string[] = []): ParsedArgs {
  const positionals: string[] = [];
  const options = new Map<string, string | true>();
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--') {
      positionals.push(...argv.slice(i + 1));
      break;
    }
    if (a.startsWith('--')) {
      const eq = a.indexOf('=');
      const name = eq >= 0 ? a.slice(2, eq) : a.slice(2);
      if (flags.includes(name)) {
        if (eq >= 0) throw new UsageError(`--${name} takes no value`);
        options.set(name, true);
        continue;
      }
      if (!valued.includes(name)) throw new UsageError(`unknown option --${name}`);
      let value: string | undefined;
      if (eq >= 0) value = a.slice(eq + 1);
      else {
        value = argv[i + 1];
        i++;
      }
      if (value === undefined || value === '') throw new UsageError(`--${name} needs a value`);
      if (options.has(name)) throw new UsageError(`--${name} given twice`);
      options.set(name, value);
    } else if (a.startsWith('-') && a.length > 1 && !/^-\d/.test(a)) {
      throw new UsageError(`unknown option ${a}`);
    } else {
      positionals.push(a);
    }
  }
  return { positionals, options };
}

export function optString(args: ParsedArgs, name: string): string | undefined {
  const v = args.options.get(name);
  return typeof v === 'string' ? v : undefined;
}

/** A finite number option, or a usage error naming the option. */
export function optNumber(args: ParsedArgs, name: string): number | undefined {
  const v = optString(args, name);
  if (v === undefined) return undefined;
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x)) throw new UsageError(`--${name} must be a number, not "${v}"`);
  return x;
}

export function optChoice<T extends string>(args: ParsedArgs, name: string, choices: readonly T[], fallback: T): T {
  const v = optString(args, name);
  if (v === undefined) return fallback;
  if (!(choices as readonly string[]).includes(v)) throw new UsageError(`--${name} must be one of ${choices.join(', ')}, not "${v}"`);
  return v as T;
}
