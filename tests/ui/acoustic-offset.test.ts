/**
 * The acoustic offset field (src/ui/acoustic-offset.ts): distances stay distances in mm, times
 * stay times in ms, with the plan's limits (docs/plan-format.md, "Output").
 */
import { describe, expect, it } from 'vitest';
import { acousticOffsetMm, formatAcousticOffset, parseAcousticOffset, parseAcousticOffsetMm } from '../../src/ui/acoustic-offset';
import { speedOfSoundMps } from '../../src/measure/acoustic';

describe('acoustic offset field', () => {
  it.each([
    ['25', { value: 25, unit: 'mm' }],
    ['25 mm', { value: 25, unit: 'mm' }],
    ['2,5 cm', { value: 25, unit: 'mm' }],
    ['\u22120.03 m', { value: -30, unit: 'mm' }],
    ['0.07 ms', { value: 0.07, unit: 'ms' }],
    ['70 us', { value: 0.07, unit: 'ms' }],
    ['', null],
    ['0 cm', null],
  ])('%j -> %j', (text, want) => {
    const r = parseAcousticOffset(text);
    expect(r.ok).toBe(true);
    if (r.ok && want) expect(r.value).toEqual({ unit: want.unit, value: expect.closeTo(want.value, 12) });
    if (r.ok && !want) expect(r.value).toBeNull();
  });
  it.each([['far', /not an offset/], ['101 m', /within \+\/-100000 mm/], ['0.5 s', /not an offset/], ['400 ms', /within \+\/-300 ms/]])('%j refused', (text, reason) => {
    const r = parseAcousticOffset(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(reason);
  });
  it('formats with its unit; none is 0 mm', () => {
    expect(formatAcousticOffset({ value: 25.04, unit: 'mm' })).toBe('25 mm');
    expect(formatAcousticOffset({ value: -0.0728, unit: 'ms' })).toBe('-0.073 ms');
    expect(formatAcousticOffset(undefined)).toBe('0 mm');
  });
  it('as a distance for the app: 1 ms is c mm (343.2 mm at 20 C, 331.3 mm at 0 C)', () => {
    expect(parseAcousticOffsetMm('1 ms')).toEqual({ ok: true, value: speedOfSoundMps(20) });
    expect(parseAcousticOffsetMm('1 ms', 0)).toEqual({ ok: true, value: 331.3 });
    expect(parseAcousticOffsetMm('3 cm')).toEqual({ ok: true, value: 30 });
    expect(parseAcousticOffsetMm('')).toEqual({ ok: true, value: 0 });
    // 290 ms is 99.5 m at 20 C, within the plan's 100 m; 299 ms is 102.6 m, past it
    expect(parseAcousticOffsetMm('290 ms')).toEqual({ ok: true, value: expect.closeTo(290 * speedOfSoundMps(20), 9) });
    expect(parseAcousticOffsetMm('299 ms')).toEqual({ ok: false, reason: expect.stringMatching(/within \+\/-100000 mm/) });
    expect(acousticOffsetMm({ value: 2, unit: 'ms' }, 0)).toBeCloseTo(662.6, 9);
    expect(acousticOffsetMm(undefined)).toBe(0);
  });
});
