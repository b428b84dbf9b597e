// When unsaved work is stored for crash recovery (renderer/src/lib/autosave-timer.ts). The
// intervals are the product's choice (common practice, no source): 3 s of quiet, 30 s at most.
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { AUTOSAVE_IDLE_MS, AUTOSAVE_MAX_MS, AutosaveScheduler } from '../../renderer/src/lib/autosave-timer';

beforeEach(() => {
  vi.useFakeTimers();
});
afterEach(() => {
  vi.useRealTimers();
});

function scheduler(): { s: AutosaveScheduler; stored: number[] } {
  const stored: number[] = [];
  const s = new AutosaveScheduler(() => stored.push(Date.now()));
  return { s, stored };
}

describe('AutosaveScheduler', () => {
  it('stores after the idle time once editing pauses', () => {
    const { s, stored } = scheduler();
    const t0 = Date.now();
    s.changed();
    vi.advanceTimersByTime(AUTOSAVE_IDLE_MS - 1);
    s.changed();
    vi.advanceTimersByTime(AUTOSAVE_IDLE_MS - 1);
    expect(stored).toEqual([]);
    vi.advanceTimersByTime(1);
    expect(stored).toEqual([t0 + 2 * AUTOSAVE_IDLE_MS - 1]);
  });

  it('continuous editing (a change every second for two minutes) is stored at least every maximum interval', () => {
    const { s, stored } = scheduler();
    const t0 = Date.now();
    for (let i = 0; i < 120; i++) {
      s.changed();
      vi.advanceTimersByTime(1000);
    }
    expect(stored.length).toBeGreaterThanOrEqual(Math.floor(120_000 / AUTOSAVE_MAX_MS) - 1);
    expect(stored[0] - t0).toBeLessThanOrEqual(AUTOSAVE_MAX_MS);
    for (let i = 1; i < stored.length; i++) expect(stored[i] - stored[i - 1]).toBeLessThanOrEqual(AUTOSAVE_MAX_MS + 1000);
  });

  it('clear() (saved, or back to the saved plan) cancels the pending store', () => {
    const { s, stored } = scheduler();
    s.changed();
    s.clear();
    expect(s.waiting).toBe(false);
    vi.advanceTimersByTime(AUTOSAVE_MAX_MS * 2);
    expect(stored).toEqual([]);
  });
});
