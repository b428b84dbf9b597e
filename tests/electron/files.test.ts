/**
 * Plan files on disk (electron/files.ts): atomic save, the `.bak` backup, refusal of bad plans and
 * bad files. Real files in a temporary folder; failures are injected by wrapping the real file
 * system, so each step of a save can be made to fail (or the process to "die") in turn.
 */
import { mkdtemp, readFile, readdir, rm, stat, symlink, utimes, writeFile, chmod, lstat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { readPlanText } from '../../src/plan/read';
import { writePlanText } from '../../src/plan/write';
import type { Plan } from '../../src/plan/types';
import {
  BACKUP_SUFFIX,
  fingerprintFile,
  planWriteRefusal,
  savePlanFileChecked,
  readPlanFile,
  realFileSystem,
  savePlanFile,
  saveTextFile,
  withPlanExtension,
  writeFileAtomic,
  type FileSystem,
  type WritableHandle,
} from '../../electron/files';

let dir: string;

async function demoPlan(): Promise<Plan> {
  const read = readPlanText(await readFile(new URL('../../assets/two-way-monitor.bqplan', import.meta.url), 'utf8'));
  if (!read.ok) throw read.error;
  return read.plan;
}

function renamed(plan: Plan, name: string): Plan {
  return { ...plan, name };
}

/** Everything in the folder, name -> bytes as text, to prove "nothing on disk changed". */
async function snapshot(): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  for (const name of (await readdir(dir)).sort()) out[name] = await readFile(join(dir, name), 'utf8');
  return out;
}

async function tempFiles(): Promise<string[]> {
  return (await readdir(dir)).filter((n) => n.endsWith('.tmp'));
}

class Injected extends Error {
  code = 'EIO';
}

type Step = 'open' | 'write' | 'sync' | 'rename' | 'readFile';

/**
 * The real file system with one step made to fail. `failOn(step, n)` fails the n-th call (1-based)
 * of that step; `dieAfter` makes every later call fail too, as if the process had been killed
 * (no clean-up can run).
 */
function faulty(step: Step, nth = 1, options: { partialWrite?: boolean; dieAfter?: boolean } = {}): FileSystem & { dead: boolean } {
  const counts: Record<string, number> = {};
  const fs = {
    dead: false,
    check(name: Step): void {
      if (fs.dead) throw new Injected('process is gone');
      counts[name] = (counts[name] ?? 0) + 1;
      if (name === step && counts[name] === nth) {
        if (options.dieAfter) fs.dead = true;
        throw new Injected(`injected failure in ${name}`);
      }
    },
    readFile: async (p: string) => {
      fs.check('readFile');
      return realFileSystem.readFile(p);
    },
    open: async (p: string, flags: string, mode?: number): Promise<WritableHandle> => {
      fs.check('open');
      const h = await realFileSystem.open(p, flags, mode);
      return {
        writeFile: async (data) => {
          if (step === 'write' && options.partialWrite && !fs.dead && (counts.write ?? 0) + 1 === nth) {
            // Half the bytes reach the disk, then the write fails.
            const half = typeof data === 'string' ? data.slice(0, Math.floor(data.length / 2)) : data.subarray(0, Math.floor(data.length / 2));
            await h.writeFile(half);
          }
          fs.check('write');
          await h.writeFile(data);
        },
        sync: async () => {
          fs.check('sync');
          await h.sync();
        },
        close: async () => {
          await h.close();
        },
      };
    },
    rename: async (a: string, b: string) => {
      fs.check('rename');
      await realFileSystem.rename(a, b);
    },
    unlink: async (p: string) => {
      if (fs.dead) throw new Injected('process is gone');
      await realFileSystem.unlink(p);
    },
    stat: (p: string) => realFileSystem.stat(p),
    lstat: (p: string) => realFileSystem.lstat(p),
    realpath: (p: string) => realFileSystem.realpath(p),
  };
  return fs;
}

