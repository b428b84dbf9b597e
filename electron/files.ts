/**
 * Plan files on disk: reading with the core's reader, and atomic saving with a backup.
 *
 * Plain Node (no Electron), so it is tested on its own. Every file system call goes through the
 * small `FileSystem` interface, which the tests wrap to inject a failure at any step (a crash
 * mid-write, a failed rename) and check that the previous file is still whole.
 *
 * Saving a plan, in this order:
 *  1. the plan is read back through the core's validator (`readPlanValue`): a bad plan is refused
 *     with the reader's field path before anything touches the disk;
 *  2. the new text goes to a temporary file beside the target (same directory, so the final rename
 *     stays on one file system and is atomic), which is flushed with fsync;
 *  3. the current target, if any, is copied the same way (temp, fsync, rename) to `<target>.bak`;
 *  4. the temporary file is renamed over the target, and the directory is flushed (best effort).
 * Before step 2, `savePlanFileChecked` refuses a read-only file, a link to a file not named
 * `*.bqplan`, and (when told what the window last saw) a file another program changed meanwhile.
 * A failure at any step removes the temporary files and leaves the target as it was. A process
 * killed between steps leaves at most a hidden `.*.tmp` file; the target is never half written,
 * because it is only ever replaced by rename (POSIX rename(2); Windows MoveFileEx with
 * MOVEFILE_REPLACE_EXISTING, which Node's fs.rename uses).
 */
import * as nodeFs from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { createHash, randomBytes } from 'node:crypto';
import { readPlanText, readPlanValue } from '../src/plan/read';
import { writePlanText } from '../src/plan/write';
import type { Plan } from '../src/plan/types';

/** The extension of plan files, with its dot. */
export const PLAN_EXTENSION = '.bqplan';
/** The backup of the previous version sits beside the plan: `name.bqplan.bak`. */
export const BACKUP_SUFFIX = '.bak';
/** Larger files are refused before reading: a plan at every limit is far below this. */
export const MAX_PLAN_FILE_BYTES = 16 * 1024 * 1024;

export interface WritableHandle {
  writeFile(data: string | Uint8Array): Promise<void>;
  sync(): Promise<void>;
  close(): Promise<void>;
}

/** The subset of `node:fs/promises` this module uses. */
export interface FileSystem {
  readFile(path: string): Promise<Buffer>;
  /** Opens for writing; `flags` is `'wx'` (create, fail if it exists) or `'r'` (to fsync a directory). */
  open(path: string, flags: string, mode?: number): Promise<WritableHandle>;
  rename(from: string, to: string): Promise<void>;
  unlink(path: string): Promise<void>;
  stat(path: string): Promise<FileStats>;
  /** Like `stat`, but a symbolic link is described itself rather than followed. */
  lstat(path: string): Promise<FileStats & { isSymbolicLink(): boolean }>;
  realpath(path: string): Promise<string>;
}

export interface FileStats {
  size: number;
  mode: number;
  mtimeMs: number;
  isFile(): boolean;
}

export const realFileSystem: FileSystem = {
  readFile: (p) => nodeFs.readFile(p),
  open: (p, flags, mode) => nodeFs.open(p, flags, mode),
  rename: (a, b) => nodeFs.rename(a, b),
  unlink: (p) => nodeFs.unlink(p),
  stat: (p) => nodeFs.stat(p),
  lstat: (p) => nodeFs.lstat(p),
  realpath: (p) => nodeFs.realpath(p),
};

export type FileResult<T> = { ok: true; value: T } | { ok: false; error: string };

/** The `code` of a Node file system error (`ENOENT`...), if it has one. */
export function errorCode(e: unknown): string | undefined {
  return typeof e === 'object' && e !== null && 'code' in e ? String((e as { code: unknown }).code) : undefined;
}

/** A short, user-facing reason for a failed file operation. */
export function describeFileError(e: unknown): string {
  switch (errorCode(e)) {
    case 'ENOENT':
      return 'the file or its folder does not exist';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EISDIR':
      return 'it is a folder, not a file';
    case 'ENOSPC':
      return 'the disk is full';
    case 'EROFS':
      return 'the disk is read-only';
    default:
      return e instanceof Error ? e.message : String(e);
  }
}

