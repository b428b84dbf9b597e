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

/** The plain JavaScript kernel (the reference the WebAssembly one is tested against). */
export function cascadeResponseJs(packed: Float64Array, sectionCount: number, omega: Float64Array, out: KernelOutput): void {
  const { magnitudeDb, phaseRad, groupDelaySamples, logSlope } = out;
  const points = omega.length;
  for (let i = 0; i < points; i++) {
    const w = omega[i];
    const c1 = Math.cos(w);
    const s1 = Math.sin(w);
    // z^-1 = c1 - j s1, z^-2 = c2 - j s2 (double-angle forms, exact to about an ulp).
    const c2 = c1 * c1 - s1 * s1;
    const s2 = 2 * s1 * c1;
    let hr = 1;
    let hi = 0;
    let logScale = 0; // ln of the factor taken out of (hr, hi) by rescaling, in ln(|H|^2) units
    let tau = 0;
    let slope = 0;
    for (let k = 0, o = 0; k < sectionCount; k++, o += SECTION_STRIDE) {
      const b0 = packed[o];
      const b1 = packed[o + 1];
      const b2 = packed[o + 2];
      const a1 = packed[o + 3];
      const a2 = packed[o + 4];
      const nr = b0 + b1 * c1 + b2 * c2;
      const ni = -(b1 * s1 + b2 * s2);
      const dr = 1 + a1 * c1 + a2 * c2;
      const di = -(a1 * s1 + a2 * s2);
      const npr = b1 * c1 + 2 * b2 * c2;
      const npi = -(b1 * s1 + 2 * b2 * s2);
      const dpr = a1 * c1 + 2 * a2 * c2;
      const dpi = -(a1 * s1 + 2 * a2 * s2);
      const inn = 1 / (nr * nr + ni * ni);
      const idd = 1 / (dr * dr + di * di);
      tau += (npr * nr + npi * ni) * inn - (dpr * dr + dpi * di) * idd;
      slope += (npi * nr - npr * ni) * inn - (dpi * dr - dpr * di) * idd;
      // H *= N conj(D) / |D|^2
      const tr = (nr * dr + ni * di) * idd;
      const ti = (ni * dr - nr * di) * idd;
      const h = hr * tr - hi * ti;
      hi = hr * ti + hi * tr;
      hr = h;
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
/** dB per unit of the kernel's rescale count: 10 log10(2^664). */
const DB_PER_RESCALE = 6640 * Math.log10(2);

function cascadeResponseWasm(k: WasmKernel, packed: Float64Array, sectionCount: number, omega: Float64Array, out: KernelOutput): void {
  const points = omega.length;
  const padded = points + (points & 1);
  const secBytes = sectionCount * SECTION_STRIDE * 16;
  const ptsOffset = Math.ceil(secBytes / 16) * 16;
  const need = ptsOffset + 9 * padded * 8;
  if (k.memory.buffer.byteLength < need) k.memory.grow(Math.ceil((need - k.memory.buffer.byteLength) / WASM_PAGE));
  const mem = new Float64Array(k.memory.buffer);
  // Each coefficient twice, one per SIMD lane.
  for (let j = 0, n = sectionCount * SECTION_STRIDE; j < n; j++) mem[2 * j] = mem[2 * j + 1] = packed[j];
  const base = ptsOffset / 8;
  const cos1 = base;
  const sin1 = base + padded;
  const cos2 = base + 2 * padded;
  const sin2 = base + 3 * padded;
  for (let i = 0; i < points; i++) {
    const c = Math.cos(omega[i]);
    const s = Math.sin(omega[i]);
    mem[cos1 + i] = c;
    mem[sin1 + i] = s;
    mem[cos2 + i] = c * c - s * s;
    mem[sin2 + i] = 2 * s * c;
  }
  for (let i = points; i < padded; i++) {
    mem[cos1 + i] = 1;
    mem[sin1 + i] = 0;
    mem[cos2 + i] = 1;
    mem[sin2 + i] = 0;
  }
  k.cascade(0, sectionCount, ptsOffset, padded * 8);
  const hr = base + 4 * padded;
  const hi = base + 5 * padded;
  const cnt = base + 6 * padded;
  const tau = base + 7 * padded;
  const slope = base + 8 * padded;
  const { magnitudeDb, phaseRad, groupDelaySamples, logSlope } = out;
  let redo: number[] | null = null;
  for (let i = 0; i < points; i++) {
    const r = mem[hr + i];
    const m = mem[hi + i];
    magnitudeDb[i] = DB_PER_NEPER_SQUARED * Math.log(r * r + m * m) + DB_PER_RESCALE * mem[cnt + i];
    phaseRad[i] = Math.atan2(m, r);
    groupDelaySamples[i] = mem[tau + i];
    logSlope[i] = mem[slope + i];
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
