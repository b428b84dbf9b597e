/** What every command shares: the file reader it is given, its result, and reading the PLAN argument. */
import { printable } from '../export/format';
import { readPlanText } from '../plan/read';
import type { Plan } from '../plan/types';
import { UsageError, type ParsedArgs } from './args';

export interface CliIo {
  /** Reads a text file; throws an Error with a readable message when it cannot. */
  readText(path: string): string;
  /** Reads a file's bytes (measurement files may be WAV); throws like readText. */
  readBytes?(path: string): Uint8Array;
}

export interface CliResult {
  code: 0 | 1 | 2;
  stdout: string;
  stderr: string;
}

export class InputError extends Error {}

/** Reads and validates the plan named by the single positional argument. */
export function loadPlan(args: ParsedArgs, io: CliIo): { plan: Plan; path: string } {
  if (args.positionals.length === 0) throw new UsageError('a PLAN file is required');
  if (args.positionals.length > 1) throw new UsageError(`one PLAN file only (got ${args.positionals.join(' ')})`);
  const path = args.positionals[0];
  let text: string;
  try {
    text = io.readText(path);
  } catch (e) {
    throw new InputError(`${printable(path)}: cannot read (${printable((e as Error).message)})`);
  }
  const r = readPlanText(text);
  // One line whatever the file name holds.
  if (!r.ok) throw new InputError(`${printable(path)}: ${r.error.message}`);
  return { plan: r.plan, path };
}

export function checkOutputId(plan: Plan, id: string | undefined): void {
  if (id !== undefined && !plan.outputs.some((o) => o.id === id)) {
    throw new UsageError(`--output ${id}: no such output (the plan has ${plan.outputs.map((o) => o.id).join(', ')})`);
  }
}

