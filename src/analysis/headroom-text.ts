/**
 * The two headroom figures of an output in words, for `check` and the app's status bar: the sine
 * peak (over 0 Hz .. Nyquist) and the worst-case peak for any input bounded by full scale
 * (docs/references.md, "Headroom and the worst-case peak").
 */
import type { OutputAnalysis } from './check';
import { dbText, peakPlaceText } from '../format';

export function headroomLine(o: Pick<OutputAnalysis, 'headroom' | 'worstCase'>): string {
  const w = o.worstCase;
  const worst = `${w.complete ? '' : 'at least '}${dbText(w.peakDb)}`;
  return `sine peak ${dbText(o.headroom.peakDb)} at ${peakPlaceText(o.headroom)}; worst-case peak for any full-scale input ${worst}`;
}