beforeEach(async () => {
  dir = await mkdtemp(join(tmpdir(), 'bq-files-'));
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('savePlanFile', () => {
  it('writes the plan as writePlanText serializes it, and it reads back equal', async () => {
    const plan = await demoPlan();
    const path = join(dir, 'monitor.bqplan');
    const result = await savePlanFile(path, plan);
    expect(result.ok).toBe(true);
    expect(await readFile(path, 'utf8')).toBe(writePlanText(plan));
    const back = await readPlanFile(path);
    expect(back).toEqual({ ok: true, value: plan });
    // First save: nothing to back up, and no temporary file left.
    expect(await readdir(dir)).toEqual(['monitor.bqplan']);
  });

  it('keeps the previous version as .bqplan.bak', async () => {
    const plan = await demoPlan();
    const path = join(dir, 'monitor.bqplan');
    await savePlanFile(path, renamed(plan, 'first'));
    const firstText = await readFile(path, 'utf8');
    await savePlanFile(path, renamed(plan, 'second'));
    expect(await readFile(path + BACKUP_SUFFIX, 'utf8')).toBe(firstText);
    expect(JSON.parse(await readFile(path, 'utf8')).name).toBe('second');
    await savePlanFile(path, renamed(plan, 'third'));
    expect(JSON.parse(await readFile(path + BACKUP_SUFFIX, 'utf8')).name).toBe('second');
    expect((await readdir(dir)).sort()).toEqual(['monitor.bqplan', 'monitor.bqplan.bak']);
  });

  it('refuses an invalid plan with the reader field path, and nothing on disk changes', async () => {
    const plan = await demoPlan();
    const path = join(dir, 'monitor.bqplan');
    await savePlanFile(path, renamed(plan, 'first'));
    await savePlanFile(path, renamed(plan, 'second'));
    const before = await snapshot();

    const bad = structuredClone(plan) as unknown as { outputs: { bands: unknown[] }[] };
    bad.outputs[0].bands = [{ id: 'x', type: 'peaking', frequency: 1000, gainDb: 3, q: -1, enabled: true }];
    const result = await savePlanFile(path, bad);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.error).toContain('outputs[0].bands[0].q: must be from 0.01 to 1000');
    expect(await snapshot()).toEqual(before);

    const nan = structuredClone(plan);
    nan.sampleRate = Number.NaN;
    const r2 = await savePlanFile(path, nan);
    expect(r2.ok).toBe(false);
    if (!r2.ok) expect(r2.error).toContain('sampleRate: must be a finite number');
    expect(await snapshot()).toEqual(before);
  });

  it('keeps the file mode of the plan it replaces', async () => {
    if (process.platform === 'win32') return;
    const plan = await demoPlan();
    const path = join(dir, 'private.bqplan');
    await savePlanFile(path, plan);
    await chmod(path, 0o600);
    await savePlanFile(path, renamed(plan, 'again'));
    expect((await stat(path)).mode & 0o777).toBe(0o600);
  });

  it('saves through a symbolic link: the link stays, the file it points to is replaced and backed up', async () => {
    if (process.platform === 'win32') return;
    const plan = await demoPlan();
    const real = join(dir, 'real.bqplan');
    const link = join(dir, 'link.bqplan');
    await savePlanFile(real, renamed(plan, 'one'));
    await symlink(real, link);
    await savePlanFile(link, renamed(plan, 'two'));
    expect((await lstat(link)).isSymbolicLink()).toBe(true);
    expect(JSON.parse(await readFile(real, 'utf8')).name).toBe('two');
    expect(JSON.parse(await readFile(real + BACKUP_SUFFIX, 'utf8')).name).toBe('one');
  });
});

describe('atomic save under injected failures', () => {
  async function prepared(): Promise<{ plan: Plan; path: string; before: Record<string, string> }> {
    const plan = await demoPlan();
    const path = join(dir, 'monitor.bqplan');
    await savePlanFile(path, renamed(plan, 'old backup'));
    await savePlanFile(path, renamed(plan, 'on disk'));
    return { plan, path, before: await snapshot() };
  }

  const cases: { label: string; step: Step; nth: number; partialWrite?: boolean }[] = [
    // Call order of a save over an existing file: open(temp) write sync, readFile(old),
    // open(backup temp) write sync, rename(backup), rename(temp -> target), open(dir) sync.
    { label: 'the new content fails half-way through writing', step: 'write', nth: 1, partialWrite: true },
    { label: 'fsync of the new content fails', step: 'sync', nth: 1 },
    { label: 'reading the old content for the backup fails', step: 'readFile', nth: 1 },
    { label: 'writing the backup fails half-way', step: 'write', nth: 2, partialWrite: true },
    { label: 'renaming the backup into place fails', step: 'rename', nth: 1 },
  ];
  for (const c of cases) {
    it(`${c.label}: target and backup unchanged, no temporary file left`, async () => {
      const { plan, path, before } = await prepared();
      const result = await savePlanFile(path, renamed(plan, 'new'), faulty(c.step, c.nth, { partialWrite: c.partialWrite }));
      expect(result.ok).toBe(false);
      if (!result.ok) expect(result.error).toMatch(/Not saved to "monitor\.bqplan": injected failure in \w+\. The file on disk is unchanged\./);
      expect(await snapshot()).toEqual(before);
      expect(await tempFiles()).toEqual([]);
    });
  }

  it('the final rename fails: the target is the old plan, no temporary file left', async () => {
    const { plan, path, before } = await prepared();
    const result = await savePlanFile(path, renamed(plan, 'new'), faulty('rename', 2));
    expect(result.ok).toBe(false);
    expect(await readFile(path, 'utf8')).toBe(before['monitor.bqplan']);
    // The backup step had completed: the .bak now holds the plan still on disk, complete.
    expect(await readFile(path + BACKUP_SUFFIX, 'utf8')).toBe(before['monitor.bqplan']);
    expect(await tempFiles()).toEqual([]);
  });

  it('the process dies mid-write (no clean-up runs): the target is whole, the next save succeeds', async () => {
    const { plan, path, before } = await prepared();
    const fs = faulty('write', 1, { partialWrite: true, dieAfter: true });
    const result = await savePlanFile(path, renamed(plan, 'lost'), fs);
    expect(result.ok).toBe(false);
    expect(fs.dead).toBe(true);
    expect(await readFile(path, 'utf8')).toBe(before['monitor.bqplan']);
    expect(await readFile(path + BACKUP_SUFFIX, 'utf8')).toBe(before['monitor.bqplan.bak']);
    // The half-written temporary file is the only trace, hidden and beside the plan.
    const temps = await tempFiles();
    expect(temps).toHaveLength(1);
    expect(temps[0].startsWith('.monitor.bqplan.')).toBe(true);
    expect((await readFile(join(dir, temps[0]), 'utf8')).length).toBeLessThan(before['monitor.bqplan'].length);
    // The next session saves normally.
    expect((await savePlanFile(path, renamed(plan, 'after restart'))).ok).toBe(true);
    expect(JSON.parse(await readFile(path, 'utf8')).name).toBe('after restart');
  });
});

describe('readPlanFile', () => {
  it('refuses a bad file with the reader field path and leaves it untouched', async () => {
    const plan = await demoPlan();
    const text = writePlanText(plan).replace('"frequency": 2200', '"frequency": 90000');
    expect(text).not.toBe(writePlanText(plan));
    const path = join(dir, 'broken.bqplan');
    await writeFile(path, text);
    const before = await snapshot();
    const result = await readPlanFile(path);
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.error).toMatch(/^Cannot open "broken\.bqplan": outputs\[0\]\.lowPass\.frequency: /);
    }
    expect(await snapshot()).toEqual(before);
  });

  it('refuses text that is not JSON, a missing file, a folder and non-UTF-8 bytes', async () => {
    await writeFile(join(dir, 'notjson.bqplan'), '{ "format": ');
    const r1 = await readPlanFile(join(dir, 'notjson.bqplan'));
    expect(r1.ok === false && r1.error.startsWith('Cannot open "notjson.bqplan": not valid JSON')).toBe(true);
    const r2 = await readPlanFile(join(dir, 'missing.bqplan'));
    expect(r2).toEqual({ ok: false, error: 'Cannot open "missing.bqplan": the file or its folder does not exist.' });
    const r3 = await readPlanFile(dir);
    expect(r3.ok).toBe(false);
    await writeFile(join(dir, 'latin1.bqplan'), Buffer.from([0x7b, 0xe9, 0x7d]));
    const r4 = await readPlanFile(join(dir, 'latin1.bqplan'));
    expect(r4).toEqual({ ok: false, error: 'Cannot open "latin1.bqplan": not UTF-8 text.' });
  });

  it('accepts a UTF-8 byte order mark', async () => {
    const plan = await demoPlan();
    await writeFile(join(dir, 'bom.bqplan'), '\ufeff' + writePlanText(plan));
    expect(await readPlanFile(join(dir, 'bom.bqplan'))).toEqual({ ok: true, value: plan });
  });
});

