/**
 * The list of recently opened plans (File > Open Recent): newest first, no duplicates, capped.
 *
 * Plain Node. The list lives in `<userData>/recent.json` as `{ "recent": ["/abs/path.bqplan", ...] }`;
 * a missing or damaged file is an empty list (the list is a convenience, never worth an error).
 */
import { mkdir } from 'node:fs/promises';
import { dirname, normalize } from 'node:path';
import { realFileSystem, writeFileAtomic, type FileSystem } from './files';
import { validatePath } from './validate';

export const RECENT_MAX = 10;

export interface RecentOptions {
  max?: number;
  /** Paths differ only in letter case on case-insensitive file systems (Windows, macOS default). */
  caseInsensitive?: boolean;
}

export function defaultCaseInsensitive(platform: NodeJS.Platform = process.platform): boolean {
  return platform === 'win32' || platform === 'darwin';
}

/** What two paths of the same file have in common: normalized, and lower case where letter case does not count. */
export function samePathKey(path: string, caseInsensitive: boolean): string {
  const n = normalize(path);
  return caseInsensitive ? n.toLowerCase() : n;
}

/** The list with `path` first, any earlier entry for the same file removed, at most `max` long. */
export function addRecent(list: readonly string[], path: string, options: RecentOptions = {}): string[] {
  const max = options.max ?? RECENT_MAX;
  const ci = options.caseInsensitive ?? defaultCaseInsensitive();
  const key = samePathKey(path, ci);
  const rest = list.filter((p) => samePathKey(p, ci) !== key);
  return [normalize(path), ...rest].slice(0, max);
}

export function removeRecent(list: readonly string[], path: string, options: RecentOptions = {}): string[] {
  const ci = options.caseInsensitive ?? defaultCaseInsensitive();
  const key = samePathKey(path, ci);
  return list.filter((p) => samePathKey(p, ci) !== key);
}

export function hasRecent(list: readonly string[], path: string, options: RecentOptions = {}): boolean {
  const ci = options.caseInsensitive ?? defaultCaseInsensitive();
  const key = samePathKey(path, ci);
  return list.some((p) => samePathKey(p, ci) === key);
}

/** Keeps only absolute path strings, deduplicated and capped: what a stored list may hold. */
export function sanitizeRecent(value: unknown, options: RecentOptions = {}): string[] {
  if (typeof value !== 'object' || value === null) return [];
  const list = (value as { recent?: unknown }).recent;
  if (!Array.isArray(list)) return [];
  let out: string[] = [];
  // Oldest first through addRecent, so the stored order (newest first) is kept.
  for (const p of [...list].reverse()) {
    if (validatePath(p).ok) {
      out = addRecent(out, p, options);
    }
  }
  return out;
}

export async function loadRecent(file: string, options: RecentOptions = {}, fs: FileSystem = realFileSystem): Promise<string[]> {
  try {
    return sanitizeRecent(JSON.parse((await fs.readFile(file)).toString('utf8')), options);
  } catch {
    return [];
  }
}

export async function saveRecent(file: string, list: readonly string[], fs: FileSystem = realFileSystem): Promise<void> {
  await mkdir(dirname(file), { recursive: true });
  await writeFileAtomic(file, JSON.stringify({ recent: list }, null, 2) + '\n', { backup: false }, fs);
}