/** Appends `.bqplan` unless the path already ends with it (any letter case). */
export function withPlanExtension(path: string): string {
  return path.toLowerCase().endsWith(PLAN_EXTENSION) ? path : path + PLAN_EXTENSION;
}

export function isPlanPath(path: string): boolean {
  return path.toLowerCase().endsWith(PLAN_EXTENSION);
}

/**
 * What a plan file looked like when this window last read or wrote it: size, modification time and
 * a SHA-256 of its bytes. A save compares it with the file as it is now, to notice a change made
 * by another program in between (the time alone can miss a change within the file system's time
 * resolution, or one that restores the time; the hash cannot).
 */
export interface DiskFingerprint {
  size: number;
  mtimeMs: number;
  sha256: string;
}

export function sha256(bytes: string | Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export function sameFingerprint(a: DiskFingerprint, b: DiskFingerprint): boolean {
  return a.size === b.size && a.mtimeMs === b.mtimeMs && a.sha256 === b.sha256;
}

/** The file's fingerprint now, or null when there is no file at `path`. */
export async function fingerprintFile(path: string, fs: FileSystem = realFileSystem): Promise<DiskFingerprint | null> {
  let st: FileStats;
  try {
    st = await fs.stat(path);
  } catch (e) {
    if (errorCode(e) === 'ENOENT') return null;
    throw e;
  }
  if (!st.isFile() || st.size > MAX_PLAN_FILE_BYTES) return { size: st.size, mtimeMs: st.mtimeMs, sha256: '' };
  return { size: st.size, mtimeMs: st.mtimeMs, sha256: sha256(await fs.readFile(path)) };
}

/**
 * Reads a plan file. A file the core refuses comes back as `{ok: false}` with the reader's message,
 * field path included (`outputs[1].bands[0].q: must be > 0`). Reading never writes.
 */
export async function readPlanFile(path: string, fs: FileSystem = realFileSystem): Promise<FileResult<Plan>> {
  const read = await readPlanFileTracked(path, fs);
  return read.ok ? { ok: true, value: read.value.plan } : read;
}

/** `readPlanFile`, also giving the fingerprint of the bytes it read (see `DiskFingerprint`). */
/** The largest measurement file read (a WAV impulse response of a few minutes at a high rate). */
export const MAX_MEASUREMENT_FILE_BYTES = 256 * 1024 * 1024;

/**
 * A measurement file's name and bytes, for the renderer's importer (which says what is wrong with
 * a file it cannot read); refused here only when it is no file or too large to read whole.
 */
export async function readMeasurementFile(path: string, fs: FileSystem = realFileSystem): Promise<FileResult<{ fileName: string; bytes: Uint8Array }>> {
  const name = basename(path);
  try {
    const st = await fs.stat(path);
    if (!st.isFile()) return { ok: false, error: `Cannot open "${name}": it is not a file.` };
    if (st.size > MAX_MEASUREMENT_FILE_BYTES) return { ok: false, error: `Cannot open "${name}": ${st.size} bytes is too large for a measurement (at most ${MAX_MEASUREMENT_FILE_BYTES}).` };
    const bytes = await fs.readFile(path);
    return { ok: true, value: { fileName: name, bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength) } };
  } catch (e) {
    return { ok: false, error: `Cannot open "${name}": ${describeFileError(e)}.` };
  }
}

export async function readPlanFileTracked(path: string, fs: FileSystem = realFileSystem): Promise<FileResult<{ plan: Plan; disk: DiskFingerprint }>> {
  const name = basename(path);
  let bytes: Buffer;
  let st: FileStats;
  try {
    st = await fs.stat(path);
    if (!st.isFile()) return { ok: false, error: `Cannot open "${name}": it is not a file.` };
    if (st.size > MAX_PLAN_FILE_BYTES) {
      return { ok: false, error: `Cannot open "${name}": ${st.size} bytes is too large for a plan (at most ${MAX_PLAN_FILE_BYTES}).` };
    }
    bytes = await fs.readFile(path);
  } catch (e) {
    return { ok: false, error: `Cannot open "${name}": ${describeFileError(e)}.` };
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return { ok: false, error: `Cannot open "${name}": not UTF-8 text.` };
  }
  // A byte order mark is not JSON; editors on some systems add one.
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const read = readPlanText(text);
  if (!read.ok) return { ok: false, error: `Cannot open "${name}": ${read.error.message}` };
  return { ok: true, value: { plan: read.plan, disk: { size: bytes.length, mtimeMs: st.mtimeMs, sha256: sha256(bytes) } } };
}

