/** The close prompt's "save, then close" request (electron/close-after-save.ts). */
import { describe, expect, it } from 'vitest';
import { ARM_MS, CloseAfterSave } from '../../electron/close-after-save';

describe('CloseAfterSave', () => {
  it('is taken by the next save call only, whatever that call does', () => {
    let t = 1000;
    const c = new CloseAfterSave(() => t);
    expect(c.take()).toBe(false);
    c.arm();
    expect(c.armed).toBe(true);
    expect(c.take()).toBe(true); // the save that answers the prompt
    expect(c.take()).toBe(false); // a later ordinary save
  });

  it('lapses when no save call comes (the page refused before calling)', () => {
    let t = 0;
    const c = new CloseAfterSave(() => t);
    c.arm();
    t += ARM_MS + 1;
    expect(c.armed).toBe(false);
    expect(c.take()).toBe(false);
  });
});
