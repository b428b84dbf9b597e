/**
 * Handbook tables and facts of the trade, checked on the analog prototypes and on digital edges.
 * Each check names its source; "derived" means the expected value is worked out in the comment.
 */
import { describe, expect, it } from 'vitest';
import { designEdge } from '../../src/design/crossover';
import { besselPoles, butterworthPoles, poleQ, prototypePoles, reverseBesselCoefficients, type Pole } from '../../src/design/prototypes';
import type { Section } from '../../src/design/section';
import { cascadeWithGainDelay, sumResponses } from '../../src/response/chain-response';
import { normalizedOmega } from '../../src/response/kernel';
import type { BesselNormalization, Crossover } from '../../src/plan/types';
import { kernelAt, loadFixture, RAD2DEG, angleDiffDeg } from '../helpers/reference';

const NORMS: BesselNormalization[] = ['phase', 'delay', 'magnitude'];
const byQ = (ps: Pole[]) => [...ps].sort((a, b) => poleQ(a) - poleQ(b));

describe('Butterworth section Q (references.md: Q_k = 1 / (2 sin((2k-1) pi / 2N)))', () => {
  for (let n = 1; n <= 8; n++) {
    it(`order ${n}: pole Q equals the formula`, () => {
      const qs = byQ(butterworthPoles(n)).map(poleQ);
      const expected: number[] = [];
      for (let k = 1; k <= Math.floor(n / 2); k++) expected.push(1 / (2 * Math.sin(((2 * k - 1) * Math.PI) / (2 * n))));
      if (n % 2 === 1) expected.push(0.5); // the real pole of an odd order
      expected.sort((a, b) => a - b);
      expect(qs.length).toBe(expected.length);
      qs.forEach((q, i) => expect(Math.abs(q - expected[i])).toBeLessThan(1e-13));
    });
  }
  it('published 4-decimal table: N=4 0.5412, 1.3066; N=8 0.5098, 0.6013, 0.9000, 2.5629', () => {
    // Tolerance 5e-5: the table is rounded to 4 decimals.
    const q4 = byQ(butterworthPoles(4)).map(poleQ);
    const q8 = byQ(butterworthPoles(8)).map(poleQ);
    [0.5412, 1.3066].forEach((q, i) => expect(Math.abs(q4[i] - q)).toBeLessThan(5e-5));
    [0.5098, 0.6013, 0.9, 2.5629].forEach((q, i) => expect(Math.abs(q8[i] - q)).toBeLessThan(5e-5));
  });
  it('all poles on the unit circle (|p| = 1: every section at f/fc = 1)', () => {
    for (let n = 1; n <= 8; n++) for (const p of butterworthPoles(n)) expect(Math.abs(Math.hypot(p.re, p.im) - 1)).toBeLessThan(1e-15);
  });
});

interface ProtoCase {
  family: 'butterworth' | 'bessel';
  order: number;
  normalization?: BesselNormalization;
  poles: [number, number][];
  q: number[];
  scipyPoles?: [number, number][];
  scipyCall?: string;
}

