/**
 * The response kernel: a cascade of sections evaluated on the unit circle, z = e^{jw}, as complex
 * numbers in arrays the caller owns.
 *
 * Output per point (`ComplexResponse`): H = (re + j im) 2^log2Scale, the group delay
 * tau = -d(arg H)/dw in samples and the slope of the log magnitude d ln|H| / dw. Both derivatives
 * are exact (no finite differences, J. O. Smith, "Numerical Computation of Group Delay"): the slope
 * is what the sum of outputs needs for its own exact group delay. dB, phase and unwrapping are a
 * presentation step on top (`presentMagnitudePhase`, and chain-response.ts).
 *
 * Per section, with t the frequency moved next to z = 1 (see "Accurate evaluation" below),
 * N(e^{jt}) = e^{-jt} F(t) with F(t) = b1 + b0 e^{jt} + b2 e^{-jt}, real and imaginary parts
 *
 *     F  = (b0 + b1 + b2) - (b0 + b2) u  +  j (b0 - b2) sin t          (u = 1 - cos t)
 *     F' = dF/dt = -(b0 + b2) sin t  +  j (b0 - b2) cos t
 *
 * and D(e^{jt}) = e^{-jt} G(t) likewise with (1, a1, a2). The factors e^{-jt} cancel in N / D, so
 * H = prod F_k / prod G_k. The kernel carries the two products and their derivatives as dual
 * numbers, P <- P F, P' <- P' F + P F' (the product rule: no division per section), taking the
 * factors two at a time (see "Pairs of sections" below), and at the end of each point divides once:
 *
 *     H = PF / PG,   d ln H / dt = PF'/PF - PG'/PG,   tau = -Im d ln H/dt,  slope = Re d ln H/dt.
 *
 * The products are rescaled by exact powers of two when they leave [1e-50, 1e50] in magnitude
 * (checked every 4 sections), so deep stop bands of long cascades neither underflow nor overflow;
 * the count of rescalings becomes `log2Scale`, which is 0 unless |H| is beyond 1e-150 .. 1e150
 * (-3000 .. 3000 dB).
 *
 * `cascadeComplex` runs the section loop in WebAssembly SIMD (kernel.wat, two points per
 * instruction) where the host allows it, and in plain JavaScript (`cascadeComplexJs`) otherwise,
 * for instance under a Content-Security-Policy without 'wasm-unsafe-eval'. Both evaluate the same
 * expressions in the same order in IEEE double arithmetic, so their results are bit for bit equal
 * (the tests hold them to that).
 */
import { SECTION_STRIDE } from '../design/section';
import { KERNEL_WASM_HEX } from './kernel-wasm-bytes';

/**
 * A complex response in caller-owned arrays, one value per point. Not the DOM's `Response`.
 * H = (re + j im) 2^log2Scale; log2Scale is 0 wherever |H| is inside 1e-150 .. 1e150, so most
 * callers can read re and im as they are (`complexScaleFactor` folds the rest).
 */
export interface ComplexResponse {
  re: Float64Array;
  im: Float64Array;
  /** Power of two the (re, im) pair is to be multiplied by; an integer, usually 0. */
  log2Scale: Float64Array;
  /** -d(arg H)/dw in samples; NaN where H is exactly 0 (it is undefined there). */
  groupDelaySamples: Float64Array;
  /** d ln|H| / dw, per radian per sample; NaN where H is exactly 0. */
  logSlope: Float64Array;
}

export function allocateComplexResponse(points: number): ComplexResponse {
  return {
    re: new Float64Array(points),
    im: new Float64Array(points),
    log2Scale: new Float64Array(points),
    groupDelaySamples: new Float64Array(points),
    logSlope: new Float64Array(points),
  };
}

/** Magnitude and phase of a cascade alone (the presentation of a `ComplexResponse`). */
export interface KernelOutput {
  /** 20 log10 |H|; -Infinity at an exact zero. */
  magnitudeDb: Float64Array;
  /** arg H in radians, in [-pi, pi]. */
  phaseRad: Float64Array;
  /** Group delay in samples. */
  groupDelaySamples: Float64Array;
  /** d ln|H| / dw, per radian per sample. */
  logSlope: Float64Array;
}

