/**
 * Validation of every IPC payload that reaches the main process, and of who sent it.
 *
 * Plain Node. The renderer is treated as untrusted: a compromised page could call any channel with
 * any values. Plans go through the core's reader (`readPlanValue`), which refuses unknown fields,
 * non-finite numbers and out-of-range values with a field path; everything else gets a typeof
 * check and a size limit. The argument count is checked too: an extra argument is refused.
 */
import { basename, isAbsolute } from 'node:path';
import { readPlanValue } from '../src/plan/read';
import type { Plan } from '../src/plan/types';
import type { PlanDocument, RecoveryChoice } from '../src/ipc';

export type Valid<T> = { ok: true; value: T } | { ok: false; error: string };

const MAX_PATH_LENGTH = 4096;
const MAX_TITLE_LENGTH = 300;
const MAX_FILE_NAME_LENGTH = 255;
/** Export text (coefficient files): far above any real export, far below a memory problem. */
export const MAX_TEXT_LENGTH = 32 * 1024 * 1024;
const MAX_EXTENSIONS = 8;

function refuse(error: string): { ok: false; error: string } {
  return { ok: false, error };
}

// Control characters (C0, DEL, C1): never part of a path, a title or a file name we accept.
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;

export function validatePlan(value: unknown): Valid<Plan> {
  const read = readPlanValue(value);
  return read.ok ? { ok: true, value: read.plan } : refuse(`plan refused: ${read.error.message}`);
}

export function validateBoolean(value: unknown, name: string): Valid<boolean> {
  return typeof value === 'boolean' ? { ok: true, value } : refuse(`${name}: must be true or false`);
}

/** An absolute file path as a string (no NUL, bounded). */
export function validatePath(value: unknown, name = 'path'): Valid<string> {
  if (typeof value !== 'string') return refuse(`${name}: must be a string`);
  if (value.length === 0 || value.length > MAX_PATH_LENGTH) return refuse(`${name}: must be 1 to ${MAX_PATH_LENGTH} characters`);
  if (value.includes('\0')) return refuse(`${name}: must not contain NUL`);
  if (!isAbsolute(value)) return refuse(`${name}: must be an absolute path`);
  return { ok: true, value };
}

export function validateOptionalPath(value: unknown, name = 'path'): Valid<string | null> {
  return value === null ? { ok: true, value: null } : validatePath(value, name);
}

export function validateDocument(value: unknown): Valid<PlanDocument> {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return refuse('document: must be an object');
  const keys = Object.keys(value);
  const extra = keys.filter((k) => k !== 'plan' && k !== 'path');
  if (extra.length > 0) return refuse(`document.${extra[0]}: unknown field`);
  const o = value as { plan?: unknown; path?: unknown };
  const path = validateOptionalPath(o.path === undefined ? null : o.path, 'document.path');
  if (!path.ok) return path;
  const plan = validatePlan(o.plan);
  if (!plan.ok) return plan;
  return { ok: true, value: { plan: plan.value, path: path.value } };
}

/** A window title as the renderer proposes it: a string, control characters removed, bounded. */
export function validateTitle(value: unknown): Valid<string> {
  if (typeof value !== 'string') return refuse('title: must be a string');
  if (value.length > MAX_TITLE_LENGTH) return refuse(`title: must be at most ${MAX_TITLE_LENGTH} characters`);
  if (CONTROL.test(value)) return refuse('title: must not contain control characters');
  return { ok: true, value };
}

/** A suggested file name for a save dialog: a bare name (no folders), bounded. */
export function validateFileName(value: unknown, name = 'suggestedName'): Valid<string> {
  if (typeof value !== 'string') return refuse(`${name}: must be a string`);
  if (value.length === 0 || value.length > MAX_FILE_NAME_LENGTH) return refuse(`${name}: must be 1 to ${MAX_FILE_NAME_LENGTH} characters`);
  if (CONTROL.test(value)) return refuse(`${name}: must not contain control characters`);
  if (value.includes('/') || value.includes('\\') || basename(value) !== value || value === '.' || value === '..') {
    return refuse(`${name}: must be a file name, not a path`);
  }
  return { ok: true, value };
}

export function validateText(value: unknown, name = 'text'): Valid<string> {
  if (typeof value !== 'string') return refuse(`${name}: must be a string`);
  if (value.length > MAX_TEXT_LENGTH) return refuse(`${name}: must be at most ${MAX_TEXT_LENGTH} characters`);
  return { ok: true, value };
}

/** File extensions for a save dialog filter, without dots: `["txt", "h"]`. */
export function validateExtensions(value: unknown): Valid<string[]> {
  if (!Array.isArray(value)) return refuse('extensions: must be a list');
  if (value.length === 0 || value.length > MAX_EXTENSIONS) return refuse(`extensions: must hold 1 to ${MAX_EXTENSIONS} entries`);
  for (let i = 0; i < value.length; i++) {
    const e: unknown = value[i];
    if (typeof e !== 'string' || !/^[A-Za-z0-9]{1,16}$/.test(e)) return refuse(`extensions[${i}]: must be 1 to 16 letters or digits, no dot`);
  }
  return { ok: true, value: [...(value as string[])] };
}

export function validateRecoveryChoice(value: unknown): Valid<RecoveryChoice> {
  return value === 'restore' || value === 'discard' ? { ok: true, value } : refuse('choice: must be "restore" or "discard"');
}

/** Refuses a call with more (or fewer) arguments than the method takes. */
export function validateArgumentCount(args: readonly unknown[], expected: number): Valid<null> {
  return args.length === expected ? { ok: true, value: null } : refuse(`expected ${expected} argument(s), got ${args.length}`);
}

/**
 * Whether a frame URL belongs to the app: the scheme and host of `appBase` (`app://biquadrant` in a
 * build, the dev server's `http://localhost:5173` in development), no credentials. Compared by
 * scheme and host rather than `URL.origin`, which is `"null"` for custom schemes.
 */
export function isAppUrl(url: string, appBase: string): boolean {
  let parsed: URL;
  let base: URL;
  try {
    parsed = new URL(url);
    base = new URL(appBase);
  } catch {
    return false;
  }
  if (parsed.username || parsed.password) return false;
  return parsed.protocol === base.protocol && parsed.host === base.host && parsed.host !== '';
}
