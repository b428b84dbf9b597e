/**
 * Crash recovery: unsaved work autosaved to `<userData>/recovery/<window-id>.json`.
 *
 * Plain Node. A window's slot is written (atomically) when its renderer calls `autosave` after a
 * few idle seconds, and removed when the window closes cleanly or its plan is saved. So a slot
 * found at start-up was left by a session that ended without closing that window: a crash.
 *
 * Window ids restart at 1 in each session, so at start-up every live slot is first renamed to
 * `left-<time>-<id>.json` (`claimLeftovers`); new windows then cannot overwrite work that has not
 * been offered yet. `takeLeftover` hands out one at a time, oldest first, and deletes it once
 * read. Each file is checked with the core's plan reader before it is offered.
 */
import * as nodeFs from 'node:fs/promises';
import { join } from 'node:path';
import { readPlanValue } from '../src/plan/read';
import { planToJson } from '../src/plan/write';
import type { PlanDocument } from '../src/ipc';
import { errorCode, realFileSystem, writeFileAtomic, type FileSystem } from './files';

export const RECOVERY_FORMAT = 'biquadrant.recovery';
export const RECOVERY_VERSION = 1;

const LIVE = /^(\d{1,9})\.json$/;
const LEFT = /^left-(\d{1,16})-(\d{1,9})\.json$/;

export function encodeRecovery(doc: PlanDocument, savedAt: Date): string {
  return (
    JSON.stringify(
      { format: RECOVERY_FORMAT, version: RECOVERY_VERSION, savedAt: savedAt.toISOString(), path: doc.path, plan: planToJson(doc.plan) },
      null,
      2,
    ) + '\n'
  );
}

export type DecodedRecovery = { ok: true; doc: PlanDocument; savedAt: string } | { ok: false; error: string };

export function decodeRecovery(text: string): DecodedRecovery {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    return { ok: false, error: `not JSON (${(e as Error).message})` };
  }
  if (typeof value !== 'object' || value === null) return { ok: false, error: 'not an object' };
  const o = value as Record<string, unknown>;
  if (o.format !== RECOVERY_FORMAT || o.version !== RECOVERY_VERSION) return { ok: false, error: 'not a recovery file of this version' };
  if (o.path !== null && typeof o.path !== 'string') return { ok: false, error: 'path: must be a string or null' };
  const read = readPlanValue(o.plan);
  if (!read.ok) return { ok: false, error: `plan.${read.error.message}` };
  return { ok: true, doc: { plan: read.plan, path: o.path as string | null }, savedAt: typeof o.savedAt === 'string' ? o.savedAt : '' };
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

  /** Stores the window's unsaved document (atomically, no backup). */
  write(windowId: number, doc: PlanDocument): Promise<void> {
    const path = this.slotPath(windowId);
    return this.enqueue(String(windowId), async () => {
      await nodeFs.mkdir(this.dir, { recursive: true });
      await writeFileAtomic(path, encodeRecovery(doc, this.now()), { backup: false }, this.fs);
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
   * The oldest document left by a crash, removed from the folder once read; null when none is left.
   * An unreadable leftover is renamed `*.unreadable` (kept for a person to look at) and skipped.
   */
  async takeLeftover(): Promise<PlanDocument | null> {
    const left = (await this.names())
      .map((name) => ({ name, m: LEFT.exec(name) }))
      .filter((x): x is { name: string; m: RegExpExecArray } => x.m !== null)
      .sort((a, b) => Number(a.m[1]) - Number(b.m[1]) || Number(a.m[2]) - Number(b.m[2]));
    for (const { name } of left) {
      const path = join(this.dir, name);
      let text: string;
      try {
        text = (await this.fs.readFile(path)).toString('utf8');
      } catch {
        continue; // taken by another window meanwhile
      }
      const decoded = decodeRecovery(text);
      if (!decoded.ok) {
        await this.fs.rename(path, path + '.unreadable').catch(() => undefined);
        continue;
      }
      try {
        await this.fs.unlink(path);
      } catch {
        continue; // another window took it first
      }
      return decoded.doc;
    }
    return null;
  }
}
