/**
 * The close prompt as explicit state (electron/close-flow.ts): each transition of the table in
 * that file, without Electron. main-wiring.test.ts runs the same flow through main.ts.
 */
import { describe, expect, it } from 'vitest';
import { CloseFlow, SAVE_TO_CLOSE_MS } from '../../electron/close-flow';

describe('close flow', () => {
  it('a clean window closes at once; a dirty one asks, and asks only once at a time', () => {
    const f = new CloseFlow();
    expect(f.request(false)).toBe('close');
    expect(f.request(true)).toBe('prompt');
    f.promptShown();
    expect(f.request(true)).toBe('wait');
    f.promptFailed();
    expect(f.request(true)).toBe('prompt');
  });

  it("Don't Save confirms the close: later requests close without asking", () => {
    const f = new CloseFlow();
    f.promptShown();
    expect(f.answered('discard', 0)).toBe('close');
    expect(f.confirmed).toBe(true);
    expect(f.request(true)).toBe('close');
  });

  it('Cancel keeps the window and stops a quit; nothing waits for a save', () => {
    const f = new CloseFlow();
    f.promptShown();
    expect(f.answered('cancel', 0)).toBe('stop-quit');
    expect(f.prompting).toBe(false);
    expect(f.awaitingSave(1)).toBe(false);
    expect(f.saveFinished(f.takeSave(1), true)).toBe('none');
    expect(f.request(true)).toBe('prompt');
  });

  it('Save asks the renderer to save; the save call that takes the request and succeeds closes the window', () => {
    const f = new CloseFlow();
    f.promptShown();
    expect(f.answered('save', 1000)).toBe('request-save');
    expect(f.awaitingSave(1000 + SAVE_TO_CLOSE_MS - 1)).toBe(true);
    const wanted = f.takeSave(2000);
    expect(wanted).toBe(true);
    expect(f.awaitingSave(2000)).toBe(false);
    expect(f.saveFinished(wanted, true)).toBe('close');
    expect(f.confirmed).toBe(true);
  });

  it('a refused, failed or cancelled save keeps the window open, stops a quit and disarms: a later save is ordinary', () => {
    const f = new CloseFlow();
    f.answered('save', 0);
    expect(f.saveFinished(f.takeSave(10), false)).toBe('stop-quit');
    expect(f.confirmed).toBe(false);
    expect(f.saveFinished(f.takeSave(20), true)).toBe('none');
    expect(f.confirmed).toBe(false);
  });

  it('a request no save call takes up lapses: a save after the deadline does not close the window', () => {
    const f = new CloseFlow();
    f.answered('save', 0);
    expect(f.saveFinished(f.takeSave(SAVE_TO_CLOSE_MS + 1), true)).toBe('none');
    expect(f.confirmed).toBe(false);
  });
});