export function allocateKernelOutput(points: number): KernelOutput {
  return {
    magnitudeDb: new Float64Array(points),
    phaseRad: new Float64Array(points),
    groupDelaySamples: new Float64Array(points),
    logSlope: new Float64Array(points),
  };
}

const DB_PER_NEPER_SQUARED = 10 / Math.LN10; // 10 log10(x) = DB_PER_NEPER_SQUARED * ln(x)
/** dB per unit of log2Scale: 20 log10(2). */
export const DB_PER_LOG2 = 20 * Math.log10(2);

/** 2^log2Scale (Infinity or 0 where that leaves the double range). */
export function complexScaleFactor(log2Scale: number): number {
  return log2Scale === 0 ? 1 : Math.pow(2, log2Scale);
}

/**
 * 20 log10 |H| and arg H of points [from, to) of `c`: the one place where the complex core turns
 * into decibels and radians. Writes into the caller's arrays.
 */
export function presentMagnitudePhase(c: ComplexResponse, magnitudeDb: Float64Array, phaseRad: Float64Array, from = 0, to = c.re.length): void {
  const { re, im, log2Scale } = c;
  for (let i = from; i < to; i++) {
    const r = re[i];
    const m = im[i];
    magnitudeDb[i] = DB_PER_NEPER_SQUARED * Math.log(r * r + m * m) + DB_PER_LOG2 * log2Scale[i];
    phaseRad[i] = Math.atan2(m, r);
  }
}

/**
 * Evaluates `sectionCount` packed sections ([b0, b1, b2, a1, a2] each) at the normalized angular
 * frequencies `omega` (radians per sample, w = 2 pi f / fs) and writes H, its group delay and its
 * log-magnitude slope into `out` (arrays of at least omega.length). Allocates nothing once its
 * scratch has grown to the largest size asked for.
 */
export function cascadeComplex(packed: Float64Array, sectionCount: number, omega: Float64Array, out: ComplexResponse): void {
  // Below a few dozen points the copy in and out of WebAssembly memory costs more than it saves.
  const wasm = omega.length >= WASM_MIN_POINTS ? wasmKernel() : null;
  if (wasm) cascadeComplexWasm(wasm, packed, sectionCount, omega, out);
  else cascadeComplexJs(packed, sectionCount, omega, out);
}

let presentScratch = allocateComplexResponse(0);
function scratchFor(points: number): ComplexResponse {
  if (presentScratch.re.length < points) presentScratch = allocateComplexResponse(points);
  return presentScratch;
}

/** `cascadeComplex`, presented as dB and phase (group delay and slope as they are). */
export function cascadeResponse(packed: Float64Array, sectionCount: number, omega: Float64Array, out: KernelOutput): void {
  const c = scratchFor(omega.length);
  cascadeComplex(packed, sectionCount, omega, c);
  copyPresented(c, omega.length, out);
}

/** The same through the JavaScript kernel only (tests compare the two paths). */
export function cascadeResponseJs(packed: Float64Array, sectionCount: number, omega: Float64Array, out: KernelOutput): void {
  const c = scratchFor(omega.length);
  cascadeComplexJs(packed, sectionCount, omega, c);
  copyPresented(c, omega.length, out);
}

function copyPresented(c: ComplexResponse, n: number, out: KernelOutput): void {
  presentMagnitudePhase(c, out.magnitudeDb, out.phaseRad, 0, n);
  out.groupDelaySamples.set(c.groupDelaySamples.subarray(0, n));
  out.logSlope.set(c.logSlope.subarray(0, n));
}

