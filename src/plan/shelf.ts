/**
 * The limit the plan reader holds shelf slopes to. It lives with the plan (not with the designs in
 * design/cookbook.ts, which re-exports it) so the reader needs nothing from design/.
 */

/**
 * The largest shelf slope S for a gain: the cookbook's alpha needs (A + 1/A)(1/S - 1) + 2 >= 0,
 * so S <= (A + 1/A) / (A + 1/A - 2). Any S works at 0 dB. (Audio EQ Cookbook, shelf
 * alpha: docs/references.md, Biquad formulas.)
 */
export function maxShelfSlope(gainDb: number): number {
  const A = Math.pow(10, gainDb / 40);
  const s = A + 1 / A;
  return s - 2 <= 0 ? Infinity : s / (s - 2);
}