describe('small helpers', () => {
  it('withPlanExtension appends .bqplan once, any letter case', () => {
    expect(withPlanExtension('/a/b')).toBe('/a/b.bqplan');
    expect(withPlanExtension('/a/b.bqplan')).toBe('/a/b.bqplan');
    expect(withPlanExtension('/a/B.BQPLAN')).toBe('/a/B.BQPLAN');
    expect(withPlanExtension('/a/b.json')).toBe('/a/b.json.bqplan');
  });

  it('saveTextFile writes exports atomically without a backup', async () => {
    const path = join(dir, 'coeffs.txt');
    await writeFile(path, 'old');
    expect(await saveTextFile(path, 'new')).toEqual({ ok: true, value: path });
    expect(await readdir(dir)).toEqual(['coeffs.txt']);
    expect(await readFile(path, 'utf8')).toBe('new');
  });

  it('writeFileAtomic refuses to replace a folder', async () => {
    await expect(writeFileAtomic(dir, 'x', { backup: true })).rejects.toThrow();
  });
});

describe('the file as this window last saw it', () => {
  it('a change that keeps the size and the modification time is still noticed (by its hash)', async () => {
    const plan = await demoPlan();
    const p = join(dir, 'seen.bqplan');
    const first = await savePlanFileChecked(p, renamed(plan, 'AAAA'), {});
    expect(first.ok).toBe(true);
    const seen = first.ok ? first.disk! : null;
    expect(seen).toEqual(await fingerprintFile(p));
    // Another program writes a plan of the same length and puts the time back.
    const before = await stat(p);
    await writeFile(p, (await readFile(p, 'utf8')).replace('"AAAA"', '"BBBB"'));
    await utimes(p, before.atime, before.mtime);
    expect((await stat(p)).size).toBe(before.size);
    const r = await savePlanFileChecked(p, renamed(plan, 'mine'), { expected: seen! });
    expect(r.ok).toBe(false);
    expect(!r.ok && r.changedOnDisk).toEqual(await fingerprintFile(p));
    expect(JSON.parse(await readFile(p, 'utf8')).name).toBe('BBBB');
    // Unchanged since: saved.
    const again = await savePlanFileChecked(p, renamed(plan, 'mine'), { expected: (await fingerprintFile(p))! });
    expect(again.ok).toBe(true);
  });

  it('a file removed meanwhile is reported as changed (null), not silently recreated', async () => {
    const plan = await demoPlan();
    const p = join(dir, 'gone.bqplan');
    const first = await savePlanFileChecked(p, plan, {});
    await rm(p);
    const r = await savePlanFileChecked(p, plan, { expected: first.ok ? first.disk! : undefined });
    expect(!r.ok && r.changedOnDisk).toBeNull();
  });

  it('a read-only file is refused by its mode bits (even for an administrator, whom access(2) always lets write)', async () => {
    if (process.platform === 'win32') return;
    const plan = await demoPlan();
    const p = join(dir, 'locked.bqplan');
    await savePlanFile(p, plan);
    await chmod(p, 0o444);
    expect(await planWriteRefusal(p)).toMatch(/^the file is read-only/);
    const r = await savePlanFile(p, renamed(plan, 'new'));
    expect(r.ok).toBe(false);
    expect(JSON.parse(await readFile(p, 'utf8')).name).toBe(plan.name);
    expect(await planWriteRefusal(join(dir, 'new.bqplan'))).toBeNull();
    // Exports too: a read-only coefficient file is not replaced by the rename.
    const exported = join(dir, 'coefficients.txt');
    await writeFile(exported, 'old');
    await chmod(exported, 0o444);
    const e = await saveTextFile(exported, 'new');
    expect(e.ok).toBe(false);
    expect(!e.ok && e.error).toMatch(/^Not saved to "coefficients\.txt": the file is read-only/);
    expect(await readFile(exported, 'utf8')).toBe('old');
  });
});
