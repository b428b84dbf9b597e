/**
 * Numbers as the user reads them, shared by every surface (the command line's messages, the
 * app's fields and plots). No imports: any layer may use it.
 */

/** "63 Hz", "2.2 kHz", "12.5 kHz" (4 significant digits, trailing zeros dropped); a dash when not finite. */
export function formatFrequency(hz: number): string {
  if (!Number.isFinite(hz)) return '\u2013';
  return Math.abs(hz) >= 1000 ? `${+(hz / 1000).toPrecision(4)} kHz` : `${+hz.toPrecision(4)} Hz`;
}

/** A dB figure for messages: "+20.02 dB", "unbounded" for an infinite gain. */
export function dbText(db: number): string {
  if (Number.isNaN(db)) return 'not computable';
  if (!Number.isFinite(db)) return db > 0 ? 'unbounded' : 'no output';
  return `${db >= 0 ? '+' : ''}${db.toFixed(2)} dB`;
}

/** Where a peak lies, with a note when it is outside the audio band (20 Hz - 20 kHz). */
export function peakPlaceText(h: { frequencyHz: number; outsideAudioBand: boolean }): string {
  return `${formatFrequency(h.frequencyHz)}${h.outsideAudioBand ? ' (outside 20 Hz - 20 kHz)' : ''}`;
}
