/**
 * The response kernel: a cascade of sections evaluated on the unit circle, z = e^{jw}.
 *
 * For each section N(z) = b0 + b1 z^-1 + b2 z^-2 and D(z) = 1 + a1 z^-1 + a2 z^-2. With
 * N'(z) = b1 z^-1 + 2 b2 z^-2 (and D' likewise), d ln N / dw = -j N'/N, so for the cascade
 *
 *     d ln H / dw = -j Q,   Q = sum over sections of (N'/N - D'/D),
 *
 * the group delay is tau = -d(arg H)/dw = Re Q (samples; J. O. Smith, "Numerical Computation of
 * Group Delay") and the slope of the log magnitude is d ln|H| / dw = Im Q. Both are exact: no
 * finite differences. The slope is what the sum of outputs needs for its own exact group delay.
 *
 * The loop runs over points, then sections, on a packed Float64Array, allocating nothing per
 * point; the complex product is kept as one running value and rescaled when it leaves
 * [1e-200, 1e200], so deep stop bands of long cascades neither underflow nor overflow.
 *
 * `cascadeResponse` runs the section loop in WebAssembly SIMD (kernel.wat, two points per
 * instruction) where the host allows it, and in plain JavaScript (`cascadeResponseJs`) otherwise,
 * for instance under a Content-Security-Policy without 'wasm-unsafe-eval'. Both compute the same
 * expressions; the tests hold them to each other and to scipy.
 */
import { SECTION_STRIDE } from '../design/section';
import { KERNEL_WASM_HEX } from './kernel-wasm-bytes';

/** Caller-provided result arrays, one value per point. */
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
const RESCALE_LOW = 1e-200;
const RESCALE_HIGH = 1e200;

/**
 * Evaluates `sectionCount` packed sections ([b0, b1, b2, a1, a2] each) at the normalized angular
 * frequencies `omega` (radians per sample, w = 2 pi f / fs) and writes into `out`.
 */
export function cascadeResponse(packed: Float64Array, sectionCount: number, omega: Float64Array, out: KernelOutput): void {
  // Below a few dozen points the copy in and out of WebAssembly memory costs more than it saves.
  const wasm = omega.length >= WASM_MIN_POINTS ? wasmKernel() : null;
  if (wasm) cascadeResponseWasm(wasm, packed, sectionCount, omega, out);
  else cascadeResponseJs(packed, sectionCount, omega, out);
}

/**
 * Accurate evaluation near z = 1 and z = -1. Written as powers of cos and sin, N(e^{jw}) cancels
 * near a zero close to z = 1 (a high-pass at low frequency, a notch) or z = -1 (a low-pass near
 * Nyquist), and the rounding of cos w (1e-16) becomes a large relative error there. So each section
 * is evaluated around the nearer of the two points, with t = w (|w| <= pi/2) or t = w -/+ pi
 * (the section with b1 and a1 negated: H(e^{jw}) = H~(e^{jt}) exactly), and small quantities
 * computed directly: u = 1 - cos t = 2 sin^2(t/2), v = 1 - cos 2t = 2 sin^2 t. Then
 *
 *   Re N  = (b0 + b1 + b2) - b1 u - b2 v          Im N  = -sin t (b1 + 2 b2 - 2 b2 u)
 *   Re N' = Re N - (b0 - b2) - b2 v               Im N' = Im N - b2 sin 2t
 *
 * (D, D' likewise with 1, a1, a2), where b0 + b1 + b2 is summed with error-free transformations,
 * so N(1) is exact to rounding when the coefficients put a zero at z = 1.
 * Constants per section and side (the "+" set for |w| <= pi/2, the "-" set with b1, a1 negated):
 * b1, b2, b0 + b1 + b2, b1 + 2 b2, b0 - b2, and the same for 1, a1, a2.
 */
const K_B1 = 0;
const K_B2 = 1;
const K_N1 = 2;
const K_P = 3;
const K_C = 4;
const K_A1 = 5;
const K_A2 = 6;
const K_D1 = 7;
const K_Q = 8;
const K_CD = 9;
/** Numbers per section in an expanded set. */
export const EXPANDED_STRIDE = 10;
const HALF_PI = Math.PI / 2;

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
 * Expands packed sections into the kernel's two constant sets, "+" then "-", each
 * EXPANDED_STRIDE numbers per section, every number written `lanes` times in a row.
 */
export function expandSections(packed: Float64Array, sectionCount: number, into: Float64Array, offset = 0, lanes = 1): void {
  const setSize = sectionCount * EXPANDED_STRIDE * lanes;
  for (let side = 0; side < 2; side++) {
    const sign = side === 0 ? 1 : -1;
    for (let k = 0; k < sectionCount; k++) {
      const o = k * SECTION_STRIDE;
      const b0 = packed[o];
      const b1 = sign * packed[o + 1];
      const b2 = packed[o + 2];
      const a1 = sign * packed[o + 3];
      const a2 = packed[o + 4];
      const values = [b1, b2, sum3(b0, b1, b2), b1 + 2 * b2, b0 - b2, a1, a2, sum3(1, a1, a2), a1 + 2 * a2, 1 - a2];
      const base = offset + side * setSize + k * EXPANDED_STRIDE * lanes;
      for (let j = 0; j < EXPANDED_STRIDE; j++) for (let l = 0; l < lanes; l++) into[base + j * lanes + l] = values[j];
    }
  }
}