describe('prototype poles = 50-digit roots (prototypes.json, mpmath) and scipy.signal.besselap', () => {
  const fx = loadFixture<ProtoCase>('prototypes.json');
  for (const c of fx.cases) {
    const name = `${c.family} ${c.order}${c.normalization ? ` ${c.normalization}` : ''}`;
    it(name, () => {
      const ours = c.family === 'butterworth' ? byQ(butterworthPoles(c.order)) : besselPoles(c.order, c.normalization!);
      expect(ours.length).toBe(c.poles.length);
      // 50-digit references rounded once to double. Butterworth poles are closed-form: 4e-15
      // relative. Bessel poles are roots of theta_N found in double (Aberth-Ehrlich, Newton polish
      // on the polynomial): the roots of theta_7 and theta_8 (coefficients up to 2027025) are
      // ill-conditioned at ~100 ulps (measured worst 2.4e-14 relative, order 8): 6e-14.
      const rel = c.family === 'butterworth' ? 4e-15 : 6e-14;
      ours.forEach((p, i) => {
        const [re, im] = c.poles[i];
        const scale = Math.hypot(re, im);
        expect(Math.abs(p.re - re), `${name} pole ${i} re`).toBeLessThan(rel * scale);
        expect(Math.abs(p.im - im), `${name} pole ${i} im`).toBeLessThan(rel * scale);
        expect(Math.abs(poleQ(p) - c.q[i])).toBeLessThan(4 * rel * c.q[i]);
      });
      if (c.scipyPoles) {
        // scipy.signal.besselap works in double too: agreement to 1e-13 relative.
        ours.forEach((p, i) => {
          const [re, im] = c.scipyPoles![i];
          expect(Math.hypot(p.re - re, p.im - Math.abs(im))).toBeLessThan(1e-13 * Math.hypot(re, im));
        });
      }
    });
  }
});

describe('Bessel (C. R. Bond, "Bessel Filter Constants"; scipy.signal.besselap)', () => {
  it('reverse Bessel polynomial coefficients (derived: a_k = (2N-k)! / (2^(N-k) k! (N-k)!))', () => {
    expect(reverseBesselCoefficients(1)).toEqual([1, 1]);
    expect(reverseBesselCoefficients(2)).toEqual([3, 3, 1]);
    expect(reverseBesselCoefficients(3)).toEqual([15, 15, 6, 1]);
    expect(reverseBesselCoefficients(4)).toEqual([105, 105, 45, 10, 1]);
    // a_0 = (2N)! / (2^N N!) = (2N-1)!!: 8 -> 15!! = 2027025; a_1 = a_0 (always).
    const c8 = reverseBesselCoefficients(8);
    expect(c8[0]).toBe(2027025);
    expect(c8[1]).toBe(2027025);
    expect(c8[8]).toBe(1);
  });

  it('order-4 section Q 0.5219, 0.8055 under every normalization (references.md; 4-decimal table)', () => {
    for (const norm of NORMS) {
      const qs = besselPoles(4, norm).map(poleQ);
      expect(Math.abs(qs[0] - 0.5219)).toBeLessThan(5e-5);
      expect(Math.abs(qs[1] - 0.8055)).toBeLessThan(5e-5);
    }
  });

  it('section Q is the same under every normalization, orders 1-8 (references.md)', () => {
    for (let n = 1; n <= 8; n++) {
      const ref = besselPoles(n, 'delay').map(poleQ);
      for (const norm of NORMS) besselPoles(n, norm).map(poleQ).forEach((q, i) => expect(Math.abs(q - ref[i])).toBeLessThan(1e-13));
    }
  });

  it('order-2 frequency factors in closed form (derived)', () => {
    // theta_2 = s^2 + 3 s + 3: delay-normalized |p| = sqrt(3), Q = 1/sqrt(3).
    // Half power: (3 - w^2)^2 + 9 w^2 = 18 -> w^2 = (sqrt(45) - 3) / 2, so the magnitude-normalized
    // |p| = sqrt(3) / sqrt((sqrt(45) - 3) / 2) = 1.27202...; phase-normalized |p| = sqrt(3) / 3^(1/2) = 1.
    const w3 = Math.sqrt((Math.sqrt(45) - 3) / 2);
    const mag = (norm: BesselNormalization) => besselPoles(2, norm).map((p) => Math.hypot(p.re, p.im))[0];
    expect(mag('delay')).toBeCloseTo(Math.sqrt(3), 14);
    expect(mag('phase')).toBeCloseTo(1, 14);
    expect(mag('magnitude')).toBeCloseTo(Math.sqrt(3) / w3, 14);
    expect(poleQ(besselPoles(2, 'delay')[0])).toBeCloseTo(1 / Math.sqrt(3), 14);
  });

  it('"phase" keeps the Butterworth high-frequency asymptote: product of |p| = 1 (scipy.signal.besselap norm="phase")', () => {
    // H(s) = prod(-p) / prod(s - p) ~ prod|p| / s^N for large s; Butterworth poles have |p| = 1.
    for (let n = 1; n <= 8; n++) {
      let prod = 1;
      for (const p of besselPoles(n, 'phase')) prod *= p.im === 0 ? -p.re : p.re * p.re + p.im * p.im;
      expect(Math.abs(prod - 1)).toBeLessThan(1e-13);
    }
  });

  it('"delay": analog group delay at DC is 1 s at 1 rad/s (derived: tau(0) = sum over poles of -1/p)', () => {
    for (let n = 1; n <= 8; n++) {
      let tau = 0;
      for (const p of besselPoles(n, 'delay')) {
        const r2 = p.re * p.re + p.im * p.im;
        tau += p.im === 0 ? -1 / p.re : (-2 * p.re) / r2; // the pair's -1/p - 1/p*
      }
      expect(Math.abs(tau - 1)).toBeLessThan(1e-13);
    }
  });
});