/**
 * Accurate evaluation near z = 1 and z = -1. Written as powers of cos and sin, N(e^{jw}) cancels
 * near a zero close to z = 1 (a high-pass at low frequency, a notch) or z = -1 (a low-pass near
 * Nyquist), and the rounding of cos w (1e-16) becomes a large relative error there. So each section
 * is evaluated around the nearer of the two points, with t = w (|w| <= pi/2) or t = w -/+ pi
 * (the section with b1 and a1 negated: H(e^{jw}) = H~(e^{jt}) exactly), and the small quantity
 * u = 1 - cos t = 2 sin^2(t/2) computed directly. In F above only b0 + b1 + b2 depends on the side;
 * it is summed with error-free transformations, so F(0) is exact to rounding when the coefficients
 * put a zero at z = 1.
 * Per factor and side (the "+" set for |w| <= pi/2, the "-" set with b1, a1 negated):
 * S = b0 + b1 + b2, C = b0 + b2, D = b0 - b2 (and 1 + a1 + a2, 1 + a2, 1 - a2).
 *
 * Pairs of sections. The loop takes two numerator factors (and two denominator factors) at a
 * time: with s^2 = sin^2 t = u (2 - u), the product of F1 = S1 - C1 u + j D1 s and F2 is
 *
 *     F1 F2 = A0 + A1 u + A2 u^2  +  j s (B0 + B1 u),
 *     A0 = S1 S2,  A1 = -(S1 C2 + C1 S2 + 2 D1 D2),  A2 = C1 C2 + D1 D2,
 *     B0 = S1 D2 + S2 D1,  B1 = -(C1 D2 + C2 D1),
 *
 * and its derivative (du/dt = sin t, d sin t/dt = cos t) s (A1 + 2 A2 u) + j (cos t B + B1 s^2):
 * seven multiplications per pair where the two factors apart take eight, and one dual product
 * update (twelve) instead of two. F(0) stays exact to rounding (A0 = S1 S2), and a factor with
 * D = 0 or S = 0 keeps its exact zeros in the pair. The pair's rounding is about kappa1 kappa2
 * ulps of |F1 F2| against kappa1 + kappa2 apart (kappa: the factor's condition number in this
 * form), so only calm factors are paired (`calmFactor`); an odd one out is paired with 1
 * (S = 1, C = D = 0).
 * Constants per pair and side, K_STRIDE numbers: A0 A1 A2 B0 B1 of the numerator pair, then of
 * the denominator pair.
 */
/** Numbers per pair in an expanded constant set: A0 A1 A2 B0 B1 of N, then of D. */
export const K_STRIDE = 10;
/** Per-point inputs: u = 1 - cos t, sin t, cos t, sin^2 t. */
const POINT_INPUTS = 4;
const HALF_PI = Math.PI / 2;
/** |P|^2 outside [RESCALE_LOW, RESCALE_HIGH] is rescaled by 2^-/+RESCALE_BITS (|P|^2 by 2^-/+(2 RESCALE_BITS) = 1e-/+100). */
const RESCALE_LOW = 1e-100;
const RESCALE_HIGH = 1e100;
const RESCALE_BITS = 166;
const RESCALE_UP = Math.pow(2, RESCALE_BITS);
const RESCALE_DOWN = Math.pow(2, -RESCALE_BITS);
/** |H| beyond 2^+/-FOLD_BITS (about 1e+/-150) keeps a nonzero log2Scale; inside it is folded into re, im. */
const FOLD_BITS = 498;

/** a + b + c with the rounding errors of both additions added back (TwoSum, Knuth). */
function sum3(a: number, b: number, c: number): number {
  const s = a + b;
  const bb = s - a;
  const e1 = a - (s - bb) + (b - bb);
  const t = s + c;
  const cc = t - s;
  const e2 = s - (t - cc) + (c - cc);
  return t + (e1 + e2);
}

/**
 * A factor (S, C, D) is paired only if its evaluation is well conditioned on the whole half
 * circle: kappa = (|S| + |C| u + |D| |sin t|) / |F| at most PAIR_KAPPA where |F| is smallest. The
 * pair's rounding error is about kappa1 kappa2 ulps against kappa1 + kappa2 for the two apart, so
 * two calm factors lose nothing that matters (at most 1024 ulps x |F1 F2|, below 3e-13), while a
 * zero or pole next to the unit circle (a notch, a high-Q band) keeps its own slot, paired with 1.
 */
const PAIR_KAPPA = 32;

function calmFactor(s: number, c: number, d: number): boolean {
  // |F|^2 = (S - C u)^2 + D^2 u (2 - u) on u = 1 - cos t in [0, 1], a quadratic in u, is smallest
  // at u = 1 or at its vertex; kappa is taken there (at u = 0 it is 1: F = S).
  const q2 = c * c - d * d;
  const q1 = 2 * (d * d - s * c);
  let kappa = (Math.abs(s) + Math.abs(c) + Math.abs(d)) / Math.sqrt((s - c) * (s - c) + d * d);
  if (q2 > 0) {
    const u = -q1 / (2 * q2);
    if (u > 0 && u < 1) {
      const sin = Math.sqrt(u * (2 - u));
      const r = s - c * u;
      const i = d * sin;
      kappa = Math.max(kappa, (Math.abs(s) + Math.abs(c) * u + Math.abs(d) * sin) / Math.sqrt(r * r + i * i));
    }
  }
  return kappa <= PAIR_KAPPA;
}

