/**
 * Every limit the warnings, the status bar, the default frequencies and the plot ranges use, in
 * one place. A component or a command that needs one imports it from here; none keeps a copy.
 *
 * Fractions are of the sample rate fs (not of Nyquist) unless the name says otherwise.
 */

/** Boost below this is rounding, not headroom loss (a Linkwitz-Riley high-pass peaks at +1e-10 dB). */
export const HEADROOM_WARN_DB = 0.01;
/**
 * Boost above this is a danger, not only a warning: a full-scale input then clips by more than
 * 6 dB, twice the peak amplitude (common practice, no source).
 */
export const HEADROOM_DANGER_DB = 6;

/** Plots of the audio band (the quantized response) run from this frequency... */
export const HEADROOM_LOW_HZ = 10;
/** ...to this one, or to `AUDIO_BAND_TOP_FRACTION` of fs where that is lower. */
export const HEADROOM_HIGH_HZ = 20000;
/** 0.45 fs keeps the audio band clear of the region where every bilinear design cramps. */
export const AUDIO_BAND_TOP_FRACTION = 0.45;

/** A band or edge frequency above this fraction of Nyquist is flagged: the bilinear transform cramps it. */
export const NEAR_NYQUIST_FRACTION = 0.9;

/** A pole radius above this is flagged as marginal (common practice, no source: low-frequency sections at high rates sit near 0.999). */
export const MARGINAL_POLE_RADIUS = 0.99999;
/** Pole radii from here up are shown with seven decimals, below it four are enough to tell them apart. */
export const POLE_RADIUS_FINE_DIGITS_FROM = 0.999;

/**
 * The quantized-response plot of the export view runs to 0.49 fs: close to Nyquist the
 * quantized and exact responses part by design, not by error, and the view is about the audio band.
 */
export const QUANTIZED_PLOT_TOP_FRACTION = 0.49;
/**
 * A dragged or nudged band frequency at or past Nyquist is put back to 0.499 fs, just inside, so
 * the plan reader (which refuses frequencies within 1e-6 fs of Nyquist) accepts it.
 */
export const DRAG_TOP_FRACTION = 0.499;
/** The default top of `response` on the command line: 20 kHz or 99.9% of Nyquist, whichever is lower. */
export const RESPONSE_TOP_NYQUIST_FRACTION = 0.999;

/** The upper end of the plotted audio band at `sampleRateHz`. */
export function audioBandTopHz(sampleRateHz: number): number {
  return Math.min(HEADROOM_HIGH_HZ, AUDIO_BAND_TOP_FRACTION * sampleRateHz);
}

/** Headroom of `peakDb` as a severity: none, a warning, or a danger. */
export function headroomSeverity(peakDb: number): 'warning' | 'danger' | null {
  // NaN-safe: a peak that cannot be computed is as loud a danger as a large one.
  return !(peakDb <= HEADROOM_DANGER_DB) ? 'danger' : !(peakDb <= HEADROOM_WARN_DB) ? 'warning' : null;
}

/** The plan sheet's plots run to 20 kHz or this fraction of fs, like the export view's quantized plot. */
export const SHEET_PLOT_TOP_FRACTION = QUANTIZED_PLOT_TOP_FRACTION;

/**
 * `check` reports a band or edge whose digital magnitude departs from its analog prototype by
 * more than this over the cramping range (common practice, no source: 1 dB is about the smallest
 * broad level change listeners notice reliably).
 */
export const CRAMPING_WARN_DB = 1;
/**
 * Magnitudes below this are compared as this (common practice, no source): below -20 dB a band or
 * edge is in its stop band, where its exact depth is not its shape (a crossover edge's bilinear
 * stop band falls faster toward Nyquist than the analog one, which only helps), and a notch's
 * zero is not a shape error.
 */
export const CRAMPING_FLOOR_DB = -20;
/** The cramping range: 20 Hz to 20 kHz or `RESPONSE_TOP_NYQUIST_FRACTION` of Nyquist, whichever is lower, on this many log-spaced points. */
export const CRAMPING_LOW_HZ = 20;
export const CRAMPING_POINTS = 512;
/** A sample-rate change that moves a band or edge by more than this (dB, 20 Hz - 20 kHz) offers a matched design. */
export const RETARGET_TOLERANCE_DB = 0.5;
/** Delay rounding: the sum's difference between the exact and the board's delays is shown above this (dB). */
export const DELAY_ROUNDING_SHOW_DB = 0.1;

/** The top of the cramping range at `sampleRateHz`. */
export function crampingTopHz(sampleRateHz: number): number {
  return Math.min(HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION * (sampleRateHz / 2));
}

/** A section the board's format holds with a larger magnitude error (dB) or pole-frequency error (%) asks for more than the direct form (common practice, no source). */
export const SENSITIVITY_ERROR_DB = 0.1;
export const SENSITIVITY_FREQUENCY_PERCENT = 1;
/** Poles this close to the unit circle ask for error feedback in a fixed-point format (common practice, no source). */
export const ERROR_FEEDBACK_RADIUS = 0.999;