// ---- digital edges --------------------------------------------------------------------------

const respond = (sections: Section[], freqs: number[], fs: number, gain = 1) =>
  cascadeWithGainDelay(sections, gain, 0, normalizedOmega(freqs, fs), fs);
const edge = (family: Crossover['family'], order: number, frequency: number, normalization?: BesselNormalization): Crossover => ({
  family,
  order,
  frequency,
  normalization,
});
const RATES = [44100, 48000, 96000, 192000];
const FCS = [80, 1000, 2200, 12000];
const LOG_FREQS = Array.from({ length: 60 }, (_, i) => 10 * Math.pow(2000, i / 59)); // 10 Hz .. 20 kHz

/** The complex sum of a low-pass and a high-pass edge (the high-pass optionally inverted). */
function crossoverSum(e: Crossover, fs: number, freqs: number[], invertHigh: boolean) {
  const omega = normalizedOmega(freqs, fs);
  const lo = cascadeWithGainDelay(designEdge(e, 'lowPass', fs), 1, 0, omega, fs);
  const hi = cascadeWithGainDelay(designEdge(e, 'highPass', fs), invertHigh ? -1 : 1, 0, omega, fs);
  return { lo, hi, sum: sumResponses([lo, hi], omega, fs) };
}

describe('Linkwitz-Riley facts (Linkwitz, JAES 1976, from memory; Lipshitz and Vanderkooy, JAES 34(11), 1986)', () => {
  const SIX = 20 * Math.log10(0.5); // -6.0206 dB: each output is a Butterworth (-3.01 dB) squared
  for (const fs of RATES) {
    for (const fc of FCS) {
      if (fc >= 0.45 * fs) continue;
      for (const order of [2, 4, 6, 8]) {
        it(`LR${order} at ${fc} Hz, ${fs} Hz: each output -6.02 dB at fc`, () => {
          // Exact at fc by pre-warping (the bilinear map sends fc to the prototype's 1 rad/s):
          // only rounding separates it from 20 log10(1/2): 1e-9 dB.
          const e = edge('linkwitz-riley', order, fc);
          for (const kind of ['lowPass', 'highPass'] as const) {
            expect(Math.abs(respond(designEdge(e, kind, fs), [fc], fs).magnitudeDb[0] - SIX)).toBeLessThan(1e-9);
          }
        });
      }
      for (const order of [4, 8]) {
        it(`LR${order} at ${fc} Hz, ${fs} Hz: plain sum is an all-pass (0 dB everywhere), outputs in phase`, () => {
          const freqs = LOG_FREQS.filter((f) => f < 0.49 * fs);
          const { lo, hi, sum } = crossoverSum(edge('linkwitz-riley', order, fc), fs, freqs, false);
          // LP + HP = Butterworth all-pass exactly (Lipshitz and Vanderkooy); rounding only: 1e-9 dB.
          freqs.forEach((f, i) => {
            expect(Math.abs(sum.magnitudeDb[i]), `sum at ${f} Hz`).toBeLessThan(1e-9);
            // In phase: the two outputs have the same phase wherever both are above -150 dB.
            if (lo.magnitudeDb[i] > -150 && hi.magnitudeDb[i] > -150) {
              expect(angleDiffDeg(lo.phaseRad[i] * RAD2DEG, hi.phaseRad[i] * RAD2DEG), `phase at ${f} Hz`).toBeLessThan(1e-6);
            }
          });
        });
      }
      for (const order of [2, 6]) {
        it(`LR${order} at ${fc} Hz, ${fs} Hz: plain sum nulls at fc; with one output inverted it is flat`, () => {
          const freqs = LOG_FREQS.filter((f) => f < 0.49 * fs);
          const plain = crossoverSum(edge('linkwitz-riley', order, fc), fs, [fc], false);
          // Outputs 180 degrees apart with equal magnitude: the plain sum cancels (rounding leaves < -100 dB).
          expect(plain.sum.magnitudeDb[0]).toBeLessThan(-100);
          const { sum } = crossoverSum(edge('linkwitz-riley', order, fc), fs, freqs, true);
          freqs.forEach((f, i) => expect(Math.abs(sum.magnitudeDb[i]), `inverted sum at ${f} Hz`).toBeLessThan(1e-9));
        });
      }
    }
  }
});

