/**
 * IPC payload validation (electron/validate.ts): what a compromised or buggy renderer might send,
 * each refused with a reason; good payloads accepted unchanged (plans as the core reads them).
 */
import { readFile } from 'node:fs/promises';
import { describe, expect, it } from 'vitest';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';
import {
  isAppUrl,
  MAX_TEXT_LENGTH,
  validateArgumentCount,
  validateBoolean,
  validateDocument,
  validateExtensions,
  validateFileName,
  validateOptionalPath,
  validatePath,
  validatePlan,
  validateText,
  validateTitle,
} from '../../electron/validate';

async function demo(): Promise<Plan> {
  const read = readPlanText(await readFile(new URL('../../assets/two-way-monitor.bqplan', import.meta.url), 'utf8'));
  if (!read.ok) throw read.error;
  return read.plan;
}

function error(v: { ok: boolean; error?: string }): string {
  expect(v.ok).toBe(false);
  return v.error ?? '';
}

describe('plans and documents', () => {
  it('accepts a plan as the renderer holds it (a structured clone of the reader output)', async () => {
    const plan = await demo();
    expect(validatePlan(structuredClone(plan))).toEqual({ ok: true, value: plan });
    expect(validateDocument({ plan: structuredClone(plan), path: '/home/u/monitor.bqplan' })).toEqual({
      ok: true,
      value: { plan, path: '/home/u/monitor.bqplan' },
    });
    expect(validateDocument({ plan, path: null })).toEqual({ ok: true, value: { plan, path: null } });
  });

  it('refuses bad plans with the core reader field path', async () => {
    const plan = await demo();
    const cases: [(p: Record<string, any>) => void, string][] = [
      [(p) => (p.sampleRate = Infinity), 'plan refused: sampleRate: must be a finite number'],
      [(p) => (p.outputs[1].delayMs = -1), 'plan refused: outputs[1].delayMs: must be >= 0'],
      [(p) => (p.outputs[0].extra = 1), 'plan refused: outputs[0]'],
      [(p) => (p.format = 'something.else'), 'plan refused: format: must be "biquadrant.plan"'],
      [(p) => (p.input.bands[0].q = '0.7'), 'plan refused: input.bands[0].q: must be a number'],
    ];
    for (const [mutate, expected] of cases) {
      const bad = structuredClone(plan) as unknown as Record<string, any>;
      mutate(bad);
      expect(error(validatePlan(bad))).toContain(expected);
    }
    expect(error(validatePlan(null))).toContain('plan refused: must be an object');
    expect(error(validatePlan('{"format":"biquadrant.plan"}'))).toContain('plan refused');
  });

  it('refuses documents with extra fields, bad paths or bad plans', async () => {
    const plan = await demo();
    expect(error(validateDocument({ plan, path: null, evil: true }))).toBe('document.evil: unknown field');
    expect(error(validateDocument({ plan, path: 'relative.bqplan' }))).toBe('document.path: must be an absolute path');
    expect(error(validateDocument({ plan, path: 7 }))).toBe('document.path: must be a string');
    expect(error(validateDocument({ plan: { ...plan, outputs: [] }, path: null }))).toContain('plan refused: outputs: must hold 1 to');
    expect(error(validateDocument([plan]))).toBe('document: must be an object');
  });
});