/** Factors of one side and chain: S C D each (scratch, grown as needed), and the pairing order. */
let factorScratch = new Float64Array(0);
let orderScratch = new Int32Array(0);

/**
 * Pairs one chain (numerators or denominators) of one side: writes `order` (3 x count long) as the
 * factor indices of pair m at 2m and 2m + 1 (-1 for the factor 1) and returns the number of pairs.
 * Calm factors are paired in their order, the others each with 1.
 */
function pairFactors(f: Float64Array, count: number, order: Int32Array): number {
  let m = 0;
  let open = -1;
  let sharp = 0;
  for (let k = 0; k < count; k++) {
    if (!calmFactor(f[3 * k], f[3 * k + 1], f[3 * k + 2])) {
      order[2 * count + sharp++] = k; // set aside after the pairs' room
    } else {
      if (open < 0) open = k;
      else {
        order[2 * m] = open;
        order[2 * m + 1] = k;
        m++;
        open = -1;
      }
    }
  }
  if (open >= 0) {
    order[2 * m] = open;
    order[2 * m + 1] = -1;
    m++;
  }
  for (let j = 0; j < sharp; j++) {
    order[2 * m] = order[2 * count + j];
    order[2 * m + 1] = -1;
    m++;
  }
  return m;
}

/**
 * Writes the pair coefficients of F1 F2 (see "Pairs of sections") for factors i and j of `f`
 * (j = -1: the factor 1; i = -1 too: the pair 1) at into[at], into[at + lanes], ... (each `lanes`
 * times).
 */
function writePair(into: Float64Array, at: number, lanes: number, f: Float64Array, i: number, j: number): void {
  const s1 = i < 0 ? 1 : f[3 * i];
  const c1 = i < 0 ? 0 : f[3 * i + 1];
  const d1 = i < 0 ? 0 : f[3 * i + 2];
  const s2 = j < 0 ? 1 : f[3 * j];
  const c2 = j < 0 ? 0 : f[3 * j + 1];
  const d2 = j < 0 ? 0 : f[3 * j + 2];
  const a0 = s1 * s2;
  const a1 = -(s1 * c2 + c1 * s2 + 2 * d1 * d2);
  const a2 = c1 * c2 + d1 * d2;
  const b0 = s1 * d2 + s2 * d1;
  const b1 = -(c1 * d2 + c2 * d1);
  for (let l = 0; l < lanes; l++) {
    into[at + l] = a0;
    into[at + lanes + l] = a1;
    into[at + 2 * lanes + l] = a2;
    into[at + 3 * lanes + l] = b0;
    into[at + 4 * lanes + l] = b1;
  }
}

/**
 * Expands packed sections into the kernel's two constant sets, "+" then "-", each with room for
 * `sectionCount` pairs of K_STRIDE numbers (a numerator pair, then a denominator pair), every
 * number written `lanes` times in a row. Returns the pair counts of the two sides in `pairs`.
 */
export function expandSections(packed: Float64Array, sectionCount: number, into: Float64Array, offset: number, lanes: number, pairs: Int32Array): void {
  const n = sectionCount;
  const setSize = n * K_STRIDE * lanes;
  if (factorScratch.length < 6 * n) factorScratch = new Float64Array(6 * n);
  if (orderScratch.length < 6 * n) orderScratch = new Int32Array(6 * n);
  const fN = factorScratch.subarray(0, 3 * n);
  const fD = factorScratch.subarray(3 * n, 6 * n);
  const oN = orderScratch.subarray(0, 3 * n);
  const oD = orderScratch.subarray(3 * n, 6 * n);
  for (let side = 0; side < 2; side++) {
    const sign = side === 0 ? 1 : -1;
    for (let k = 0; k < n; k++) {
      const o = k * SECTION_STRIDE;
      const b0 = packed[o];
      const b2 = packed[o + 2];
      const a2 = packed[o + 4];
      fN[3 * k] = sum3(b0, sign * packed[o + 1], b2);
      fN[3 * k + 1] = b0 + b2;
      fN[3 * k + 2] = b0 - b2;
      fD[3 * k] = sum3(1, sign * packed[o + 3], a2);
      fD[3 * k + 1] = 1 + a2;
      fD[3 * k + 2] = 1 - a2;
    }
    const mN = pairFactors(fN, n, oN);
    const mD = pairFactors(fD, n, oD);
    const m = Math.max(mN, mD);
    for (let p = 0; p < m; p++) {
      const base = offset + side * setSize + p * K_STRIDE * lanes;
      writePair(into, base, lanes, fN, p < mN ? oN[2 * p] : -1, p < mN ? oN[2 * p + 1] : -1);
      writePair(into, base + 5 * lanes, lanes, fD, p < mD ? oD[2 * p] : -1, p < mD ? oD[2 * p + 1] : -1);
    }
    pairs[side] = m;
  }
}