describe('Butterworth crossover facts (references.md, "Crossover alignments")', () => {
  const THREE = 10 * Math.log10(2); // +3.0103 dB
  for (const fs of [48000, 96000]) {
    for (const fc of [100, 2200]) {
      it(`BW2 (high inverted) at ${fc} Hz / ${fs} Hz: +3.01 dB at fc`, () => {
        // Derived: LP2 = 0.707 at -90 deg, HP2 = 0.707 at +90 deg; LP - HP = 1.414: +3.01 dB.
        expect(Math.abs(crossoverSum(edge('butterworth', 2, fc), fs, [fc], true).sum.magnitudeDb[0] - THREE)).toBeLessThan(1e-9);
      });
      it(`BW4 at ${fc} Hz / ${fs} Hz: +3.01 dB at fc`, () => {
        expect(Math.abs(crossoverSum(edge('butterworth', 4, fc), fs, [fc], false).sum.magnitudeDb[0] - THREE)).toBeLessThan(1e-9);
      });
      for (const order of [1, 3]) {
        for (const inv of [false, true]) {
          it(`BW${order} at ${fc} Hz / ${fs} Hz${inv ? ', high inverted' : ''}: sum flat (all-pass)`, () => {
            // Derived for BW1: 1/(1+s) + s/(1+s) = 1 (inverted: (1-s)/(1+s), an all-pass);
            // BW3: the outputs are in quadrature, the sum is an all-pass of either polarity.
            const freqs = LOG_FREQS.filter((f) => f < 0.49 * fs);
            const { sum } = crossoverSum(edge('butterworth', order, fc), fs, freqs, inv);
            freqs.forEach((f, i) => expect(Math.abs(sum.magnitudeDb[i]), `at ${f} Hz`).toBeLessThan(1e-9));
          });
        }
      }
    }
  }
  it('each Butterworth output is -3.01 dB at fc, orders 1-8', () => {
    for (let n = 1; n <= 8; n++) {
      for (const kind of ['lowPass', 'highPass'] as const) {
        const r = respond(designEdge(edge('butterworth', n, 1000), kind, 48000), [1000], 48000);
        expect(Math.abs(r.magnitudeDb[0] + THREE)).toBeLessThan(1e-9);
      }
    }
  });
});

