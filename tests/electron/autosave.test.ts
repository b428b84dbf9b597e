/** Crash recovery (electron/autosave.ts): autosave slots, leftovers after a crash, one hand-out each. */
import { mkdtemp, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import { decodeRecovery, encodeRecovery, RecoveryStore } from '../../electron/autosave';

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

    const a = await s2.takeLeftover();
    const b = await s2.takeLeftover();
    expect(a).toEqual({ plan: { ...plan, name: 'first window' }, path: null });
    expect(b).toEqual({ plan: { ...plan, name: 'second window' }, path: '/plans/hall.bqplan' });
    expect(await s2.takeLeftover()).toBeNull();
    expect(await s2.pendingCount()).toBe(0);
    // Only the new session's live slot is left.
    expect(await readdir(dir)).toEqual(['1.json']);
  });

  it('a clean close removes the slot: nothing is offered next time', async () => {
    const s1 = new RecoveryStore(dir, undefined, now);
    await s1.write(3, { plan, path: null });
    await s1.remove(3);
    await s1.remove(3); // already gone: not an error
    const s2 = new RecoveryStore(dir, undefined, now);
    expect(await s2.claimLeftovers()).toBe(0);
    expect(await s2.takeLeftover()).toBeNull();
  });

  it('a removal queued after an autosave still wins (no stale slot from a late write)', async () => {
    const s = new RecoveryStore(dir, undefined, now);
    const w = s.write(4, { plan, path: null });
    const r = s.remove(4);
    await Promise.all([w, r]);
    expect(await readdir(dir)).toEqual([]);
  });

  it('release() turns a live slot into a leftover (renderer crash), offered once', async () => {
    const s = new RecoveryStore(dir, undefined, now);
    await s.write(5, { plan, path: null });
    expect(await s.release(5)).toBe(true);
    expect(await s.release(6)).toBe(false);
    expect(await s.takeLeftover()).toEqual({ plan, path: null });
    expect(await s.takeLeftover()).toBeNull();
  });

  it('an unreadable leftover is set aside, not offered, and does not block the next one', async () => {
    await new RecoveryStore(dir, undefined, now).write(1, { plan, path: null });
    await writeFile(join(dir, '2.json'), '{"format":"biquadrant.recovery","version":1,"path":null,"plan":{"format":"biquadrant.plan","version":1}}');
    const s = new RecoveryStore(dir, undefined, now);
    expect(await s.claimLeftovers()).toBe(2);
    expect(await s.takeLeftover()).toEqual({ plan, path: null });
    expect(await s.takeLeftover()).toBeNull();
    const names = await readdir(dir);
    expect(names).toHaveLength(1);
    expect(names[0]).toMatch(/^left-\d+-2\.json\.unreadable$/);
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
    expect(decodeRecovery(text)).toEqual({ ok: true, doc: { plan, path: '/x.bqplan' }, savedAt: '2026-01-02T03:04:05.000Z' });
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