/**
 * w moved to t in [-pi/2, pi/2]: t = w, or t = w -/+ pi on the "-" side (returned with 4 added, so
 * one number carries both: `mirrored = r > 2`, t = mirrored ? r - 4 : r).
 */
function reduce(w: number): number {
  let r = w;
  if (r > Math.PI || r <= -Math.PI) r -= 2 * Math.PI * Math.round(r / (2 * Math.PI));
  if (r > HALF_PI) return r - Math.PI + 4;
  if (r < -HALF_PI) return r + Math.PI + 4;
  return r;
}

/**
 * The per-point inputs of t (from `reduce`): h = sin(t/2), sin t = 2 h cos(t/2) = 2 h sqrt(1 - h^2)
 * (no cancellation for |t/2| <= pi/4), u = 2 h^2 and cos t = 1 - u: one sine per point. Written to
 * into[at], into[at + stride], into[at + 2 stride] as u, sin t, cos t.
 */
function pointInputs(t: number, into: Float64Array, at: number, stride: number): void {
  const h = Math.sin(t / 2);
  const u = 2 * h * h;
  const s = 2 * h * Math.sqrt(1 - h * h);
  into[at] = u;
  into[at + stride] = s;
  into[at + 2 * stride] = 1 - u;
  into[at + 3 * stride] = s * s;
}

/** Folds 2^log2Scale into (re, im) where the result stays inside 2^-FOLD_BITS .. 2^FOLD_BITS. */
function foldScale(out: ComplexResponse, i: number): void {
  const e = out.log2Scale[i];
  if (e === 0) return;
  const r = out.re[i];
  const m = out.im[i];
  const l = 0.5 * Math.log2(r * r + m * m) + e;
  if (!(l > -FOLD_BITS && l < FOLD_BITS)) return;
  const half = Math.pow(2, e / 2); // exact: e is a multiple of 2 RESCALE_BITS / 2
  out.re[i] = r * half * half;
  out.im[i] = m * half * half;
  out.log2Scale[i] = 0;
}

let jsScratch = new Float64Array(0);
const jsPoint = new Float64Array(POINT_INPUTS);
/** Pair counts of the "+" and "-" constant sets of the last expansion. */
const pairsScratch = new Int32Array(2);

/** The plain JavaScript kernel: the WebAssembly loop's arithmetic in the same order, one point at a time. */
export function cascadeComplexJs(packed: Float64Array, sectionCount: number, omega: Float64Array, out: ComplexResponse): void {
  const setSize = sectionCount * K_STRIDE;
  if (jsScratch.length < 2 * setSize) jsScratch = new Float64Array(2 * setSize);
  const K = jsScratch;
  expandSections(packed, sectionCount, K, 0, 1, pairsScratch);
  const points = omega.length;
  for (let i = 0; i < points; i++) {
    const r = reduce(omega[i]);
    const mirrored = r > 2;
    pointInputs(mirrored ? r - 4 : r, jsPoint, 0, 1);
    evaluatePoint(K, mirrored ? setSize : 0, pairsScratch[mirrored ? 1 : 0], jsPoint[0], jsPoint[1], jsPoint[2], jsPoint[3], out, i);
    foldScale(out, i);
  }
}

/**
 * One point of the section loop (kernel.wat does the same two points at a time): the dual
 * products (pr + j pi, qr + j qi) = (PF, PF') and (gr + j gi, hr + j hi) = (PG, PG').
 */
