/**
 * Shared helpers of the core's tests: fixture loading, angle differences, and a rounding-error
 * bound for evaluating a cascade of float64 sections.
 */
import { readFileSync } from 'node:fs';
import type { BesselNormalization, CrossoverFamily, EdgeKind } from '../../src/plan/types';
import { fileURLToPath } from 'node:url';
import { packSections, type Section } from '../../src/design/section';
import { cascadeWithGainDelay, type Response } from '../../src/response/chain-response';
import { allocateKernelOutput, cascadeResponse, normalizedOmega, type KernelOutput } from '../../src/response/kernel';

const FIXTURES = fileURLToPath(new URL('../reference/fixtures/', import.meta.url));

export interface FixtureFile<C> {
  meta: Record<string, unknown> & { scipy: string; numpy: string; mpmath: string };
  cases: C[];
}

export function loadFixture<C>(name: string): FixtureFile<C> {
  return JSON.parse(readFileSync(FIXTURES + name, 'utf8')) as FixtureFile<C>;
}

/** |a - b| for angles in degrees, taken modulo 360 (so 179.9999 and -179.9999 are 0.0002 apart). */
export function angleDiffDeg(a: number, b: number): number {
  const d = (((a - b) % 360) + 540) % 360 - 180;
  return Math.abs(d);
}

export const EPS = Number.EPSILON;
export const DB_PER_NEPER = 20 / Math.LN10; // 8.686 dB per unit of relative error

/**
 * First-order sensitivity of a cascade's response to relative errors of its coefficients:
 * sum over sections of (|b0| + |b1| + |b2|) / |N(z)| + (1 + |a1| + |a2|) / |D(z)|.
 * If every coefficient (and every evaluation step) carries a relative error of at most u, the
 * relative error of H is at most u times this (standard perturbation bound for a polynomial
 * evaluated at |z| = 1). Near DC a low-frequency section has |D(z)| ~ w^2 while its coefficients
 * are ~ 2, so this is large: that cancellation, not the code, limits any float64 evaluation.
 */
export function sensitivity(sections: readonly Section[], w: number): number {
  const c1 = Math.cos(w);
  const s1 = Math.sin(w);
  const c2 = Math.cos(2 * w);
  const s2 = Math.sin(2 * w);
  let k = 0;
  for (const s of sections) {
    const n = Math.hypot(s.b0 + s.b1 * c1 + s.b2 * c2, s.b1 * s1 + s.b2 * s2);
    const d = Math.hypot(1 + s.a1 * c1 + s.a2 * c2, s.a1 * s1 + s.a2 * s2);
    k += (Math.abs(s.b0) + Math.abs(s.b1) + Math.abs(s.b2)) / n + (1 + Math.abs(s.a1) + Math.abs(s.a2)) / d;
  }
  return k;
}

/** A fixture's scipy second-order sections [b0, b1, b2, a0, a1, a2] as core sections. */
export function sosToSections(sos: number[][]): Section[] {
  return sos.map(([b0, b1, b2, a0, a1, a2]) => ({ b0: b0 / a0, b1: b1 / a0, b2: b2 / a0, a1: a1 / a0, a2: a2 / a0 }));
}

export function responseAt(sections: readonly Section[], freqs: readonly number[], fs: number, gain = 1, delaySamples = 0): Response {
  return cascadeWithGainDelay(sections, gain, delaySamples, normalizedOmega(freqs, fs), fs);
}

export const RAD2DEG = 180 / Math.PI;

/** Largest |x| of a list. */
export function maxAbs(xs: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < xs.length; i++) m = Math.max(m, Math.abs(xs[i]));
  return m;
}

/** The raw kernel output (group delay in samples, no -200 dB floor) of sections at frequencies. */
export function kernelAt(sections: readonly Section[], freqs: readonly number[], fs: number): KernelOutput {
  const out = allocateKernelOutput(freqs.length);
  cascadeResponse(packSections(sections), sections.length, normalizedOmega(freqs, fs), out);
  return out;
}

/**
 * The same bound for the group delay: each term N'/N (and D'/D) has |N'| <= 2 sum|b|, so an
 * evaluation error of u relative in N and N' moves it by about 2 u (sum|b| / |N|)^2.
 * Returns sum over sections of 2 (sum|b| / |N|)^2 + 2 ((1 + |a1| + |a2|) / |D|)^2 (in samples per u).
 */
export function groupDelaySensitivity(sections: readonly Section[], w: number): number {
  const c1 = Math.cos(w);
  const s1 = Math.sin(w);
  const c2 = Math.cos(2 * w);
  const s2 = Math.sin(2 * w);
  let k = 0;
  for (const s of sections) {
    const n = Math.hypot(s.b0 + s.b1 * c1 + s.b2 * c2, s.b1 * s1 + s.b2 * s2);
    const d = Math.hypot(1 + s.a1 * c1 + s.a2 * c2, s.a1 * s1 + s.a2 * s2);
    k += 2 * ((Math.abs(s.b0) + Math.abs(s.b1) + Math.abs(s.b2)) / n) ** 2 + 2 * ((1 + Math.abs(s.a1) + Math.abs(s.a2)) / d) ** 2;
  }
  return k;
}

/** One edge case of butterworth.json, bessel.json and linkwitz-riley.json (make_fixtures.py). */
export interface FixtureColumns {
  magnitudeDb: number[];
  phaseDeg: number[];
  groupDelaySamples: number[];
}
export interface EdgeFixtureCase {
  family: CrossoverFamily;
  order: number;
  kind: EdgeKind;
  frequency: number;
  sampleRate: number;
  normalization?: BesselNormalization;
  call: string;
  sos: number[][];
  freqs: number[];
  sosfreqz: { magnitudeDb: number[]; phaseDeg: number[] };
  sosExact: FixtureColumns;
  design: FixtureColumns;
  scipyGroupDelay?: { call: string; groupDelaySamples: number[] };
}
