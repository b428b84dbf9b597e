/**
 * Numbers as the user reads them, shared by every surface (the command line's messages, the
 * app's fields and plots). No imports: any layer may use it.
 */

/** "63 Hz", "2.2 kHz", "12.5 kHz" (4 significant digits, trailing zeros dropped); a dash when not finite. */
export function formatFrequency(hz: number): string {
  if (!Number.isFinite(hz)) return '\u2013';
  return Math.abs(hz) >= 1000 ? `${+(hz / 1000).toPrecision(4)} kHz` : `${+hz.toPrecision(4)} Hz`;
}
