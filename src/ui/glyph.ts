/**
 * Band glyphs: a tiny drawing of each band type's own curve, computed from the type's design
 * (cookbook.ts) rather than drawn by hand, so the picture is the shape the band makes. Each type
 * is drawn with one typical setting (1 kHz at 48 kHz on 20 Hz .. 20 kHz, boosts +9 dB); all-pass
 * types, flat in magnitude, are drawn as their phase (falling), dashed in the renderer.
 */
import { designBand } from '../design/cookbook';
import type { Section } from '../design/section';
import type { Band, BandType } from '../plan/types';

const FS = 48000;
const POINTS = 24;
const DB_TOP = 12;
const DB_BOTTOM = -24;

/** The typical band each glyph shows; a cut (negative gain) is drawn as a cut. */
function typical(type: BandType, cut: boolean): Band {
  const gainDb = cut ? -9 : 9;
  switch (type) {
    case 'peaking':
      return { id: 'g', type, frequency: 1000, gainDb, q: 1.4, enabled: true };
    case 'lowShelf':
    case 'highShelf':
      return { id: 'g', type, frequency: 1000, gainDb, slope: 1, enabled: true };
    case 'notch':
      return { id: 'g', type, frequency: 1000, q: 2, enabled: true };
    case 'bandPass':
      return { id: 'g', type, frequency: 1000, q: 0.9, enabled: true };
    default:
      return { id: 'g', type, frequency: 1000, q: Math.SQRT1_2, enabled: true };
  }
}

/** H(e^jw) of a cascade, as magnitude (dB) and phase (rad) at one frequency. */
function responseAt(sections: readonly Section[], f: number): { db: number; phase: number } {
  const w = (2 * Math.PI * f) / FS;
  let re = 1;
  let im = 0;
  for (const s of sections) {
    const c1 = Math.cos(w);
    const s1 = -Math.sin(w);
    const c2 = Math.cos(2 * w);
    const s2 = -Math.sin(2 * w);
    const nr = s.b0 + s.b1 * c1 + s.b2 * c2;
    const ni = s.b1 * s1 + s.b2 * s2;
    const dr = 1 + s.a1 * c1 + s.a2 * c2;
    const di = s.a1 * s1 + s.a2 * s2;
    const d = dr * dr + di * di;
    const hr = (nr * dr + ni * di) / d;
    const hi = (ni * dr - nr * di) / d;
    const r = re * hr - im * hi;
    im = re * hi + im * hr;
    re = r;
  }
  return { db: 10 * Math.log10(re * re + im * im), phase: Math.atan2(im, re) };
}

export interface Glyph {
  /** SVG path data in a `width` x `height` box. */
  path: string;
  /** True when the path is the phase (all-pass types): drawn dashed beside a flat magnitude line. */
  phase: boolean;
}

/**
 * The glyph of a band type (as a cut when `band` cuts), or of a raw band's own coefficients (a raw
 * band has no typical shape).
 */
export function bandGlyph(type: BandType, width: number, height: number, band?: Band): Glyph {
  const drawn = type === 'raw' ? band : typical(type, (band?.gainDb ?? 0) < 0);
  return glyphOf(drawn, type, width, height);
}

function glyphOf(band: Band | undefined, type: BandType, width: number, height: number): Glyph {
  const phase = type === 'allPass' || type === 'allPass1';
  if (!band) return { path: `M0 ${height / 2} H${width}`, phase: false };
  const sections = designBand(band, FS);
  const pad = 1;
  const pts: string[] = [];
  let unwrapped = 0;
  let last = 0;
  for (let i = 0; i < POINTS; i++) {
    const f = 20 * Math.pow(1000, i / (POINTS - 1));
    const r = responseAt(sections, f);
    let y: number;
    if (phase) {
      // Unwrapped phase from 0 down to -2 pi (2nd order) or -pi (1st order), top to bottom.
      let d = r.phase - last;
      if (d > Math.PI) d -= 2 * Math.PI;
      if (d < -Math.PI) d += 2 * Math.PI;
      unwrapped += i === 0 ? r.phase : d;
      last = r.phase;
      const span = type === 'allPass' ? 2 * Math.PI : Math.PI;
      y = pad + (-unwrapped / span) * (height - 2 * pad);
    } else {
      const db = Math.max(DB_BOTTOM, Math.min(DB_TOP, Number.isFinite(r.db) ? r.db : DB_BOTTOM));
      y = pad + ((DB_TOP - db) / (DB_TOP - DB_BOTTOM)) * (height - 2 * pad);
    }
    const x = (i / (POINTS - 1)) * width;
    pts.push(`${i === 0 ? 'M' : 'L'}${x.toFixed(1)} ${y.toFixed(1)}`);
  }
  return { path: pts.join(' '), phase };
}
