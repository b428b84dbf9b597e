/**
 * Crash recovery: unsaved work autosaved to `<userData>/recovery/<window-id>.json`.
 *
 * Plain Node. A window's slot is written (atomically) when its renderer calls `autosave` (after a
 * few idle seconds, or at the latest after the maximum interval), and removed when the window
 * closes cleanly or its plan is saved. So a slot found at start-up was left by a session that
 * ended without closing that window: a crash.
 *
 * Window ids restart at 1 in each session, so at start-up every live slot is first renamed to
 * `left-<time>-<id>.json` (`claimLeftovers`); new windows then cannot overwrite work that has not
 * been offered yet. `claimLeftover` hands out one at a time, oldest first, and keeps the file: it
 * is deleted only when the user restores it (`restoreLeftover`, which first writes it to the
 * window's own slot) or discards it (`discardLeftover`). A window that closes or reloads before
 * the user answers leaves it in place, to be offered again. Each file is checked with the core's
 * plan reader before it is offered.
 *
 * The file also records whether the document's path was one the user had chosen for that window
 * (`pathGranted`, written by main, never taken from the page) and the plan file's fingerprint, so a
 * recovered document regains only a path the user chose (`recoverablePath`) and a save after
 * recovery still notices a file changed by another program.
 */
import * as nodeFs from 'node:fs/promises';
import { isAbsolute, join } from 'node:path';
import { readPlanValue } from '../src/plan/read';
import { planToJson } from '../src/plan/write';
import type { PlanDocument } from '../src/ipc';
import { errorCode, isPlanPath, realFileSystem, writeFileAtomic, type DiskFingerprint, type FileSystem } from './files';

export const RECOVERY_FORMAT = 'biquadrant.recovery';
/** Version 2 adds `pathGranted` and `disk`; version 1 files are read with neither (path not granted). */
export const RECOVERY_VERSION = 2;

/** What main knew about the document's file when it wrote the slot. */
export interface RecoveryMeta {
  /** The path was one the user chose for the window (dialog, command line, OS, recent list). */
  pathGranted: boolean;
  /** The plan file as the window last read or wrote it. */
  disk: DiskFingerprint | null;
}

const NO_META: RecoveryMeta = { pathGranted: false, disk: null };

const LIVE = /^(\d{1,9})\.json$/;
const LEFT = /^left-(\d{1,16})-(\d{1,9})\.json$/;

export function encodeRecovery(doc: PlanDocument, savedAt: Date, meta: RecoveryMeta = NO_META): string {
  return (
    JSON.stringify(
      {
        format: RECOVERY_FORMAT,
        version: RECOVERY_VERSION,
        savedAt: savedAt.toISOString(),
        path: doc.path,
        pathGranted: doc.path !== null && meta.pathGranted,
        disk: doc.path !== null ? meta.disk : null,
        plan: planToJson(doc.plan),
      },
      null,
      2,
    ) + '\n'
  );
}

export type DecodedRecovery = { ok: true; doc: PlanDocument; savedAt: string; meta: RecoveryMeta } | { ok: false; error: string };

function decodeDisk(value: unknown): DiskFingerprint | null {
  if (typeof value !== 'object' || value === null) return null;
  const d = value as Record<string, unknown>;
  const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x) && x >= 0;
  if (!finite(d.size) || !finite(d.mtimeMs) || typeof d.sha256 !== 'string' || !/^[0-9a-f]{64}$/.test(d.sha256)) return null;
  return { size: d.size, mtimeMs: d.mtimeMs, sha256: d.sha256 };
}

export function decodeRecovery(text: string): DecodedRecovery {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    return { ok: false, error: `not JSON (${(e as Error).message})` };
  }
  if (typeof value !== 'object' || value === null) return { ok: false, error: 'not an object' };
  const o = value as Record<string, unknown>;
  if (o.format !== RECOVERY_FORMAT || (o.version !== 1 && o.version !== RECOVERY_VERSION)) return { ok: false, error: 'not a recovery file of a known version' };
  if (o.path !== null && typeof o.path !== 'string') return { ok: false, error: 'path: must be a string or null' };
  const read = readPlanValue(o.plan);
  if (!read.ok) return { ok: false, error: `plan.${read.error.message}` };
  const meta: RecoveryMeta = o.version === 1 ? NO_META : { pathGranted: o.pathGranted === true, disk: decodeDisk(o.disk) };
  return { ok: true, doc: { plan: read.plan, path: o.path as string | null }, savedAt: typeof o.savedAt === 'string' ? o.savedAt : '', meta };
}

/**
 * The path a recovered document may take back, or null (it comes back untitled). A renderer can
 * autosave a document claiming any path; without this check, recovery would hand that path to
 * `savePlan` and let a compromised page overwrite a file the user never chose. So the path must be
 * one main recorded as granted when it wrote the slot, or one in the recent list that still
 * exists; and in both cases it must be a plan file: a symbolic link named `*.bqplan` whose target
 * is not itself a `*.bqplan` file does not count.
 */
export async function recoverablePath(
  path: string | null,
  meta: RecoveryMeta,
  inRecent: (path: string) => boolean,
  fs: FileSystem = realFileSystem,
): Promise<string | null> {
  if (path === null || !isAbsolute(path) || !isPlanPath(path)) return null;
  const recent = inRecent(path);
  if (!meta.pathGranted && !recent) return null;
  try {
    const link = await fs.lstat(path);
    const real = link.isSymbolicLink() ? await fs.realpath(path) : path;
    if (!isPlanPath(real)) return null;
    return (await fs.stat(real)).isFile() ? path : null;
  } catch (e) {
    // A granted file the user has since removed may be saved again (a new file); a recent-list
    // entry must still exist.
    return errorCode(e) === 'ENOENT' && meta.pathGranted && !recent ? path : null;
  }
}