describe('Bessel normalizations on digital edges (plan-format.md, "Meaning of frequency")', () => {
  for (const fs of RATES) {
    for (let n = 1; n <= 8; n++) {
      it(`order ${n} at ${fs} Hz, "magnitude": -3.01 dB at fc (low and high)`, () => {
        for (const kind of ['lowPass', 'highPass'] as const) {
          const r = respond(designEdge(edge('bessel', n, 1000, 'magnitude'), kind, fs), [1000], fs);
          expect(Math.abs(r.magnitudeDb[0] + 10 * Math.log10(2))).toBeLessThan(1e-9);
        }
      });
      it(`order ${n} at ${fs} Hz, "delay": low-frequency group delay = 1 / (2 pi fc)`, () => {
        const fc = 100;
        const k = kernelAt(designEdge(edge('bessel', n, fc, 'delay'), 'lowPass', fs), [0], fs);
        const tauS = k.groupDelaySamples[0] / fs;
        // Exact for the digital design (derived): the pre-warped bilinear map has
        // dOmega/dw = 1 / (2 tan(pi fc / fs)) at DC, so tau(0) = 1 / (2 fs tan(pi fc / fs)) s.
        const exact = 1 / (2 * fs * Math.tan((Math.PI * fc) / fs));
        expect(Math.abs(tauS - exact)).toBeLessThan(1e-10 * exact);
        // Against the analog 1 / (2 pi fc): they differ by the factor x / tan(x), x = pi fc / fs,
        // i.e. about x^2 / 3 relative (1.4e-5 at 100 Hz / 48 kHz): the tolerance is that, +1%.
        const analog = 1 / (2 * Math.PI * fc);
        const x = (Math.PI * fc) / fs;
        expect(Math.abs(tauS - analog) / analog).toBeLessThan(1.01 * (x * x) / 3 + 1e-12);
      });
    }
  }
  it('"phase": the high-frequency asymptote matches the Butterworth of the same order (digital, Omega ~ 1000)', () => {
    // At f = 20 kHz for a 20 Hz edge at 192 kHz, Omega = tan(pi f/fs)/tan(pi fc/fs) ~ 1000; both
    // magnitudes are prod|p| / Omega^N (1 + O(1/Omega^2)): they agree to ~1e-4 dB. Tolerance 1e-3 dB.
    for (let n = 1; n <= 8; n++) {
      const b = respond(designEdge(edge('bessel', n, 20, 'phase'), 'lowPass', 192000), [20000], 192000).magnitudeDb[0];
      const w = respond(designEdge(edge('butterworth', n, 20), 'lowPass', 192000), [20000], 192000).magnitudeDb[0];
      expect(Math.abs(b - w)).toBeLessThan(1e-3);
    }
  });
  it('"phase": -45 N degrees at fc holds for N = 1 and 2 only (references.md)', () => {
    for (const n of [1, 2]) {
      const r = respond(designEdge(edge('bessel', n, 1000, 'phase'), 'lowPass', 48000), [1000], 48000);
      expect(angleDiffDeg(r.phaseRad[0] * RAD2DEG, -45 * n)).toBeLessThan(1e-9);
    }
    for (const n of [3, 4]) {
      const r = respond(designEdge(edge('bessel', n, 1000, 'phase'), 'lowPass', 48000), [1000], 48000);
      expect(angleDiffDeg(r.phaseRad[0] * RAD2DEG, -45 * n)).toBeGreaterThan(0.1);
    }
  });
});

describe('prototypePoles', () => {
  it('Butterworth returns ceil(N/2) poles, real pole first for odd N (cascade order by Q)', () => {
    for (let n = 1; n <= 8; n++) {
      const ps = prototypePoles('butterworth', n);
      expect(ps.length).toBe(Math.ceil(n / 2));
      for (let i = 1; i < ps.length; i++) expect(poleQ(ps[i])).toBeGreaterThanOrEqual(poleQ(ps[i - 1]));
      if (n % 2 === 1) expect(ps[0].im).toBe(0);
    }
  });
});