function evaluatePoint(K: Float64Array, o0: number, pairs: number, u: number, s: number, cw: number, s2: number, out: ComplexResponse, i: number): void {
  let pr = 1;
  let pi = 0;
  let qr = 0;
  let qi = 0;
  let gr = 1;
  let gi = 0;
  let hr = 0;
  let hi = 0;
  let countP = 0;
  let countG = 0;
  for (let k = 0, o = o0; k < pairs; k++, o += K_STRIDE) {
    // F = a + j b, F' = cs + j bp of the numerator pair (A0 A1 A2 B0 B1 at o)
    let w = K[o + 2] * u;
    let c = K[o + 1];
    const a = K[o] + u * (c + w);
    const cs = s * (c + (w + w));
    c = K[o + 4];
    w = K[o + 3] + c * u;
    const b = s * w;
    const bp = cw * w + c * s2;
    const qr1 = qr * a - qi * b + (pr * cs - pi * bp);
    const qi1 = qr * b + qi * a + (pr * bp + pi * cs);
    const pr1 = pr * a - pi * b;
    pi = pr * b + pi * a;
    pr = pr1;
    qr = qr1;
    qi = qi1;
    // G likewise with the denominator pair's constants.
    w = K[o + 7] * u;
    c = K[o + 6];
    const ad = K[o + 5] + u * (c + w);
    const csd = s * (c + (w + w));
    c = K[o + 9];
    w = K[o + 8] + c * u;
    const bd = s * w;
    const bpd = cw * w + c * s2;
    const hr1 = hr * ad - hi * bd + (gr * csd - gi * bpd);
    const hi1 = hr * bd + hi * ad + (gr * bpd + gi * csd);
    const gr1 = gr * ad - gi * bd;
    gi = gr * bd + gi * ad;
    gr = gr1;
    hr = hr1;
    hi = hi1;
    if ((k & 1) === 1) {
      const sp = rescaleStep(pr * pr + pi * pi);
      if (sp !== 0) {
        const f = sp > 0 ? RESCALE_DOWN : RESCALE_UP;
        pr *= f;
        pi *= f;
        qr *= f;
        qi *= f;
        countP += sp;
      }
      const sg = rescaleStep(gr * gr + gi * gi);
      if (sg !== 0) {
        const f = sg > 0 ? RESCALE_DOWN : RESCALE_UP;
        gr *= f;
        gi *= f;
        hr *= f;
        hi *= f;
        countG += sg;
      }
    }
  }
  // Bring both products inside the window before dividing (a few steps at most).
  for (let step = 0; step < 8; step++) {
    const sp = rescaleStep(pr * pr + pi * pi);
    const sg = rescaleStep(gr * gr + gi * gi);
    if (sp === 0 && sg === 0) break;
    if (sp !== 0) {
      const f = sp > 0 ? RESCALE_DOWN : RESCALE_UP;
      pr *= f;
      pi *= f;
      qr *= f;
      qi *= f;
      countP += sp;
    }
    if (sg !== 0) {
      const f = sg > 0 ? RESCALE_DOWN : RESCALE_UP;
      gr *= f;
      gi *= f;
      hr *= f;
      hi *= f;
      countG += sg;
    }
  }
  const ip = 1 / (pr * pr + pi * pi);
  const ig = 1 / (gr * gr + gi * gi);
  // d ln H / dt = PF'/PF - PG'/PG = (qr + j qi)(pr - j pi) / |PF|^2 - (hr + j hi)(gr - j gi) / |PG|^2
  out.logSlope[i] = (qr * pr + qi * pi) * ip - (hr * gr + hi * gi) * ig;
  out.groupDelaySamples[i] = (qr * pi - qi * pr) * ip - (hr * gi - hi * gr) * ig;
  out.re[i] = (pr * gr + pi * gi) * ig;
  out.im[i] = (pi * gr - pr * gi) * ig;
  out.log2Scale[i] = RESCALE_BITS * (countP - countG);
}

/** +1 if |P|^2 is above the window, -1 if below (but not 0), else 0. */
function rescaleStep(m2: number): number {
  if (m2 > RESCALE_HIGH && m2 < Infinity) return 1;
  if (m2 < RESCALE_LOW && m2 > 0) return -1;
  return 0;
}