/**
 * w moved to t in [-pi/2, pi/2]: t = w, or t = w -/+ pi on the "-" side (returned with 4 added, so
 * one number carries both: `mirrored = r > 2`, t = mirrored ? r - 4 : r). Then the per-point inputs:
 * h = sin(t/2), s = sin t = 2 h cos(t/2) = 2 h sqrt(1 - h^2) (no cancellation for |t/2| <= pi/4),
 * u = 2 h^2, v = 2 s^2: one sine per point.
 */
function reduce(w: number): number {
  let r = w;
  if (r > Math.PI || r <= -Math.PI) r -= 2 * Math.PI * Math.round(r / (2 * Math.PI));
  if (r > HALF_PI) return r - Math.PI + 4;
  if (r < -HALF_PI) return r + Math.PI + 4;
  return r;
}

let jsScratch = new Float64Array(0);

/** The plain JavaScript kernel (the reference the WebAssembly one is tested against). */
export function cascadeResponseJs(packed: Float64Array, sectionCount: number, omega: Float64Array, out: KernelOutput): void {
  const { magnitudeDb, phaseRad, groupDelaySamples, logSlope } = out;
  const setSize = sectionCount * EXPANDED_STRIDE;
  if (jsScratch.length < 2 * setSize) jsScratch = new Float64Array(2 * setSize);
  const K = jsScratch;
  expandSections(packed, sectionCount, K);
  const points = omega.length;
  for (let i = 0; i < points; i++) {
    const r = reduce(omega[i]);
    const mirrored = r > 2;
    const h = Math.sin((mirrored ? r - 4 : r) / 2);
    const s = 2 * h * Math.sqrt(1 - h * h);
    const u = 2 * h * h;
    const v = 2 * s * s;
    const s2 = 2 * s * (1 - u); // sin 2t
    let hr = 1;
    let hi = 0;
    let logScale = 0; // ln of the factor taken out of (hr, hi) by rescaling, in ln(|H|^2) units
    let tau = 0;
    let slope = 0;
    for (let k = 0, o = mirrored ? setSize : 0; k < sectionCount; k++, o += EXPANDED_STRIDE) {
      const b1u = K[o + K_B1] * u;
      const b2u = K[o + K_B2] * u;
      const b2v = K[o + K_B2] * v;
      const a1u = K[o + K_A1] * u;
      const a2u = K[o + K_A2] * u;
      const a2v = K[o + K_A2] * v;
      const nr = K[o + K_N1] - b1u - b2v;
      const ni = -s * (K[o + K_P] - 2 * b2u);
      const npr = nr - K[o + K_C] - b2v;
      const npi = ni - K[o + K_B2] * s2;
      const dr = K[o + K_D1] - a1u - a2v;
      const di = -s * (K[o + K_Q] - 2 * a2u);
      const dpr = dr - K[o + K_CD] - a2v;
      const dpi = di - K[o + K_A2] * s2;
      const inn = 1 / (nr * nr + ni * ni);
      const idd = 1 / (dr * dr + di * di);
      tau += (npr * nr + npi * ni) * inn - (dpr * dr + dpi * di) * idd;
      slope += (npi * nr - npr * ni) * inn - (dpi * dr - dpr * di) * idd;
      // H *= N conj(D) / |D|^2
      const tr = (nr * dr + ni * di) * idd;
      const ti = (ni * dr - nr * di) * idd;
      const hn = hr * tr - hi * ti;
      hi = hr * ti + hi * tr;
      hr = hn;
      const m2 = hr * hr + hi * hi;
      if ((m2 < RESCALE_LOW || m2 > RESCALE_HIGH) && m2 > 0 && m2 < Infinity) {
        const inv = 1 / Math.sqrt(m2);
        hr *= inv;
        hi *= inv;
        logScale += Math.log(m2);
      }
    }
    magnitudeDb[i] = DB_PER_NEPER_SQUARED * (Math.log(hr * hr + hi * hi) + logScale);
    phaseRad[i] = Math.atan2(hi, hr);
    groupDelaySamples[i] = tau;
    logSlope[i] = slope;
  }
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
interface WasmApi {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: { memory: WasmMemory; cascade: (sec: number, nsec: number, pts: number, n8: number) => void } };
}
interface WasmKernel {
  memory: WasmMemory;
  cascade: (sec: number, nsec: number, pts: number, n8: number) => void;
}

let wasmState: WasmKernel | null | undefined;

/** Set to false to force the JavaScript kernel (tests and benchmarks compare the two). */
export function useWasmKernel(enabled: boolean): void {
  wasmState = enabled ? undefined : null;
}