describe('strings, booleans, lists', () => {
  it('booleans are booleans', () => {
    expect(validateBoolean(true, 'dirty')).toEqual({ ok: true, value: true });
    expect(error(validateBoolean('true', 'dirty'))).toBe('dirty: must be true or false');
    expect(error(validateBoolean(1, 'dirty'))).toBe('dirty: must be true or false');
  });

  it('paths are absolute strings without NUL, bounded', () => {
    expect(validatePath('/a/b.bqplan')).toEqual({ ok: true, value: '/a/b.bqplan' });
    expect(error(validatePath('b.bqplan'))).toBe('path: must be an absolute path');
    expect(error(validatePath('/a\0b'))).toBe('path: must not contain NUL');
    expect(error(validatePath(''))).toContain('must be 1 to');
    expect(error(validatePath('/' + 'a'.repeat(5000)))).toContain('must be 1 to');
    expect(error(validatePath({ toString: () => '/x' }))).toBe('path: must be a string');
    expect(validateOptionalPath(null)).toEqual({ ok: true, value: null });
    expect(error(validateOptionalPath(undefined))).toBe('path: must be a string');
  });

  it('titles refuse control characters and long strings', () => {
    expect(validateTitle('Two-way monitor')).toEqual({ ok: true, value: 'Two-way monitor' });
    expect(error(validateTitle('a\nb'))).toBe('title: must not contain control characters');
    expect(error(validateTitle('x'.repeat(301)))).toContain('at most 300');
    expect(error(validateTitle(null))).toBe('title: must be a string');
  });

  it('suggested file names are bare names', () => {
    expect(validateFileName('monitor-coeffs.txt')).toEqual({ ok: true, value: 'monitor-coeffs.txt' });
    expect(error(validateFileName('../../.bashrc'))).toContain('must be a file name, not a path');
    expect(error(validateFileName('a/b.txt'))).toContain('not a path');
    expect(error(validateFileName('a\\b.txt'))).toContain('not a path');
    expect(error(validateFileName('..'))).toContain('not a path');
    expect(error(validateFileName(''))).toContain('1 to 255');
  });

  it('export text is a bounded string', () => {
    expect(validateText('b0 = 1')).toEqual({ ok: true, value: 'b0 = 1' });
    expect(error(validateText(new Uint8Array(3)))).toBe('text: must be a string');
    expect(error(validateText('x'.repeat(MAX_TEXT_LENGTH + 1)))).toContain('at most');
  });

  it('extensions are short alphanumeric names without dots', () => {
    expect(validateExtensions(['txt', 'h'])).toEqual({ ok: true, value: ['txt', 'h'] });
    expect(error(validateExtensions([]))).toContain('1 to 8');
    expect(error(validateExtensions(['.txt']))).toBe('extensions[0]: must be 1 to 16 letters or digits, no dot');
    expect(error(validateExtensions(['txt', '*']))).toContain('extensions[1]');
    expect(error(validateExtensions('txt'))).toBe('extensions: must be a list');
  });

  it('argument counts must match the method', () => {
    expect(validateArgumentCount([1, 2], 2).ok).toBe(true);
    expect(error(validateArgumentCount([1, 2, 3], 2))).toBe('expected 2 argument(s), got 3');
    expect(error(validateArgumentCount([], 1))).toBe('expected 1 argument(s), got 0');
  });
});

describe('isAppUrl (sender check)', () => {
  it('accepts the app scheme and host, and the dev server origin', () => {
    expect(isAppUrl('app://biquadrant/index.html', 'app://biquadrant')).toBe(true);
    expect(isAppUrl('app://biquadrant/index.html#x', 'app://biquadrant')).toBe(true);
    expect(isAppUrl('http://localhost:5173/', 'http://localhost:5173')).toBe(true);
  });

  it('refuses other hosts, schemes, ports, credentials and junk', () => {
    expect(isAppUrl('app://other/index.html', 'app://biquadrant')).toBe(false);
    expect(isAppUrl('https://biquadrant/index.html', 'app://biquadrant')).toBe(false);
    expect(isAppUrl('file:///home/user/biquadrant/out/renderer/index.html', 'app://biquadrant')).toBe(false);
    expect(isAppUrl('http://localhost:5174/', 'http://localhost:5173')).toBe(false);
    expect(isAppUrl('http://evil.example/', 'http://localhost:5173')).toBe(false);
    expect(isAppUrl('app://user:pw@biquadrant/index.html', 'app://biquadrant')).toBe(false);
    expect(isAppUrl('about:blank', 'app://biquadrant')).toBe(false);
    expect(isAppUrl('', 'app://biquadrant')).toBe(false);
  });
});
