/**
 * Permissible daily noise exposure for a steady A-weighted level at the ear, by two published
 * criteria. These are occupational limits for levels at the listener's ear, not a safe-listening
 * guarantee; local regulations and qualified professionals decide.
 *
 * NIOSH Recommended Exposure Limit (NIOSH, "Criteria for a Recommended Standard: Occupational
 * Noise Exposure", Revised Criteria 1998, DHHS (NIOSH) Publication No. 98-126, section 1.1):
 * 85 dBA for 8 hours with a 3 dB exchange rate, T = 480 / 2^((L - 85) / 3) minutes.
 *
 * OSHA Permissible Exposure Limit (29 CFR 1910.95, Table G-16 and its footnote, Appendix A):
 * 90 dBA for 8 hours with a 5 dB exchange rate, T = 8 / 2^((L - 90) / 5) hours.
 */

export const NIOSH = { name: 'NIOSH REL', criterionDba: 85, exchangeDb: 3, referenceHours: 8, source: 'NIOSH Pub. 98-126' } as const;
export const OSHA = { name: 'OSHA PEL', criterionDba: 90, exchangeDb: 5, referenceHours: 8, source: 'OSHA 29 CFR 1910.95, Table G-16' } as const;

/** Minutes per day at `levelDba` by the NIOSH REL. */
export function nioshMinutes(levelDba: number): number {
  return 480 / Math.pow(2, (levelDba - NIOSH.criterionDba) / NIOSH.exchangeDb);
}

/** Hours per day at `levelDba` by the OSHA PEL. */
export function oshaHours(levelDba: number): number {
  return 8 / Math.pow(2, (levelDba - OSHA.criterionDba) / OSHA.exchangeDb);
}

/** "8 h", "2 h 30 min", "15 min", "28 s"; durations over a day read "over 24 h". */
export function formatDuration(minutes: number): string {
  if (!Number.isFinite(minutes) || minutes < 0) return '\u2013';
  if (minutes >= 24 * 60) return 'over 24 h';
  if (minutes < 1) {
    const s = Math.round(minutes * 60);
    return s < 1 ? 'under 1 s' : `${s} s`;
  }
  const total = Math.round(minutes);
  const h = Math.floor(total / 60);
  const m = total % 60;
  if (h === 0) return `${m} min`;
  return m === 0 ? `${h} h` : `${h} h ${m} min`;
}
