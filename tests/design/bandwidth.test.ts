/**
 * The bandwidth a cookbook band achieves once digital, against the half-gain (peaking) and
 * -3.01 dB (band-pass) frequencies found on scipy.signal.freqz by brentq in
 * tests/reference/make_analog_fixtures.py (1 octave asked at 18 kHz, 44.1 kHz gives 1.373
 * octaves). Tolerance 1e-8 octave: both sides solve for the same crossing to ~1e-12 relative.
 */
import { describe, expect, it } from 'vitest';
import { achievedBandwidthOctaves, bilinearBandEdgesHz, digitalBandEdgesHz } from '../../src/design/bandwidth';
import { qFromBandwidthOctaves } from '../../src/design/cookbook';
import type { Band, BandType } from '../../src/plan/types';
import { loadFixture } from '../helpers/reference';

interface BandwidthCase {
  kind: string;
  type: BandType;
  frequency: number;
  sampleRate: number;
  bandwidthOctaves: number;
  gainDb: number;
  q: number;
  lowerHz: number;
  upperHz: number;
  achievedOctaves: number;
}

const cases = loadFixture<BandwidthCase>('analog.json').cases.filter((c) => c.kind === 'bandwidth');

describe('bandwidth achieved (scipy.signal.freqz + brentq)', () => {
  it('holds the 18 kHz / 44.1 kHz case', () => expect(cases.some((c) => c.frequency === 18000 && c.sampleRate === 44100)).toBe(true));
  for (const c of cases) {
    it(`${c.type} ${c.bandwidthOctaves} octave at ${c.frequency} Hz, ${c.sampleRate} Hz gives ${c.achievedOctaves.toFixed(4)} octaves`, () => {
      const q = qFromBandwidthOctaves(c.bandwidthOctaves, c.frequency, c.sampleRate);
      expect(q).toBeCloseTo(c.q, 12);
      const closed = bilinearBandEdgesHz(q, c.frequency, c.sampleRate);
      expect(closed.lowerHz).toBeCloseTo(c.lowerHz, 6);
      expect(closed.upperHz).toBeCloseTo(c.upperHz, 6);
      const b: Band = { id: 'b', type: c.type, frequency: c.frequency, q, gainDb: c.gainDb, enabled: true };
      expect(Math.abs(achievedBandwidthOctaves(b, c.sampleRate)! - c.achievedOctaves)).toBeLessThan(1e-8);
    });
  }

  it('a band with no upper edge below Nyquist has no achieved bandwidth, only its lower edge', () => {
    const b: Band = { id: 'b', type: 'peaking', frequency: 18000, gainDb: -8, q: 0.7, enabled: true, design: 'matched' };
    const e = digitalBandEdgesHz(b, 44100)!;
    expect(e.lowerHz).toBeGreaterThan(5000);
    expect(e.upperHz).toBeNull();
    expect(achievedBandwidthOctaves(b, 44100)).toBeNull();
  });

  it('types without a bandwidth give none', () => {
    expect(achievedBandwidthOctaves({ id: 'b', type: 'lowShelf', frequency: 1000, gainDb: 6, enabled: true }, 48000)).toBeNull();
    expect(achievedBandwidthOctaves({ id: 'b', type: 'peaking', frequency: 1000, gainDb: 0, q: 1, enabled: true }, 48000)).toBeNull();
  });
});