/** w = 2 pi f / fs for each frequency, into a new or given array. */
export function normalizedOmega(frequenciesHz: ArrayLike<number>, sampleRateHz: number, into?: Float64Array): Float64Array {
  const out = into && into.length === frequenciesHz.length ? into : new Float64Array(frequenciesHz.length);
  const k = (2 * Math.PI) / sampleRateHz;
  for (let i = 0; i < frequenciesHz.length; i++) out[i] = k * frequenciesHz[i];
  return out;
}

// ---- WebAssembly ------------------------------------------------------------------------------

/** The few WebAssembly API members used here (the core is typed without DOM or Node libraries). */
interface WasmMemory {
  buffer: ArrayBuffer;
  grow(pages: number): number;
}
type CascadeExport = (sec: number, nsec: number, pts: number, n8: number, out: number) => number;
interface WasmApi {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: { memory: WasmMemory; cascade: CascadeExport } };
}
interface WasmKernel {
  memory: WasmMemory;
  cascade: CascadeExport;
}

let wasmState: WasmKernel | null | undefined;

/** Set to false to force the JavaScript kernel (tests and benchmarks compare the two). */
export function useWasmKernel(enabled: boolean): void {
  wasmState = enabled ? undefined : null;
  forgetGrids();
}

/** The instantiated kernel, or null where WebAssembly SIMD is unavailable or refused. */
export function wasmKernel(): WasmKernel | null {
  if (wasmState !== undefined) return wasmState;
  wasmState = null;
  forgetGrids();
  try {
    const api = (globalThis as unknown as { WebAssembly?: WasmApi }).WebAssembly;
    if (!api) return null;
    const bytes = new Uint8Array(KERNEL_WASM_HEX.length / 2);
    for (let i = 0; i < bytes.length; i++) bytes[i] = parseInt(KERNEL_WASM_HEX.substr(2 * i, 2), 16);
    const instance = new api.Instance(new api.Module(bytes), {});
    wasmState = { memory: instance.exports.memory, cascade: instance.exports.cascade };
  } catch {
    wasmState = null;
  }
  return wasmState;
}

const WASM_PAGE = 65536;
const WASM_MIN_POINTS = 32;
/** Arrays per point in a grid's block of kernel memory: 4 inputs (u, sin t, cos t, sin^2 t), 5 outputs. */
const GRID_ARRAYS = 9;
/** Grids kept prepared (the plot grid, the headroom grid, ...), most recently used last. */
const MAX_GRIDS = 4;

/**
 * A frequency grid prepared in kernel memory: the per-point sine and square root are done once
 * per grid, not once per call, so a drag that re-evaluates the same grid pays only the section
 * loop. Points near z = 1 ("+") come first, then those near z = -1 ("-"), each group padded to
 * an even count; `order` maps kernel slots back to the caller's indices (null when the grid is
 * already in that order, as an ascending grid is).
 */
interface PreparedGrid {
  omega: Float64Array;
  nPlus: number;
  nMinus: number;
  padPlus: number;
  padMinus: number;
  /** Byte offset of the block: inputs of "+" then "-", then outputs (same arrangement). */
  base: number;
  order: Int32Array | null;
}

const grids: PreparedGrid[] = [];
/** Byte offset where grid blocks start (after the constants) and where the next one goes. */
let constantsBytes = 0;
let nextBlock = 0;

function forgetGrids(): void {
  grids.length = 0;
  constantsBytes = 0;
  nextBlock = 0;
}

