/** The recent-plans list (electron/recent.ts): newest first, no duplicates, capped, stored safely. */
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { addRecent, hasRecent, loadRecent, RECENT_MAX, removeRecent, sanitizeRecent, saveRecent } from '../../electron/recent';

const cs = { caseInsensitive: false };
const ci = { caseInsensitive: true };

describe('addRecent', () => {
  it('puts the newest first and moves a reopened plan to the top instead of duplicating it', () => {
    let list: string[] = [];
    list = addRecent(list, '/p/a.bqplan', cs);
    list = addRecent(list, '/p/b.bqplan', cs);
    list = addRecent(list, '/p/c.bqplan', cs);
    expect(list).toEqual(['/p/c.bqplan', '/p/b.bqplan', '/p/a.bqplan']);
    list = addRecent(list, '/p/a.bqplan', cs);
    expect(list).toEqual(['/p/a.bqplan', '/p/c.bqplan', '/p/b.bqplan']);
  });

  it('treats two spellings of one path as one entry (normalized; letter case where the file system ignores it)', () => {
    expect(addRecent(['/p/a.bqplan'], '/p/./x/../a.bqplan', cs)).toEqual(['/p/a.bqplan']);
    expect(addRecent(['/p/A.bqplan'], '/p/a.bqplan', ci)).toEqual(['/p/a.bqplan']);
    expect(addRecent(['/p/A.bqplan'], '/p/a.bqplan', cs)).toEqual(['/p/a.bqplan', '/p/A.bqplan']);
  });

  it(`keeps at most ${RECENT_MAX} entries, dropping the oldest`, () => {
    let list: string[] = [];
    for (let i = 0; i < RECENT_MAX + 5; i++) list = addRecent(list, `/p/${i}.bqplan`, cs);
    expect(list).toHaveLength(RECENT_MAX);
    expect(list[0]).toBe(`/p/${RECENT_MAX + 4}.bqplan`);
    expect(list[RECENT_MAX - 1]).toBe('/p/5.bqplan');
    expect(addRecent(['/a', '/b', '/c'], '/d', { max: 2, caseInsensitive: false })).toEqual(['/d', '/a']);
  });

  it('removeRecent and hasRecent match the same way', () => {
    const list = ['/p/A.bqplan', '/p/b.bqplan'];
    expect(hasRecent(list, '/p/a.bqplan', ci)).toBe(true);
    expect(hasRecent(list, '/p/a.bqplan', cs)).toBe(false);
    expect(removeRecent(list, '/p/a.bqplan', ci)).toEqual(['/p/b.bqplan']);
    expect(removeRecent(list, '/p/a.bqplan', cs)).toEqual(list);
  });
});

describe('stored list', () => {
  let dir: string;
  beforeEach(async () => {
    dir = await mkdtemp(join(tmpdir(), 'bq-recent-'));
  });
  afterEach(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  it('round-trips through recent.json', async () => {
    const file = join(dir, 'recent.json');
    await saveRecent(file, ['/p/b.bqplan', '/p/a.bqplan']);
    expect(JSON.parse(await readFile(file, 'utf8'))).toEqual({ recent: ['/p/b.bqplan', '/p/a.bqplan'] });
    expect(await loadRecent(file, cs)).toEqual(['/p/b.bqplan', '/p/a.bqplan']);
  });

  it('a missing or damaged file is an empty list; bad entries are dropped, order kept', async () => {
    expect(await loadRecent(join(dir, 'none.json'), cs)).toEqual([]);
    await writeFile(join(dir, 'bad.json'), '{ not json');
    expect(await loadRecent(join(dir, 'bad.json'), cs)).toEqual([]);
    expect(sanitizeRecent({ recent: ['/b', 42, 'relative.bqplan', '/a', '/b', '', 'x\0y', null] }, cs)).toEqual(['/b', '/a']);
    expect(sanitizeRecent({ recent: 'x' }, cs)).toEqual([]);
    expect(sanitizeRecent(null, cs)).toEqual([]);
  });
});

describe('first save', () => {
  it('creates the user data folder when it does not exist yet', async () => {
    const base = await mkdtemp(join(tmpdir(), 'bq-recent-new-'));
    try {
      const file = join(base, 'not', 'yet', 'recent.json');
      await saveRecent(file, ['/p/a.bqplan']);
      expect(await loadRecent(file, cs)).toEqual(['/p/a.bqplan']);
    } finally {
      await rm(base, { recursive: true, force: true });
    }
  });
});
