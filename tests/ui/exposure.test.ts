// Permissible daily exposure, checked against the published tables.
import { describe, expect, it } from 'vitest';
import { formatDuration, nioshMinutes, oshaHours } from '../../src/ui/exposure';

describe('NIOSH REL (DHHS (NIOSH) Pub. 98-126, Table 1-1: 85 dBA, 3 dB exchange rate)', () => {
  // Durations as listed in Table 1-1 of the criteria document (recalled from the publication,
  // from memory; each is the REL formula's value).
  it.each([
    [85, 8 * 60],
    [88, 4 * 60],
    [91, 2 * 60],
    [94, 60],
    [97, 30],
    [100, 15],
    [103, 7.5],
    [106, 3.75],
    [82, 16 * 60],
  ])('%d dBA -> %d min', (level, minutes) => {
    expect(nioshMinutes(level)).toBeCloseTo(minutes, 9);
  });
});

describe('OSHA PEL (29 CFR 1910.95, Table G-16: 90 dBA, 5 dB exchange rate)', () => {
  // Table G-16 "Permissible noise exposures": duration per day, hours (rows recalled from the
  // regulation, from memory).
  it.each([
    [90, 8],
    [92, 6], // the table rounds 6.06 h to 6
    [95, 4],
    [97, 3], // table: 3 (formula 3.03)
    [100, 2],
    [102, 1.5], // table: 1.5 (formula 1.52)
    [105, 1],
    [110, 0.5],
    [115, 0.25],
  ])('%d dBA -> %d h', (level, hours) => {
    // Tolerance 0.07 h: the table rounds the 5 dB exchange-rate formula (Appendix A, T = 8 / 2^((L-90)/5)).
    expect(Math.abs(oshaHours(level) - hours)).toBeLessThan(0.07);
  });

  it('is exact at whole exchange steps', () => {
    expect(oshaHours(95)).toBe(4);
    expect(oshaHours(85)).toBe(16);
  });
});

describe('formatDuration', () => {
  it('prints hours and minutes', () => {
    expect(formatDuration(480)).toBe('8 h');
    expect(formatDuration(150)).toBe('2 h 30 min');
    expect(formatDuration(15)).toBe('15 min');
    expect(formatDuration(0.5)).toBe('30 s');
    expect(formatDuration(3000)).toBe('over 24 h');
    expect(formatDuration(NaN)).toBe('\u2013');
  });
});