function tempPathBeside(target: string): string {
  return join(dirname(target), `.${basename(target)}.${process.pid}-${randomBytes(6).toString('hex')}.tmp`);
}

async function removeQuietly(fs: FileSystem, path: string): Promise<void> {
  try {
    await fs.unlink(path);
  } catch {
    // Already gone, or the disk refuses: the temporary file is hidden and harmless.
  }
}

/** Writes `data` to a new temporary file beside `target` and flushes it; returns the temp path. */
async function writeTemp(fs: FileSystem, target: string, data: string | Uint8Array, mode: number): Promise<string> {
  const temp = tempPathBeside(target);
  let handle: WritableHandle | undefined;
  try {
    handle = await fs.open(temp, 'wx', mode);
    await handle.writeFile(data);
    await handle.sync();
    await handle.close();
    handle = undefined;
    return temp;
  } catch (e) {
    if (handle) await handle.close().catch(() => undefined);
    await removeQuietly(fs, temp);
    throw e;
  }
}

/** Flushes the directory entry after a rename (POSIX); not possible on Windows, where it is skipped. */
async function syncDirectory(fs: FileSystem, dir: string): Promise<void> {
  try {
    const handle = await fs.open(dir, 'r');
    try {
      await handle.sync();
    } finally {
      await handle.close();
    }
  } catch {
    // Best effort: the rename itself is already atomic.
  }
}

async function existingFile(fs: FileSystem, path: string): Promise<{ mode: number } | null> {
  try {
    const st = await fs.stat(path);
    if (!st.isFile()) throw Object.assign(new Error('it is a folder, not a file'), { code: 'EISDIR' });
    return { mode: st.mode & 0o777 };
  } catch (e) {
    if (errorCode(e) === 'ENOENT') return null;
    throw e;
  }
}

export interface AtomicWriteOptions {
  /** Keep the previous content as `<target>.bak` (plans: yes; exports and recovery: no). */
  backup: boolean;
}

/**
 * Replaces `target` with `data` atomically: the target is either the old file or the new one,
 * never a mix. Throws on failure, with the target untouched and no temporary file left behind.
 * A symbolic link is followed, so the link stays a link and the file it points to is replaced.
 */
export async function writeFileAtomic(
  target: string,
  data: string | Uint8Array,
  options: AtomicWriteOptions,
  fs: FileSystem = realFileSystem,
): Promise<void> {
  let real = target;
  try {
    real = await fs.realpath(target);
  } catch (e) {
    if (errorCode(e) !== 'ENOENT') throw e;
  }
  const previous = await existingFile(fs, real);
  const temp = await writeTemp(fs, real, data, previous?.mode ?? 0o666);
  try {
    if (previous && options.backup) {
      // The old content goes through the same temp-fsync-rename path, so a crash here leaves the
      // previous backup (or none) and never a half-written one.
      const backupTemp = await writeTemp(fs, real + BACKUP_SUFFIX, await fs.readFile(real), previous.mode);
      try {
        await fs.rename(backupTemp, real + BACKUP_SUFFIX);
      } catch (e) {
        await removeQuietly(fs, backupTemp);
        throw e;
      }
    }
    await fs.rename(temp, real);
  } catch (e) {
    await removeQuietly(fs, temp);
    throw e;
  }
  await syncDirectory(fs, dirname(real));
}

/** Why a save did not happen, for the caller to act on: ask about a changed file, or just say why. */
export type PlanSaveResult =
  | { ok: true; value: Plan; disk: DiskFingerprint | null }
  | { ok: false; error: string; changedOnDisk?: undefined }
  | { ok: false; error: string; changedOnDisk: DiskFingerprint | null };

export interface PlanSaveOptions {
  /**
   * The file as this window last read or wrote it. When given, a file that differs now (changed,
   * replaced or removed by another program) is not written: the result says `changedOnDisk`.
   * Leave it out to overwrite whatever is there (Save As, after the OS dialog's own question, or
   * once the user chose Overwrite).
   */
  expected?: DiskFingerprint;
}

