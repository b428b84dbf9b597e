/**
 * The two headroom figures of an output in words, for `check` and the app's status bar: the sine
 * peak (over 0 Hz .. Nyquist) and the worst-case peak for any input bounded by full scale
 * (docs/references.md, "Headroom and the worst-case peak").
 */
import type { OutputAnalysis } from './check';
import type { Headroom } from './headroom';
import { formatFrequency } from '../ui/units';

/** A dB figure for messages: "+20.02 dB", "unbounded" for an infinite gain. */
export function dbText(db: number): string {
  if (Number.isNaN(db)) return 'not computable';
  if (!Number.isFinite(db)) return db > 0 ? 'unbounded' : 'no output';
  return `${db >= 0 ? '+' : ''}${db.toFixed(2)} dB`;
}

/** Where a peak lies, with a note when it is outside the audio band. */
export function peakPlaceText(h: Pick<Headroom, 'frequencyHz' | 'outsideAudioBand'>): string {
  return `${formatFrequency(h.frequencyHz)}${h.outsideAudioBand ? ' (outside 20 Hz - 20 kHz)' : ''}`;
}

export function headroomLine(o: Pick<OutputAnalysis, 'headroom' | 'worstCase'>): string {
  const w = o.worstCase;
  const worst = `${w.complete ? '' : 'at least '}${dbText(w.peakDb)}`;
  return `sine peak ${dbText(o.headroom.peakDb)} at ${peakPlaceText(o.headroom)}; worst-case peak for any full-scale input ${worst}`;
}
