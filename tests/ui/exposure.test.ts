// Permissible daily exposure, checked against the published tables.
import { describe, expect, it } from 'vitest';
import { dailyDose, formatDose, formatDuration, nioshMinutes, nioshPermissibleMinutes, oshaHours, oshaPermissibleMinutes, PEAK_LIMIT_DB } from '../../src/ui/exposure';

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

describe('permissible times are rounded DOWN and match the tables', () => {
  it('NIOSH 98-126 Table 1-1: 103 dBA 7 min 30 s, 124 dBA 3 s (as printed, from memory); rounding to nearest gave 8 min and 4 s', () => {
    expect(formatDuration(nioshPermissibleMinutes(103))).toBe('7 min 30 s');
    expect(formatDuration(nioshPermissibleMinutes(124))).toBe('3 s');
  });
  it('NIOSH formula values floored: 86 dBA 380.98 min -> 6 h 20 min; 95 dBA 47.62 min -> 47 min 37 s; 100 dBA 15 min', () => {
    // T = 480 / 2^((L - 85)/3) min (NIOSH 98-126, section 1.1), computed here by hand.
    expect(formatDuration(nioshPermissibleMinutes(86))).toBe('6 h 20 min');
    expect(formatDuration(nioshPermissibleMinutes(95))).toBe('47 min 37 s');
    expect(formatDuration(nioshPermissibleMinutes(100))).toBe('15 min');
    expect(formatDuration(nioshPermissibleMinutes(85))).toBe('8 h');
  });
  it('never shows more time than the formula gives (every 0.1 dB from 60 to 139.9 dBA)', () => {
    for (let l = 600; l < 1400; l++) {
      const level = l / 10;
      const shown = parseShown(formatDuration(nioshPermissibleMinutes(level)));
      if (shown !== null) expect(shown).toBeLessThanOrEqual(nioshMinutes(level) * 60 + 1e-6);
    }
  });
  it('no exposure at or above 140 dB (NIOSH 98-126; OSHA Table G-16 footnote: 140 dB peak)', () => {
    expect(PEAK_LIMIT_DB).toBe(140);
    expect(nioshPermissibleMinutes(140)).toBe(0);
    expect(formatDuration(nioshPermissibleMinutes(141))).toBe('none');
  });
  it('OSHA Table G-16 rows read as printed, and the figure stops at 115 dBA where the table ends', () => {
    // 29 CFR 1910.95 Table G-16: duration per day, hours (rows from the regulation, from memory).
    const rows: [number, string][] = [
      [90, '8 h'],
      [92, '6 h'],
      [95, '4 h'],
      [97, '3 h'],
      [100, '2 h'],
      [102, '1 h 30 min'],
      [105, '1 h'],
      [110, '30 min'],
      [115, '15 min'],
    ];
    for (const [level, text] of rows) expect(formatDuration(oshaPermissibleMinutes(level))).toBe(text);
    expect(oshaPermissibleMinutes(115.1)).toBe(0);
    expect(oshaPermissibleMinutes(120)).toBe(0);
    // Between rows: never more than the row below (93 dBA: formula 5.28 h, row 92: 6 h).
    expect(formatDuration(oshaPermissibleMinutes(93))).toBe('5 h 16 min');
  });
});

describe('daily dose D = sum C/T (NIOSH 98-126 section 1.1; 29 CFR 1910.95 Table G-16 footnote)', () => {
  it('adds each exposure as a fraction of its permissible time', () => {
    // NIOSH: 2 h at 88 dBA (T 4 h) + 1 h at 91 dBA (T 2 h) = 0.5 + 0.5 = 1.
    expect(dailyDose([{ levelDba: 88, minutes: 120 }, { levelDba: 91, minutes: 60 }], 'niosh').dose).toBeCloseTo(1, 12);
    // OSHA: 4 h at 90 dBA (T 8 h) + 2 h at 95 dBA (T 4 h) = 1; + 30 min at 100 dBA (T 2 h) = 1.25.
    const osha = dailyDose(
      [
        { levelDba: 90, minutes: 240 },
        { levelDba: 95, minutes: 120 },
        { levelDba: 100, minutes: 30 },
      ],
      'osha',
    );
    expect(osha.dose).toBeCloseTo(1.25, 12);
    expect(formatDose(osha.dose)).toBe('125%');
    expect(formatDose(1.0000001)).toBe('101%');
  });
  it('a level with no permissible time makes the dose "not permitted"', () => {
    const d = dailyDose([{ levelDba: 118, minutes: 1 }], 'osha');
    expect(d.dose).toBe(Infinity);
    expect(d.notPermitted).toEqual([118]);
    expect(formatDose(d.dose)).toBe('not permitted');
    expect(dailyDose([{ levelDba: 118, minutes: 1 }], 'niosh').dose).toBeCloseTo(1 / (nioshMinutes(118)), 9);
  });
});

/** Seconds of a formatted duration ("6 h 20 min", "7 min 30 s", "3 s"); null for other texts. */
function parseShown(text: string): number | null {
  const m = /^(?:(\d+) h)? ?(?:(\d+) min)? ?(?:(\d+) s)?$/.exec(text);
  if (!m || text === '') return null;
  return Number(m[1] ?? 0) * 3600 + Number(m[2] ?? 0) * 60 + Number(m[3] ?? 0);
}

describe('formatDuration', () => {
  it('prints hours and minutes, minutes and seconds, rounded down', () => {
    expect(formatDuration(480)).toBe('8 h');
    expect(formatDuration(150)).toBe('2 h 30 min');
    expect(formatDuration(15)).toBe('15 min');
    expect(formatDuration(0.5)).toBe('30 s');
    expect(formatDuration(7.99)).toBe('7 min 59 s');
    expect(formatDuration(0.001)).toBe('under 1 s');
    expect(formatDuration(3000)).toBe('over 24 h');
    expect(formatDuration(NaN)).toBe('\u2013');
  });
});
