/**
 * The group delay of a sum of outputs where one output is tiny or exactly zero.
 *
 * The sum S = sum_k H_k has dS/dw = sum_k H_k' whatever the size of each H_k: an output below the
 * -200 dB floor (whose own group delay is written as null) still adds its derivative, and so does
 * an output at an exact zero (a notch at its own frequency), where H_k = 0 but H_k' is not.
 *
 * Reference (independent of the core's analytic derivative): the sum evaluated here with plain
 * complex arithmetic from the sections, and its group delay -d(arg S)/dw by a central 5-point
 * difference (truncation ~ h^4 phi^(5) / 30, rounding ~ eps |phi| / h: both far below the 1e-5
 * relative tolerance at the steps used). Skipping the derivative of such outputs would give errors
 * of 1e-3 relative below the floor and 30 % at a notch.
 */
import { describe, expect, it } from 'vitest';
import { designBand } from '../../src/design/cookbook';
import { designEdge } from '../../src/design/crossover';
import type { Section } from '../../src/design/section';
import { cascadeWithGainDelay, sumResponses } from '../../src/response/chain-response';

interface Part {
  sections: Section[];
  gain: number;
  delaySamples: number;
}

/** The complex sum of the parts at w (rad/sample), evaluated directly. */
function sumAt(parts: Part[], w: number): [number, number] {
  let sr = 0;
  let si = 0;
  for (const p of parts) {
    let hr = p.gain;
    let hi = 0;
    for (const s of p.sections) {
      // N = b0 + b1 e^{-jw} + b2 e^{-2jw}, D = 1 + a1 e^{-jw} + a2 e^{-2jw}
      const nr = s.b0 + s.b1 * Math.cos(w) + s.b2 * Math.cos(2 * w);
      const ni = -s.b1 * Math.sin(w) - s.b2 * Math.sin(2 * w);
      const dr = 1 + s.a1 * Math.cos(w) + s.a2 * Math.cos(2 * w);
      const di = -s.a1 * Math.sin(w) - s.a2 * Math.sin(2 * w);
      const d2 = dr * dr + di * di;
      const tr = (nr * dr + ni * di) / d2;
      const ti = (ni * dr - nr * di) / d2;
      const x = hr * tr - hi * ti;
      hi = hr * ti + hi * tr;
      hr = x;
    }
    const c = Math.cos(w * p.delaySamples);
    const s = -Math.sin(w * p.delaySamples);
    sr += hr * c - hi * s;
    si += hr * s + hi * c;
  }
  return [sr, si];
}

/** -d arg S / dw in samples, central 5-point difference with step h. */
function numericGroupDelay(parts: Part[], w: number, h: number): number {
  const ph = [-2, -1, 1, 2].map((k) => {
    const [r, i] = sumAt(parts, w + k * h);
    return Math.atan2(i, r);
  });
  const [r0, i0] = sumAt(parts, w);
  const p0 = Math.atan2(i0, r0);
  // unwrap around the centre
  const u = ph.map((p) => p0 + Math.atan2(Math.sin(p - p0), Math.cos(p - p0)));
  return -(u[0] - 8 * u[1] + 8 * u[2] - u[3]) / (12 * h);
}

function sumGroupDelaySamples(parts: Part[], w: number, fs: number): { tau: number; partsDb: number[] } {
  const om = Float64Array.of(w);
  const rs = parts.map((p) => cascadeWithGainDelay(p.sections, p.gain, p.delaySamples, om, fs));
  const s = sumResponses(rs, om, fs);
  return { tau: (s.groupDelayMs[0] * fs) / 1000, partsDb: rs.map((r) => r.magnitudeDb[0]) };
}

describe('group delay of a sum with a tiny or a zero output', () => {
  const FS = 48000;

  it('an output below the -200 dB floor still adds its derivative to the sum', () => {
    // Two high-passed outputs, 60 dB down, at 100 Hz: a is about -250 dB (its own group delay is
    // null), b about -164 dB; their delays differ, so a's derivative moves the sum's group delay.
    const a: Part = { sections: designEdge({ family: 'butterworth', order: 5, frequency: 8000 }, 'highPass', FS), gain: 1e-3, delaySamples: 480 };
    const b: Part = { sections: designEdge({ family: 'butterworth', order: 4, frequency: 2000 }, 'highPass', FS), gain: 1e-3, delaySamples: 0 };
    for (const f of [100, 150, 220]) {
      const w = (2 * Math.PI * f) / FS;
      const { tau, partsDb } = sumGroupDelaySamples([a, b], w, FS);
      expect(partsDb[0], `output a at ${f} Hz is below the floor`).toBeLessThan(-200);
      const ref = numericGroupDelay([a, b], w, 1e-5);
      expect(Math.abs(tau - ref) / Math.abs(ref), `at ${f} Hz: ${tau} vs ${ref}`).toBeLessThan(1e-5);
    }
  });

  it('an output at an exact zero (a first-order high-pass at 0 Hz) still adds its derivative', () => {
    // The first-order high-pass b0 (1 - z^-1) / (1 + a1 z^-1) is exactly 0 at w = 0 (b0 + b1 = 0
    // in doubles), but its derivative there is not: the sum's group delay must include it.
    const fs = 96000;
    const zeroAtDc: Part = {
      sections: designBand({ id: 'h', type: 'highPass1', frequency: 300, enabled: true }, fs),
      gain: 0.8,
      delaySamples: 30,
    };
    const other: Part = { sections: designEdge({ family: 'linkwitz-riley', order: 4, frequency: 500 }, 'lowPass', fs), gain: 1, delaySamples: 0 };
    const w = 0;
    const { tau, partsDb } = sumGroupDelaySamples([zeroAtDc, other], w, fs);
    expect(partsDb[0]).toBe(-Infinity); // the case this test is about
    const ref = numericGroupDelay([zeroAtDc, other], w, 1e-6);
    expect(Math.abs(tau - ref) / Math.abs(ref), `${tau} vs ${ref}`).toBeLessThan(1e-5);
  });
});
