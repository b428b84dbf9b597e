/**
 * The limits the plan reader holds shelf slopes to. It lives with the plan (not with the designs in
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

/**
 * How close to the unit circle a shelf's poles may come when it is set by slope, stated as a
 * resonance: the cookbook shelf's poles are those of a second-order section with
 * 1/Q^2 = (A + 1/A)(1/S - 1) + 2 (alpha = sin(w0) / 2Q), so S = 1 gives Q = 1/sqrt(2) and S_max
 * gives Q = infinity (alpha = 0, poles on the unit circle; +6 dB at S 17.4 already peaks +28.6 dB
 * with a pole at radius 0.998). Slopes are accepted while that Q stays at most 10, the damping of
 * a sharp but usable resonance (common practice, no source: a limit a user can state and see).
 */
export const SHELF_SLOPE_Q_MAX = 10;

/**
 * The steepest accepted shelf slope for a gain: (A + 1/A)(1/S - 1) + 2 >= 1/Q^2 with
 * Q = SHELF_SLOPE_Q_MAX, so S <= (A + 1/A) / (A + 1/A - 2 + 1/Q^2). Always below `maxShelfSlope`.
 */
export function safeShelfSlope(gainDb: number): number {
  const A = Math.pow(10, gainDb / 40);
  const s = A + 1 / A;
  return s / (s - 2 + 1 / (SHELF_SLOPE_Q_MAX * SHELF_SLOPE_Q_MAX));
}

/** `safeShelfSlope` rounded DOWN to 4 significant digits: a limit stated in a message is itself accepted. */
export function shelfSlopeLimitText(gainDb: number): string {
  const x = safeShelfSlope(gainDb);
  const p = Math.pow(10, 3 - Math.floor(Math.log10(x)));
  return String(Math.floor(x * p) / p);
}
