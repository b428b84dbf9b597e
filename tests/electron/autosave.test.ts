/**
 * Crash recovery (electron/autosave.ts): autosave slots, leftovers after a crash kept until the user
 * restores or discards them, and which paths a recovered document may take back.
 */
import { mkdtemp, readdir, readFile, rm, symlink, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import { decodeRecovery, encodeRecovery, recoverablePath, RecoveryStore } from '../../electron/autosave';

let dir: string;
let plan: Plan;
let clock = 1_700_000_000_000;
const now = (): Date => new Date(clock++);

beforeEach(async () => {
  dir = join(await mkdtemp(join(tmpdir(), 'bq-recovery-')), 'recovery');
  const read = readPlanText(await readFile(new URL('../../assets/three-way-hall.bqplan', import.meta.url), 'utf8'));
  if (!read.ok) throw read.error;
  plan = read.plan;
});
afterEach(async () => {
  await rm(join(dir, '..'), { recursive: true, force: true });
});

describe('recovery round trip', () => {
  it('a crashed session leaves its slots; the next session offers each once, oldest first', async () => {
    // Session 1: two windows autosave, then the process dies (no remove()).
    const s1 = new RecoveryStore(dir, undefined, now);
    await s1.write(1, { plan: { ...plan, name: 'first window' }, path: null });
    await s1.write(2, { plan: { ...plan, name: 'second window' }, path: '/plans/hall.bqplan' });
    expect((await readdir(dir)).sort()).toEqual(['1.json', '2.json']);

    // Session 2 starts: leftovers are claimed before any window exists.
    const s2 = new RecoveryStore(dir, undefined, now);
    expect(await s2.claimLeftovers()).toBe(2);
    // A new window 1 autosaving now cannot overwrite the crashed window 1's work.
    await s2.write(1, { plan: { ...plan, name: 'new session' }, path: null });

    const a = await s2.claimLeftover();
    const b = await s2.claimLeftover();
    expect(a?.doc).toEqual({ plan: { ...plan, name: 'first window' }, path: null });
    expect(b?.doc).toEqual({ plan: { ...plan, name: 'second window' }, path: '/plans/hall.bqplan' });
    // Written without a grant from main: the path is not one the user chose.
    expect(b?.meta).toEqual({ pathGranted: false, disk: null });
    expect(await s2.claimLeftover()).toBeNull();
    // Claimed is not deleted: both files stay until the user answers.
    expect(await s2.pendingCount()).toBe(2);
    await s2.restoreLeftover(a!.name, 7, a!.doc, a!.meta);
    await s2.discardLeftover(b!.name);
    expect(await s2.pendingCount()).toBe(0);
    // The restored work now lives in the slot of the window that restored it.
    expect((await readdir(dir)).sort()).toEqual(['1.json', '7.json']);
    expect(JSON.parse(await readFile(join(dir, '7.json'), 'utf8')).plan.name).toBe('first window');
  });

  it('an offer not answered (window closed) is offered again; a claimed one is not offered twice at once', async () => {
    await new RecoveryStore(dir, undefined, now).write(1, { plan, path: null });
    const s = new RecoveryStore(dir, undefined, now);
    await s.claimLeftovers();
    const a = await s.claimLeftover();
    expect(a).not.toBeNull();
    expect(await s.claimLeftover()).toBeNull(); // held by the first window
    s.unclaim(a!.name);
    expect((await s.claimLeftover())?.name).toBe(a!.name);
    // The next session sees it too.
    expect(await new RecoveryStore(dir, undefined, now).claimLeftovers()).toBe(1);
  });

  it('a clean close removes the slot: nothing is offered next time', async () => {
    const s1 = new RecoveryStore(dir, undefined, now);
    await s1.write(3, { plan, path: null });
    await s1.remove(3);
    await s1.remove(3); // already gone: not an error
    const s2 = new RecoveryStore(dir, undefined, now);
    expect(await s2.claimLeftovers()).toBe(0);
    expect(await s2.claimLeftover()).toBeNull();
  });

  it('a removal queued after an autosave still wins (no stale slot from a late write)', async () => {
    const s = new RecoveryStore(dir, undefined, now);
    const w = s.write(4, { plan, path: null });
    const r = s.remove(4);
    await Promise.all([w, r]);
    expect(await readdir(dir)).toEqual([]);
  });

  it('release() turns a live slot into a leftover (renderer crash)', async () => {
    const s = new RecoveryStore(dir, undefined, now);
    await s.write(5, { plan, path: null });
    expect(await s.release(5)).toBe(true);
    expect(await s.release(6)).toBe(false);
    expect((await s.claimLeftover())?.doc).toEqual({ plan, path: null });
    expect(await s.claimLeftover()).toBeNull();
  });

  it('an unreadable leftover is set aside, not offered, and does not block the next one', async () => {
    await new RecoveryStore(dir, undefined, now).write(1, { plan, path: null });
    await writeFile(join(dir, '2.json'), '{"format":"biquadrant.recovery","version":1,"path":null,"plan":{"format":"biquadrant.plan","version":1}}');
    const s = new RecoveryStore(dir, undefined, now);
    expect(await s.claimLeftovers()).toBe(2);
    expect((await s.claimLeftover())?.doc).toEqual({ plan, path: null });
    expect(await s.claimLeftover()).toBeNull();
    const names = (await readdir(dir)).sort();
    expect(names).toHaveLength(2);
    expect(names[1]).toMatch(/^left-\d+-2\.json\.unreadable$/);
  });

  it('slot names accept window ids only', () => {
    const s = new RecoveryStore(dir);
    expect(s.slotPath(12)).toBe(join(dir, '12.json'));
    expect(() => s.slotPath('../x')).toThrow();
  });
});

describe('recovery file format', () => {
  it('encodes the plan in file form and decodes it through the core reader', () => {
    const text = encodeRecovery({ plan, path: '/x.bqplan' }, new Date('2026-01-02T03:04:05Z'));
    const o = JSON.parse(text);
    expect(o.format).toBe('biquadrant.recovery');
    expect(o.savedAt).toBe('2026-01-02T03:04:05.000Z');
    expect(decodeRecovery(text)).toEqual({
      ok: true,
      doc: { plan, path: '/x.bqplan' },
      savedAt: '2026-01-02T03:04:05.000Z',
      meta: { pathGranted: false, disk: null },
    });
    const disk = { size: 10, mtimeMs: 1.5, sha256: 'a'.repeat(64) };
    const granted = decodeRecovery(encodeRecovery({ plan, path: '/x.bqplan' }, new Date(0), { pathGranted: true, disk }));
    expect(granted.ok && granted.meta).toEqual({ pathGranted: true, disk });
    // A version 1 file (written before the grant was recorded) never carries a grant.
    const v1 = { ...JSON.parse(text), version: 1, pathGranted: true };
    const old = decodeRecovery(JSON.stringify(v1));
    expect(old.ok && old.meta).toEqual({ pathGranted: false, disk: null });
  });

  it('refuses a bad plan with the reader field path', () => {
    const o = JSON.parse(encodeRecovery({ plan, path: null }, new Date(0)));
    o.plan.outputs[0].gainDb = 'loud';
    const d = decodeRecovery(JSON.stringify(o));
    expect(d.ok).toBe(false);
    if (!d.ok) expect(d.error).toMatch(/^plan\.outputs\[0\]\.gainDb: must be a number/);
    expect(decodeRecovery('nope').ok).toBe(false);
    expect(decodeRecovery(JSON.stringify({ ...JSON.parse(encodeRecovery({ plan, path: null }, new Date(0))), path: 5 })).ok).toBe(false);
  });
});

describe('recoverablePath', () => {
  const notRecent = (): boolean => false;
  const granted = { pathGranted: true, disk: null };
  const claimed = { pathGranted: false, disk: null };

  it('a path main did not record as granted, and not in the recent list, is not regained', async () => {
    const p = join(dir, '..', 'victim.bqplan');
    await writeFile(p, 'x');
    expect(await recoverablePath(p, claimed, notRecent)).toBeNull();
    expect(await recoverablePath(p, granted, notRecent)).toBe(p);
    expect(await recoverablePath(p, claimed, (q) => q === p)).toBe(p);
  });

  it('only absolute *.bqplan paths; a recent entry must still exist', async () => {
    expect(await recoverablePath('relative.bqplan', granted, notRecent)).toBeNull();
    expect(await recoverablePath(join(dir, '..', 'notes.txt'), granted, notRecent)).toBeNull();
    const gone = join(dir, '..', 'gone.bqplan');
    expect(await recoverablePath(gone, claimed, () => true)).toBeNull();
    expect(await recoverablePath(gone, granted, notRecent)).toBe(gone); // the user chose it; saving recreates it
  });

  it('a symbolic link named *.bqplan leading to another kind of file is never regained', async () => {
    if (process.platform === 'win32') return;
    const target = join(dir, '..', 'shell-profile');
    await writeFile(target, 'precious');
    const link = join(dir, '..', 'looks-like-a.bqplan');
    await symlink(target, link);
    expect(await recoverablePath(link, granted, () => true)).toBeNull();
    // A link to a real plan file is fine.
    const real = join(dir, '..', 'real.bqplan');
    await writeFile(real, '{}');
    const good = join(dir, '..', 'good-link.bqplan');
    await symlink(real, good);
    expect(await recoverablePath(good, granted, notRecent)).toBe(good);
  });
});
