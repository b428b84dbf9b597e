/**
 * Error text about a file never prints the file's raw bytes: a PNG, a ZIP or random bytes opened
 * as a plan, or pasted as a coefficient list, is described (binary data, where the JSON breaks),
 * not quoted. The magic numbers are those of the PNG specification (89 50 4E 47 0D 0A 1A 0A,
 * ISO/IEC 15948 section 5.2) and the ZIP local file header ("PK\x03\x04", PKWARE APPNOTE 4.3.7).
 */
import { describe, expect, it } from 'vitest';
import { parseCoefficientList } from '../../src/export/import';
import { BUILT_IN_PROFILES } from '../../src/export/profiles';
import { readPlanText } from '../../src/plan/read';
import { parseJsonText } from '../../src/plan/json';
import { shownToken } from '../../src/plan/shown-text';

// A PNG signature and IHDR start as a text decoder with replacement would hand them over.
const PNG = new TextDecoder('utf-8').decode(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]));
const ZIP = 'PK\u0003\u0004\u0014\u0000\u0000\u0000\u0008\u0000plan.json';

describe('junk files in error text', () => {
  it.each([
    ['PNG', PNG],
    ['ZIP', ZIP],
  ])('a %s opened as a plan is called binary, and none of its bytes are shown', (_kind, text) => {
    const r = readPlanText(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.message).toMatch(/binary data/);
    expect(r.error.message).not.toMatch(/[\u0000-\u001f\ufffd]/);
    expect(r.error.message).not.toMatch(/PNG|PK|IHDR|plan\.json/);
  });

  it('broken JSON gives a line and column, not a slice of the text', () => {
    const text = '{\n  "format": "biquadrant.plan",\n  "version": 3 secret-words\n}';
    const r = readPlanText(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.message).toMatch(/line 3, column \d+/);
    expect(r.error.message).not.toMatch(/secret/);
  });

  it('text that is not JSON at all, and an empty file', () => {
    const problem = (text: string) => {
      const r = parseJsonText(text);
      return r.ok ? null : { path: r.error.path, message: r.error.message };
    };
    expect(problem('hello there')).toEqual({ path: '', message: 'not valid JSON: it does not start with "{"' });
    expect(problem('  \n')).toEqual({ path: '', message: 'the file is empty' });
  });

  it('an imported list with junk tokens names no raw bytes', () => {
    const r = parseCoefficientList(`\u0001\u0002\ufffd 1 2 3 4\n`, BUILT_IN_PROFILES[0].profile, 'text');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.message).not.toMatch(/[\u0000-\u001f\ufffd]/);
      expect(r.error.message).toMatch(/unreadable characters/);
    }
  });

  it('a short printable token is still quoted', () => {
    expect(shownToken('abc')).toBe('"abc"');
    expect(shownToken('x'.repeat(40))).toBe(`"${'x'.repeat(24)}..."`);
  });
});