function sameGrid(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

let view = new Float64Array(0);
/** A Float64Array over kernel memory, made again only when the memory has grown. */
function memoryView(k: WasmKernel): Float64Array {
  if (view.buffer !== k.memory.buffer) view = new Float64Array(k.memory.buffer);
  return view;
}

function ensureMemory(k: WasmKernel, bytes: number): void {
  const have = k.memory.buffer.byteLength;
  if (have < bytes) k.memory.grow(Math.ceil((bytes - have) / WASM_PAGE));
}

function prepareGrid(k: WasmKernel, omega: Float64Array, sectionCount: number): PreparedGrid {
  const need = 2 * sectionCount * K_STRIDE * 2 * 8;
  if (need > constantsBytes) {
    // Room for the constants of twice as many sections; the grids move, so prepare them again.
    constantsBytes = Math.max(need * 2, 64 * 1024);
    grids.length = 0;
    nextBlock = constantsBytes;
  }
  for (let g = 0; g < grids.length; g++) {
    const grid = grids[g];
    if (sameGrid(grid.omega, omega)) {
      if (g !== grids.length - 1) grids.push(grids.splice(g, 1)[0]);
      return grid;
    }
  }
  const points = omega.length;
  const reduced = new Float64Array(points);
  let nPlus = 0;
  for (let i = 0; i < points; i++) {
    reduced[i] = reduce(omega[i]);
    if (reduced[i] <= 2) nPlus++;
  }
  const nMinus = points - nPlus;
  const padPlus = nPlus + (nPlus & 1);
  const padMinus = nMinus + (nMinus & 1);
  const blockBytes = GRID_ARRAYS * (padPlus + padMinus) * 8;
  if (grids.length >= MAX_GRIDS || nextBlock + blockBytes > 256 * 1024 * 1024) {
    // Start over rather than manage holes: grids are cheap to prepare again.
    grids.length = 0;
    nextBlock = constantsBytes;
  }
  const base = nextBlock;
  nextBlock += blockBytes;
  ensureMemory(k, nextBlock);
  const mem = memoryView(k);
  const at = base / 8;
  const order = new Int32Array(padPlus + padMinus).fill(-1);
  let inOrder = true;
  let iPlus = 0;
  let iMinus = 0;
  for (let i = 0; i < points; i++) {
    const r = reduced[i];
    const mirrored = r > 2;
    const slot = mirrored ? padPlus + iMinus++ : iPlus++;
    order[slot] = i;
    if (slot !== (mirrored ? padPlus + i - nPlus : i)) inOrder = false;
    // Inputs of "+" points: 3 arrays of padPlus; of "-" points: 3 arrays of padMinus after them.
    if (mirrored) pointInputs(r - 4, mem, at + POINT_INPUTS * padPlus + (slot - padPlus), padMinus);
    else pointInputs(r, mem, at + slot, padPlus);
  }
  // Padding points: t = 0.
  if (padPlus > nPlus) pointInputs(0, mem, at + nPlus, padPlus);
  if (padMinus > nMinus) pointInputs(0, mem, at + POINT_INPUTS * padPlus + nMinus, padMinus);
  const grid: PreparedGrid = { omega: Float64Array.from(omega), nPlus, nMinus, padPlus, padMinus, base, order: inOrder ? null : order };
  grids.push(grid);
  return grid;
}

function cascadeComplexWasm(k: WasmKernel, packed: Float64Array, sectionCount: number, omega: Float64Array, out: ComplexResponse): void {
  const grid = prepareGrid(k, omega, sectionCount);
  const { nPlus, nMinus, padPlus, padMinus, base } = grid;
  const mem = memoryView(k);
  const setDoubles = sectionCount * K_STRIDE * 2;
  expandSections(packed, sectionCount, mem, 0, 2, pairsScratch);
  const inPlus = base;
  const inMinus = base + POINT_INPUTS * padPlus * 8;
  const outPlus = base + POINT_INPUTS * (padPlus + padMinus) * 8;
  const outMinus = outPlus + 5 * padPlus * 8;
  let scaled = 0;
  if (padPlus > 0) scaled |= k.cascade(0, pairsScratch[0], inPlus, padPlus * 8, outPlus);
  if (padMinus > 0) scaled |= k.cascade(setDoubles * 8, pairsScratch[1], inMinus, padMinus * 8, outMinus);
  const oP = outPlus / 8;
  const oM = outMinus / 8;
  for (let a = 0; a < 5; a++) {
    const t = a === 0 ? out.re : a === 1 ? out.im : a === 2 ? out.log2Scale : a === 3 ? out.groupDelaySamples : out.logSlope;
    const fromPlus = oP + a * padPlus;
    const fromMinus = oM + a * padMinus;
    if (grid.order === null) {
      t.set(mem.subarray(fromPlus, fromPlus + nPlus), 0);
      t.set(mem.subarray(fromMinus, fromMinus + nMinus), nPlus);
    } else {
      const order = grid.order;
      for (let j = 0; j < nPlus; j++) t[order[j]] = mem[fromPlus + j];
      for (let j = 0; j < nMinus; j++) t[order[padPlus + j]] = mem[fromMinus + j];
    }
  }
  if (scaled) for (let i = 0; i < omega.length; i++) foldScale(out, i);
}