/** The instantiated kernel, or null where WebAssembly SIMD is unavailable or refused. */
export function wasmKernel(): WasmKernel | null {
  if (wasmState !== undefined) return wasmState;
  wasmState = null;
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
/** Arrays per point group in kernel memory: sin t, u, v, sin 2t in; Re H, Im H, rescale count, tau, slope out. */
const KERNEL_ARRAYS = 9;
/** dB per unit of the kernel's rescale count: 10 log10(2^332). */
const DB_PER_RESCALE = 3320 * Math.log10(2);

let slotOf = new Int32Array(0);
/** reduce(omega[i]) per point, kept from the counting pass for the filling pass. */
let reduced = new Float64Array(0);

function cascadeResponseWasm(k: WasmKernel, packed: Float64Array, sectionCount: number, omega: Float64Array, out: KernelOutput): void {
  const points = omega.length;
  if (slotOf.length < points) {
    slotOf = new Int32Array(points);
    reduced = new Float64Array(points);
  }
  let nearOne = 0;
  for (let i = 0; i < points; i++) {
    reduced[i] = reduce(omega[i]);
    if (reduced[i] <= 2) nearOne++;
  }
  // Two groups of points, each padded to an even count: "+" (near z = 1) and "-" (near z = -1).
  const padPlus = nearOne + (nearOne & 1);
  const nearMinus = points - nearOne;
  const padMinus = nearMinus + (nearMinus & 1);
  const setDoubles = sectionCount * EXPANDED_STRIDE * 2;
  const plusBase = 2 * setDoubles; // in doubles; 16-byte aligned since setDoubles is even
  const minusBase = plusBase + KERNEL_ARRAYS * padPlus;
  const need = (minusBase + KERNEL_ARRAYS * padMinus) * 8;
  if (k.memory.buffer.byteLength < need) k.memory.grow(Math.ceil((need - k.memory.buffer.byteLength) / WASM_PAGE));
  const mem = new Float64Array(k.memory.buffer);
  expandSections(packed, sectionCount, mem, 0, 2);
  let iPlus = 0;
  let iMinus = 0;
  for (let i = 0; i < points; i++) {
    const r = reduced[i];
    const mirrored = r > 2;
    const base = mirrored ? minusBase : plusBase;
    const pad = mirrored ? padMinus : padPlus;
    const j = mirrored ? iMinus++ : iPlus++;
    slotOf[i] = base + j;
    const h = Math.sin((mirrored ? r - 4 : r) / 2);
    const s = 2 * h * Math.sqrt(1 - h * h);
    const u = 2 * h * h;
    mem[base + j] = s;
    mem[base + pad + j] = u;
    mem[base + 2 * pad + j] = 2 * s * s;
    mem[base + 3 * pad + j] = 2 * s * (1 - u);
  }
  // Padding points: t = 0.
  for (let a = 0; a < 4; a++) {
    if (padPlus > nearOne) mem[plusBase + a * padPlus + nearOne] = 0;
    if (padMinus > nearMinus) mem[minusBase + a * padMinus + nearMinus] = 0;
  }
  if (padPlus > 0) k.cascade(0, sectionCount, plusBase * 8, padPlus * 8);
  if (padMinus > 0) k.cascade(setDoubles * 8, sectionCount, minusBase * 8, padMinus * 8);
  const { magnitudeDb, phaseRad, groupDelaySamples, logSlope } = out;
  let redo: number[] | null = null;
  for (let i = 0; i < points; i++) {
    const j = slotOf[i];
    const pad = j >= minusBase ? padMinus : padPlus;
    const r = mem[j + 4 * pad];
    const m = mem[j + 5 * pad];
    magnitudeDb[i] = DB_PER_NEPER_SQUARED * Math.log(r * r + m * m) + DB_PER_RESCALE * mem[j + 6 * pad];
    phaseRad[i] = Math.atan2(m, r);
    groupDelaySamples[i] = mem[j + 7 * pad];
    logSlope[i] = mem[j + 8 * pad];
    if (Number.isNaN(magnitudeDb[i])) (redo ??= []).push(i);
  }
  // An exact zero of a section (a high-pass at 0 Hz, a low-pass at Nyquist, a notch at its
  // frequency) makes the SIMD loop's 1 / (|N|^2 |D|^2) infinite and its H NaN, and a NaN output
  // turns the whole sum NaN there. The JavaScript kernel keeps |N|^2 and |D|^2 apart and gives
  // -Infinity dB: redo those few points with it.
  if (redo) {
    const w = Float64Array.from(redo, (i) => omega[i]);
    const one = allocateKernelOutput(redo.length);
    cascadeResponseJs(packed, sectionCount, w, one);
    redo.forEach((i, j) => {
      magnitudeDb[i] = one.magnitudeDb[j];
      phaseRad[i] = one.phaseRad[j];
      groupDelaySamples[i] = one.groupDelaySamples[j];
      logSlope[i] = one.logSlope[j];
    });
  }
}
