/**
 * Permissible daily noise exposure for a steady A-weighted level at the ear, by two published
 * criteria, and the daily dose of several levels. These are occupational limits for levels at the
 * listener's ear, not a safe-listening guarantee; local regulations and qualified professionals
 * decide. Sources: docs/references.md, "Hearing safety".
 *
 * NIOSH Recommended Exposure Limit (NIOSH, "Criteria for a Recommended Standard: Occupational
 * Noise Exposure", Revised Criteria 1998, DHHS (NIOSH) Publication No. 98-126, section 1.1 and
 * Table 1-1): 85 dBA for 8 hours with a 3 dB exchange rate, T = 480 / 2^((L - 85) / 3) minutes; no
 * exposure at or above 140 dBA (the peak limit).
 *
 * OSHA Permissible Exposure Limit (29 CFR 1910.95, Table G-16 and its footnotes, Appendix A):
 * 90 dBA for 8 hours with a 5 dB exchange rate, T = 8 / 2^((L - 90) / 5) hours. The table ends at
 * 115 dBA (1/4 h or less) and lists no time above; its footnote limits impulsive or impact noise
 * to 140 dB peak.
 *
 * Both documents add mixed exposures as the daily dose D = C1/T1 + C2/T2 + ... (C the time at a
 * level, T the permissible time there); D above 1 exceeds the limit.
 *
 * Every permissible time shown is rounded DOWN (to the minute above an hour, to the second below):
 * a figure rounded to the nearest value can promise more time than the criterion allows.
 */

export const NIOSH = { name: 'NIOSH REL', criterionDba: 85, exchangeDb: 3, referenceHours: 8, source: 'NIOSH Pub. 98-126' } as const;
export const OSHA = { name: 'OSHA PEL', criterionDba: 90, exchangeDb: 5, referenceHours: 8, source: 'OSHA 29 CFR 1910.95, Table G-16' } as const;

/** No exposure at or above this level (NIOSH 98-126; OSHA Table G-16 footnote: 140 dB peak). */
export const PEAK_LIMIT_DB = 140;
/** OSHA Table G-16's last row: 115 dBA, 1/4 h or less. */
export const OSHA_TABLE_END_DBA = 115;

/**
 * OSHA Table G-16 "Permissible noise exposures" (29 CFR 1910.95): [dBA, hours per day]. The
 * table rounds the 5 dB rule down (92 dBA: 6 h where the formula gives 6.06 h).
 */
export const OSHA_TABLE_G16: readonly (readonly [number, number])[] = [
  [90, 8],
  [92, 6],
  [95, 4],
  [97, 3],
  [100, 2],
  [102, 1.5],
  [105, 1],
  [110, 0.5],
  [115, 0.25],
];

/** Minutes per day at `levelDba` by the NIOSH REL formula. */
export function nioshMinutes(levelDba: number): number {
  return 480 / Math.pow(2, (levelDba - NIOSH.criterionDba) / NIOSH.exchangeDb);
}

/** Hours per day at `levelDba` by the OSHA PEL formula (Appendix A). */
export function oshaHours(levelDba: number): number {
  return 8 / Math.pow(2, (levelDba - OSHA.criterionDba) / OSHA.exchangeDb);
}

/** Permissible minutes per day by the NIOSH REL; 0 at or above the 140 dB limit. */
export function nioshPermissibleMinutes(levelDba: number): number {
  if (!(levelDba < PEAK_LIMIT_DB)) return 0;
  return nioshMinutes(levelDba);
}

/**
 * Permissible minutes per day by the OSHA PEL: the formula, never more than the table's value at
 * the nearest listed level at or below (so the table's rows read as printed); 0 above 115 dBA,
 * where the table ends.
 */
export function oshaPermissibleMinutes(levelDba: number): number {
  if (!(levelDba <= OSHA_TABLE_END_DBA)) return 0;
  let hours = oshaHours(levelDba);
  for (const [level, h] of OSHA_TABLE_G16) if (level <= levelDba) hours = Math.min(hours, Math.max(h, 0));
  return hours * 60;
}

export interface Exposure {
  levelDba: number;
  minutes: number;
}

export interface Dose {
  /** D = sum C_i / T_i (1 = the whole daily limit); Infinity when a level is not permitted at all. */
  dose: number;
  /** Levels with no permissible time (at or above 140 dB; OSHA: above 115 dBA). */
  notPermitted: number[];
}

/** The daily dose of several exposures by one criterion (NIOSH 98-126 section 1.1; 29 CFR 1910.95 Table G-16 footnote). */
export function dailyDose(exposures: readonly Exposure[], criterion: 'niosh' | 'osha'): Dose {
  let dose = 0;
  const notPermitted: number[] = [];
  for (const e of exposures) {
    if (!(e.minutes > 0)) continue;
    const t = criterion === 'niosh' ? nioshPermissibleMinutes(e.levelDba) : oshaPermissibleMinutes(e.levelDba);
    if (!(t > 0)) {
      notPermitted.push(e.levelDba);
      dose = Infinity;
    } else dose += e.minutes / t;
  }
  return { dose, notPermitted };
}

/**
 * A permissible time, rounded DOWN: "8 h", "6 h 20 min" (to the minute from an hour), "7 min 30 s",
 * "15 min", "3 s" (to the second below an hour), "under 1 s"; "over 24 h"; "none" for 0.
 */
export function formatDuration(minutes: number): string {
  if (Number.isNaN(minutes) || minutes < 0) return '\u2013';
  if (minutes === 0) return 'none';
  if (minutes >= 24 * 60) return 'over 24 h';
  // A relative 1e-12 keeps 7.5 min computed as 7.4999999999999 from reading 7 min 29 s.
  const seconds = Math.floor(minutes * 60 * (1 + 1e-12));
  if (seconds < 1) return 'under 1 s';
  if (seconds >= 3600) {
    const totalMinutes = Math.floor(seconds / 60);
    const h = Math.floor(totalMinutes / 60);
    const m = totalMinutes % 60;
    return m === 0 ? `${h} h` : `${h} h ${m} min`;
  }
  const m = Math.floor(seconds / 60);
  const s = seconds % 60;
  if (m === 0) return `${s} s`;
  return s === 0 ? `${m} min` : `${m} min ${s} s`;
}

/** A dose as a percentage of the daily limit, rounded UP ("100%" only when at most the limit). */
export function formatDose(dose: number): string {
  if (!Number.isFinite(dose)) return 'not permitted';
  return `${Math.ceil(dose * 100 - 1e-9)}%`;
}