/** A crashed session's document, offered to one window until the user restores or discards it. */
export interface Leftover {
  readonly name: string;
  readonly doc: PlanDocument;
  readonly meta: RecoveryMeta;
}

function isWindowKey(key: string): boolean {
  return /^\d{1,9}$/.test(key);
}

export class RecoveryStore {
  /** Per-slot chain of pending operations, so a late autosave cannot land after the slot's removal. */
  private readonly queues = new Map<string, Promise<unknown>>();

  constructor(
    readonly dir: string,
    private readonly fs: FileSystem = realFileSystem,
    private readonly now: () => Date = () => new Date(),
  ) {}

  slotPath(windowId: number | string): string {
    const key = String(windowId);
    if (!isWindowKey(key)) throw new Error(`bad window id ${key}`);
    return join(this.dir, `${key}.json`);
  }

  private enqueue<T>(key: string, op: () => Promise<T>): Promise<T> {
    const previous = this.queues.get(key) ?? Promise.resolve();
    const next = previous.then(op, op);
    const settled = next.catch(() => undefined);
    this.queues.set(key, settled);
    void settled.then(() => {
      if (this.queues.get(key) === settled) this.queues.delete(key);
    });
    return next;
  }

  /** Leftovers handed to a window and not yet restored or discarded: not offered to another. */
  private readonly claimed = new Set<string>();

  /** Stores the window's unsaved document (atomically, no backup). */
  write(windowId: number, doc: PlanDocument, meta: RecoveryMeta = NO_META): Promise<void> {
    const path = this.slotPath(windowId);
    return this.enqueue(String(windowId), async () => {
      await nodeFs.mkdir(this.dir, { recursive: true });
      await writeFileAtomic(path, encodeRecovery(doc, this.now(), meta), { backup: false }, this.fs);
    });
  }

  /** Removes the window's slot (clean close, save, or the user discarded the work). */
  remove(windowId: number): Promise<void> {
    const path = this.slotPath(windowId);
    return this.enqueue(String(windowId), async () => {
      try {
        await this.fs.unlink(path);
      } catch (e) {
        if (errorCode(e) !== 'ENOENT') throw e;
      }
    });
  }

  /**
   * Turns one window's live slot into a leftover, as if its session had crashed: used when that
   * window's renderer process dies, so the reloaded page is offered its own unsaved work.
   */
  release(windowId: number): Promise<boolean> {
    const path = this.slotPath(windowId);
    return this.enqueue(String(windowId), async () => {
      try {
        await this.fs.rename(path, join(this.dir, `left-${this.now().getTime()}-${windowId}.json`));
        return true;
      } catch (e) {
        if (errorCode(e) === 'ENOENT') return false;
        throw e;
      }
    });
  }

  private async names(): Promise<string[]> {
    try {
      return await nodeFs.readdir(this.dir);
    } catch {
      return [];
    }
  }

  /**
   * At start-up, before any window exists: moves the slots a crashed session left behind out of
   * the way of this session's windows. Returns how many documents wait to be offered.
   */
  async claimLeftovers(): Promise<number> {
    const stamp = this.now().getTime();
    for (const name of await this.names()) {
      const m = LIVE.exec(name);
      if (m) await this.fs.rename(join(this.dir, name), join(this.dir, `left-${stamp}-${m[1]}.json`));
    }
    return this.pendingCount();
  }

  async pendingCount(): Promise<number> {
    return (await this.names()).filter((n) => LEFT.test(n)).length;
  }

  /**
   * The oldest document left by a crash that no window holds yet, or null. The file stays until
   * `restoreLeftover` or `discardLeftover`; `unclaim` lets another window be offered it again.
   * An unreadable leftover is renamed `*.unreadable` (kept for a person to look at) and skipped.
   */
  async claimLeftover(): Promise<Leftover | null> {
    const left = (await this.names())
      .map((name) => ({ name, m: LEFT.exec(name) }))
      .filter((x): x is { name: string; m: RegExpExecArray } => x.m !== null && !this.claimed.has(x.name))
      .sort((a, b) => Number(a.m[1]) - Number(b.m[1]) || Number(a.m[2]) - Number(b.m[2]));
    for (const { name } of left) {
      const path = join(this.dir, name);
      let text: string;
      try {
        text = (await this.fs.readFile(path)).toString('utf8');
      } catch {
        continue; // removed meanwhile
      }
      const decoded = decodeRecovery(text);
      if (!decoded.ok) {
        await this.fs.rename(path, path + '.unreadable').catch(() => undefined);
        continue;
      }
      if (this.claimed.has(name)) continue; // another window took it while this one was reading
      this.claimed.add(name);
      return { name, doc: decoded.doc, meta: decoded.meta };
    }
    return null;
  }

  /**
   * The user restored a leftover into window `windowId`: its document (as the window now holds it)
   * goes to the window's own slot first, and only then is the leftover deleted, so a crash at any
   * moment leaves one copy or the other.
   */
  async restoreLeftover(name: string, windowId: number, doc: PlanDocument, meta: RecoveryMeta): Promise<void> {
    await this.write(windowId, doc, meta);
    await this.discardLeftover(name);
  }

  /** The user discarded a leftover (or restored it, see above): its file is deleted. */
  async discardLeftover(name: string): Promise<void> {
    if (!LEFT.test(name)) throw new Error(`not a leftover: ${name}`);
    try {
      await this.fs.unlink(join(this.dir, name));
    } catch (e) {
      if (errorCode(e) !== 'ENOENT') throw e;
    }
    this.claimed.delete(name);
  }

  /** The window offered this leftover closed without an answer: the file stays for a later offer. */
  unclaim(name: string): void {
    this.claimed.delete(name);
  }
}
