/**
 * Band glyphs are drawn from each type's own design: the curve's shape must be the type's shape
 * (facts of the trade: a low-pass falls at high frequencies, a high-pass rises from low ones, a
 * peaking boost is highest at its centre, a notch is deepest at its centre, an all-pass is flat in
 * magnitude and its phase falls from 0 towards -360 degrees (2nd order) or -180 (1st order)).
 */
import { describe, expect, it } from 'vitest';
import { BAND_TYPES, type BandType } from '../../src/plan/types';
import { bandGlyph } from '../../src/ui/glyph';

const W = 28;
const H = 14;

function ys(type: BandType): number[] {
  return bandGlyph(type, W, H).path.split(/[ML]/).filter(Boolean).map((p) => Number(p.trim().split(' ')[1]));
}

describe('band glyphs', () => {
  it('every type gives a finite path inside its box, and no two types share one', () => {
    const paths = new Set<string>();
    for (const t of BAND_TYPES) {
      const y = ys(t);
      for (const v of y) {
        expect(Number.isFinite(v)).toBe(true);
        expect(v).toBeGreaterThanOrEqual(0);
        expect(v).toBeLessThanOrEqual(H);
      }
      paths.add(bandGlyph(t, W, H).path);
    }
    // raw without coefficients is a flat line; every designed type has its own drawing.
    expect(paths.size).toBe(BAND_TYPES.length);
  });

  it('shapes: low-pass falls, high-pass rises, peaking and notch extremes sit mid-way (y grows downwards)', () => {
    const lp = ys('lowPass');
    expect(lp[lp.length - 1]).toBeGreaterThan(lp[0] + 4);
    const hp = ys('highPass');
    expect(hp[0]).toBeGreaterThan(hp[hp.length - 1] + 4);
    const pk = ys('peaking');
    const top = pk.indexOf(Math.min(...pk));
    expect(top).toBeGreaterThan(5);
    expect(top).toBeLessThan(pk.length - 5);
    const n = ys('notch');
    const deep = n.indexOf(Math.max(...n));
    expect(deep).toBeGreaterThan(5);
    expect(deep).toBeLessThan(n.length - 5);
    const ls = ys('lowShelf');
    expect(ls[0]).toBeLessThan(ls[ls.length - 1] - 2); // boost at low frequencies
  });

  it('a cut is drawn as a cut: a peaking cut is lowest mid-way, a low-shelf cut is low at low frequencies', () => {
    const ysOf = (type: BandType, gainDb: number) =>
      bandGlyph(type, W, H, { id: 'x', type, frequency: 100, gainDb, q: 4, enabled: true })
        .path.split(/[ML]/)
        .filter(Boolean)
        .map((p) => Number(p.trim().split(' ')[1]));
    const pk = ysOf('peaking', -4.5);
    const low = pk.indexOf(Math.max(...pk));
    expect(low).toBeGreaterThan(5);
    expect(low).toBeLessThan(pk.length - 5);
    const ls = ysOf('lowShelf', -6);
    expect(ls[0]).toBeGreaterThan(ls[ls.length - 1] + 2);
  });

  it('all-pass types are drawn as their falling phase', () => {
    for (const t of ['allPass', 'allPass1'] as const) {
      const g = bandGlyph(t, W, H);
      expect(g.phase).toBe(true);
      const y = ys(t);
      for (let i = 1; i < y.length; i++) expect(y[i]).toBeGreaterThanOrEqual(y[i - 1] - 1e-9);
      expect(y[y.length - 1] - y[0]).toBeGreaterThan(H / 2);
    }
  });

  it('a raw band is drawn from its own coefficients', () => {
    const raw = { id: 'r', type: 'raw' as const, frequency: 1000, enabled: true, coefficients: { b0: 0.5, b1: 0.5, b2: 0, a0: 1, a1: 0, a2: 0 } };
    const y = bandGlyph('raw', W, H, raw).path;
    expect(y).not.toBe(bandGlyph('raw', W, H).path);
  });
});
