/**
 * The bandwidth a band actually has once digital, beside the nominal one the user typed.
 *
 * A bandwidth in octaves is the distance between the band's edge frequencies: its half-gain (dB
 * midpoint) frequencies for a peaking band, its -3.01 dB frequencies for a band-pass or notch
 * (Audio EQ Cookbook, "BW" definition). The cookbook turns a bandwidth into Q with the
 * correction w0 / sin(w0), exact for the bilinear transform only at small w0; near Nyquist the
 * digital edges sit elsewhere (1 octave asked at 18 kHz, 44.1 kHz gives 1.37 octaves,
 * tests/reference/make_analog_fixtures.py).
 */
import { designBandBy } from './band';
import type { Band, DesignMethod } from '../plan/types';
import type { Section } from './section';

/**
 * The edges of a bilinear (cookbook) band of quality factor q at f0. The cookbook's sections are
 * the bilinear transform of the analog prototype, so H(e^jw) = Ha(j W) with
 * W = tan(w/2) / tan(w0/2); the analog edges are W1 = (sqrt(1/Q^2 + 4) - 1/Q) / 2 and W2 = 1/W1
 * (for every gain: |1/W - W| = 1/Q at the half-gain points), mapped back by w = 2 atan(W tan(w0/2)).
 */
export function bilinearBandEdgesHz(q: number, frequencyHz: number, sampleRateHz: number): { lowerHz: number; upperHz: number } {
  const t = Math.tan((Math.PI * frequencyHz) / sampleRateHz);
  const inv = 1 / q;
  const w1 = (Math.sqrt(inv * inv + 4) - inv) / 2;
  const toHz = (W: number) => (sampleRateHz / Math.PI) * Math.atan(W * t);
  return { lowerHz: toHz(w1), upperHz: toHz(1 / w1) };
}

/** |H|^2 of one section at f. */
function sectionPower(s: Section, frequencyHz: number, sampleRateHz: number): number {
  const w = (2 * Math.PI * frequencyHz) / sampleRateHz;
  const c1 = Math.cos(w);
  const s1 = Math.sin(w);
  const c2 = Math.cos(2 * w);
  const s2 = Math.sin(2 * w);
  const nr = s.b0 + s.b1 * c1 + s.b2 * c2;
  const ni = s.b1 * s1 + s.b2 * s2;
  const dr = 1 + s.a1 * c1 + s.a2 * c2;
  const di = s.a1 * s1 + s.a2 * s2;
  return (nr * nr + ni * ni) / (dr * dr + di * di);
}

/** The level (dB) at a band's edges: half its gain for peaking, -3.01 dB for band-pass and notch; null where bandwidth has no meaning. */
export function bandEdgeLevelDb(band: Band): number | null {
  if (band.type === 'peaking') return (band.gainDb ?? 0) / 2;
  if (band.type === 'bandPass' || band.type === 'notch') return 10 * Math.log10(0.5);
  return null;
}

/**
 * The edges of a designed band, found on its digital response by bisection (to 1e-9 relative):
 * the lower edge between 0 Hz and f0, the upper between f0 and Nyquist. An edge the response
 * never reaches on its side (the upper edge of a band whose analog edge lies beyond Nyquist) is null.
 */
export function digitalBandEdgesHz(band: Band, sampleRateHz: number, defaultMethod?: DesignMethod): { lowerHz: number | null; upperHz: number | null } | null {
  const levelDb = bandEdgeLevelDb(band);
  if (levelDb === null || (band.type === 'peaking' && (band.gainDb ?? 0) === 0)) return null;
  const [s] = designBandBy(band, sampleRateHz, defaultMethod);
  const target = Math.pow(10, levelDb / 10);
  const f0 = band.frequency;
  // Inside the band the response is beyond the edge level (above it for a boost, below for a cut or notch).
  const inside = (f: number) => (sectionPower(s, f, sampleRateHz) > target) === (sectionPower(s, f0, sampleRateHz) > target);
  const find = (lo: number, hi: number, insideAtLo: boolean): number | null => {
    if (inside(lo) === insideAtLo && inside(hi) === insideAtLo) return null;
    for (let i = 0; i < 200 && hi - lo > 1e-9 * hi; i++) {
      const mid = (lo + hi) / 2;
      if (inside(mid) === insideAtLo) lo = mid;
      else hi = mid;
    }
    return (lo + hi) / 2;
  };
  const nyquist = sampleRateHz / 2;
  return { lowerHz: find(1e-6 * nyquist, f0, false), upperHz: find(f0, nyquist * (1 - 1e-9), true) };
}

/** The digital bandwidth in octaves (log2 of the edge ratio), or null when an edge is beyond Nyquist or the band has no bandwidth. */
export function achievedBandwidthOctaves(band: Band, sampleRateHz: number, defaultMethod?: DesignMethod): number | null {
  const e = digitalBandEdgesHz(band, sampleRateHz, defaultMethod);
  if (!e || e.lowerHz === null || e.upperHz === null) return null;
  return Math.log2(e.upperHz / e.lowerHz);
}
