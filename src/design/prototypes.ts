/**
 * Analog low-pass prototypes with their -3 dB / reference frequency at 1 rad/s, as poles.
 * Poles are computed, not pasted: the published tables (Butterworth section Q, Bessel Q and
 * frequency factors) are what the tests check against.
 */
import { Complex } from 'complex.js';
import type { BesselNormalization } from '../plan/types';

/** One pole of the upper half plane (im >= 0); a conjugate is implied when im > 0. */
export interface Pole {
  re: number;
  im: number;
}

/**
 * Butterworth poles of order N on the unit circle: p_k = exp(j pi (2k + N - 1) / (2N)), k = 1..N
 * (any filter handbook). Returned as the upper-half-plane poles and the real one for odd N.
 */
export function butterworthPoles(order: number): Pole[] {
  const poles: Pole[] = [];
  for (let k = 1; k <= order; k++) {
    const theta = (Math.PI * (2 * k + order - 1)) / (2 * order);
    const re = Math.cos(theta);
    const im = Math.sin(theta);
    if (im > 1e-12) poles.push({ re, im });
    else if (Math.abs(im) <= 1e-12) poles.push({ re, im: 0 });
  }
  return poles;
}

/**
 * Coefficients a_0..a_N of the reverse Bessel polynomial theta_N(s) = sum a_k s^k with
 * a_k = (2N - k)! / (2^(N-k) k! (N - k)!) (C. R. Bond, "Bessel Filter Constants"). Exact in a
 * double up to N = 8 (a_0 = 2027025).
 */
export function reverseBesselCoefficients(order: number): number[] {
  const fact = (n: number): number => (n <= 1 ? 1 : n * fact(n - 1));
  const a: number[] = [];
  for (let k = 0; k <= order; k++) {
    a.push(fact(2 * order - k) / (Math.pow(2, order - k) * fact(k) * fact(order - k)));
  }
  return a;
}

/** All roots of a real polynomial sum c_k s^k (c_N != 0) by the Aberth-Ehrlich iteration, then Newton polish. */
export function polynomialRoots(c: readonly number[]): Complex[] {
  const n = c.length - 1;
  const lead = c[n];
  const monic = c.map((x) => x / lead);
  const evalP = (z: Complex): { p: Complex; dp: Complex } => {
    let p = new Complex(1, 0);
    let dp = new Complex(0, 0);
    for (let k = n - 1; k >= 0; k--) {
      dp = dp.mul(z).add(p);
      p = p.mul(z).add(monic[k]);
    }
    return { p, dp };
  };
  // Start on a circle of the roots' geometric-mean radius, off the real axis to break symmetry.
  const radius = Math.pow(Math.abs(monic[0]), 1 / n) || 1;
  let z: Complex[] = [];
  for (let k = 0; k < n; k++) z.push(new Complex({ abs: radius, arg: (2 * Math.PI * k) / n + 0.4 }));
  for (let iter = 0; iter < 500; iter++) {
    let moved = 0;
    const next = z.map((zk, k) => {
      const { p, dp } = evalP(zk);
      if (p.abs() === 0) return zk;
      const ratio = p.div(dp);
      let sum = new Complex(0, 0);
      for (let j = 0; j < n; j++) if (j !== k) sum = sum.add(new Complex(1, 0).div(zk.sub(z[j])));
      const w = ratio.div(new Complex(1, 0).sub(ratio.mul(sum)));
      moved = Math.max(moved, w.abs() / Math.max(1, zk.abs()));
      return zk.sub(w);
    });
    z = next;
    if (moved < 1e-15) break;
  }
  // Newton polish on the full polynomial.
  return z.map((zk) => {
    let r = zk;
    for (let i = 0; i < 3; i++) {
      const { p, dp } = evalP(r);
      if (dp.abs() === 0) break;
      r = r.sub(p.div(dp));
    }
    return r;
  });
}

/** Keeps the upper-half-plane member of each conjugate pair and the real roots. */
function upperHalf(roots: Complex[]): Pole[] {
  const poles: Pole[] = [];
  for (const r of roots) {
    const tol = 1e-9 * Math.max(1, r.abs());
    if (Math.abs(r.im) <= tol) poles.push({ re: r.re, im: 0 });
    else if (r.im > 0) poles.push({ re: r.re, im: r.im });
  }
  // Real pole first, then by increasing Q (|p| / (-2 re p)), the usual cascade order.
  return poles.sort((a, b) => poleQ(a) - poleQ(b));
}

/** The Q of a pole pair: |p| / (2 |re p|); 0.5 for a real pole. */
export function poleQ(p: Pole): number {
  return Math.hypot(p.re, p.im) / (-2 * p.re);
}

/** |H(j w)|^2 of the all-pole low-pass with unit DC gain. */
function allPoleMagnitudeSquared(poles: Pole[], w: number): number {
  let m = 1;
  for (const p of poles) {
    const r2 = p.re * p.re + p.im * p.im;
    if (p.im === 0) m *= r2 / (p.re * p.re + w * w);
    else {
      // (j w - p)(j w - p*) for the pair.
      const d1 = p.re * p.re + (w - p.im) * (w - p.im);
      const d2 = p.re * p.re + (w + p.im) * (w + p.im);
      m *= (r2 * r2) / (d1 * d2);
    }
  }
  return m;
}

/** The frequency (rad/s) where an all-pole low-pass falls to half power, by bisection to full precision. */
export function halfPowerFrequency(poles: Pole[]): number {
  let lo = 0;
  let hi = 1;
  while (allPoleMagnitudeSquared(poles, hi) > 0.5) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-15 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (allPoleMagnitudeSquared(poles, mid) > 0.5) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Bessel (Thomson) low-pass poles of order N under a normalization, as scipy.signal.besselap
 * defines them:
 * - "delay": roots of theta_N; group delay at DC is 1 s at 1 rad/s.
 * - "phase": the roots divided by a_0^(1/N), so the high-frequency asymptote is the Butterworth's.
 * - "magnitude": scaled so |H| = -3.01 dB at 1 rad/s.
 * Section Q is the same under every normalization; only the frequencies scale.
 */
export function besselPoles(order: number, normalization: BesselNormalization): Pole[] {
  const a = reverseBesselCoefficients(order);
  const roots = upperHalf(polynomialRoots(a));
  let scale = 1;
  if (normalization === 'phase') scale = Math.pow(a[0], -1 / order);
  else if (normalization === 'magnitude') scale = 1 / halfPowerFrequency(roots);
  return roots.map((p) => ({ re: p.re * scale, im: p.im * scale }));
}

/** Prototype poles of a family and order (Linkwitz-Riley is handled as a squared Butterworth by the caller). */
export function prototypePoles(family: 'butterworth' | 'bessel', order: number, normalization: BesselNormalization = 'phase'): Pole[] {
  if (family === 'butterworth') return butterworthPoles(order).sort((x, y) => poleQ(x) - poleQ(y));
  return besselPoles(order, normalization);
}