/**
 * Why `path` must not be written as a plan, or null when it may: a read-only file is refused
 * (replacing it by rename would succeed on most systems and silently drop the protection), and so
 * is a symbolic link that leads to a file not named `*.bqplan` (the link's name must not let a plan
 * overwrite some other file).
 */
export async function planWriteRefusal(path: string, fs: FileSystem = realFileSystem): Promise<string | null> {
  return writeRefusal(path, true, fs);
}

/** `planWriteRefusal` for any file: `plan` adds the rule about links to non-plan files. */
async function writeRefusal(path: string, plan: boolean, fs: FileSystem): Promise<string | null> {
  let real = path;
  try {
    const link = await fs.lstat(path);
    if (link.isSymbolicLink()) {
      real = await fs.realpath(path);
      if (plan && !isPlanPath(real)) return 'it is a link to a file that is not a plan (not named *.bqplan)';
    }
    const st = await fs.stat(real);
    if (!st.isFile()) return 'it is a folder, not a file';
    // No write permission for anyone: the user (or a tool) made it read-only. Checked by mode bits
    // rather than access(2), which always says yes to an administrator.
    if ((st.mode & 0o222) === 0) return 'the file is read-only. Use Save As to save under another name, or make the file writable and save again';
  } catch (e) {
    if (errorCode(e) === 'ENOENT') return null; // a new file
    return describeFileError(e);
  }
  return null;
}

/**
 * Saves a plan: validates it with the core's reader (a bad plan is refused with the field path and
 * nothing on disk changes), refuses a read-only file or a link to a non-plan file, checks that the
 * file is still as `options.expected` says, serializes it with `writePlanText`, and writes it
 * atomically keeping `<path>.bak`. Returns the plan as written (defaults filled in by the reader)
 * and the new file's fingerprint.
 */
export async function savePlanFileChecked(path: string, plan: unknown, options: PlanSaveOptions = {}, fs: FileSystem = realFileSystem): Promise<PlanSaveResult> {
  const name = basename(path);
  const read = readPlanValue(plan);
  if (!read.ok) return { ok: false, error: `Not saved to "${name}": the plan is invalid: ${read.error.message}` };
  const text = writePlanText(read.plan);
  try {
    const refusal = await planWriteRefusal(path, fs);
    if (refusal !== null) return { ok: false, error: `Not saved to "${name}": ${refusal}. The file on disk is unchanged.` };
    if (options.expected) {
      const now = await fingerprintFile(path, fs);
      if (now === null || !sameFingerprint(now, options.expected)) {
        return { ok: false, changedOnDisk: now, error: `Not saved to "${name}": another program changed it since it was opened or saved here.` };
      }
    }
    await writeFileAtomic(path, text, { backup: true }, fs);
  } catch (e) {
    return { ok: false, error: `Not saved to "${name}": ${describeFileError(e)}. The file on disk is unchanged.` };
  }
  let disk: DiskFingerprint | null = null;
  try {
    const st = await fs.stat(path);
    disk = { size: st.size, mtimeMs: st.mtimeMs, sha256: sha256(text) };
  } catch {
    // Saved, but not describable now: the next save will ask before overwriting.
  }
  return { ok: true, value: read.plan, disk };
}

/** `savePlanFileChecked` without the on-disk check, for callers that only need the plan back. */
export async function savePlanFile(path: string, plan: unknown, fs: FileSystem = realFileSystem): Promise<FileResult<Plan>> {
  const saved = await savePlanFileChecked(path, plan, {}, fs);
  return saved.ok ? { ok: true, value: saved.value } : { ok: false, error: saved.error };
}

/** Writes an export (coefficient text etc.) atomically, without a backup; a read-only file is refused. */
export async function saveTextFile(path: string, text: string, fs: FileSystem = realFileSystem): Promise<FileResult<string>> {
  try {
    const refusal = await writeRefusal(path, false, fs);
    if (refusal !== null) return { ok: false, error: `Not saved to "${basename(path)}": ${refusal}. The file on disk is unchanged.` };
    await writeFileAtomic(path, text, { backup: false }, fs);
  } catch (e) {
    return { ok: false, error: `Not saved to "${basename(path)}": ${describeFileError(e)}. The file on disk is unchanged.` };
  }
  return { ok: true, value: path };
}
