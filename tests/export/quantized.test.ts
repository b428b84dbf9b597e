/**
 * The quantized truth: the response of the sections as the board holds them, re-computed here
 * independently from the exported integers.
 *
 * Independent evaluation: for integer coefficients B0 B1 B2 (numerator) and A0 = 2^n, A1, A2,
 *   |B(e^jw)|^2 = s0 + s1 cos w + s2 cos 2w,  s0 = B0^2 + B1^2 + B2^2, s1 = 2 (B0 B1 + B1 B2), s2 = 2 B0 B2
 * (expand (sum Bk e^-jwk)(sum Bk e^jwk)); with x = sin^2(w/2), cos w = 1 - 2x, cos 2w = 1 - 8x + 8x^2:
 *   |B|^2 = (B0 + B1 + B2)^2 - (2 s1 + 8 s2) x + 8 s2 x^2.
 * The three integer coefficients are formed exactly with BigInt (products of 32-bit integers need
 * 64 bits), then each is rounded once to a double; the x form avoids the cancellation of the cosine
 * form near DC, where low-frequency sections have |A|^2 ~ w^4 and coefficients ~ 2^60. This shares
 * nothing with the core's complex evaluation, and uses the integers as written, not the doubles.
 * Tolerance 1e-6 dB: both sides round a few times at 2^-53 relative, amplified at most by the
 * conditioning of the near-DC sections (sensitivity ~ 1e4 at 10 Hz for a 32 Hz high-pass).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { diagnosticMessage } from '../../src/diagnostics';
import { describe, expect, it } from 'vitest';
import { buildExportList, type ExportList } from '../../src/export/list';
import { compareOutput, quantizeProfile } from '../../src/export/quantized';
import { BUILT_IN_PROFILES, copyProfile } from '../../src/export/profiles';
import { readPlanText } from '../../src/plan/read';
import type { BoardProfile, Plan } from '../../src/plan/types';
import { logFrequencies } from '../../src/response/chain-response';
import { fromHex } from '../../src/export/fixed';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
function demo(name: string): Plan {
  const r = readPlanText(readFileSync(ASSETS + name, 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}
function list(plan: Plan, profile: BoardProfile): ExportList {
  const r = buildExportList(plan, profile);
  if (!r.ok) throw new Error(r.problems.map(diagnosticMessage).join('; '));
  return r.list;
}

/** |B(e^jw)|^2 from integer coefficients, sums exact in BigInt. */
function powerFromIntegers(b: bigint[], w: number): number {
  const [b0, b1, b2] = b;
  const s1 = 2n * (b0 * b1 + b1 * b2);
  const s2 = 2n * b0 * b2;
  const t0 = Number((b0 + b1 + b2) * (b0 + b1 + b2));
  const t1 = Number(-(2n * s1 + 8n * s2));
  const t2 = Number(8n * s2);
  const x = Math.sin(w / 2) ** 2;
  return t0 + x * (t1 + x * t2);
}

/** The written integers of a section in the file convention (b0 b1 b2 a1 a2), from the profile's order and sign. */
function integersOf(written: { name: string; number: { value: number; text: string } }[], profile: BoardProfile): Record<string, bigint> {
  const out: Record<string, bigint> = {};
  for (const w of written) {
    let k = BigInt(w.number.value);
    if (profile.number.kind === 'fixed' && profile.number.notation === 'hex') k = BigInt(fromHex(w.number.text, profile.number.wordBits)!);
    out[w.name] = profile.feedbackSign === 'negated' && (w.name === 'a1' || w.name === 'a2') ? -k : k;
  }
  return out;
}

describe.each([
  ['Q5.23 in 32-bit words', 'q5.23', 'two-way-monitor.bqplan'],
  ['Q5.23 in 32-bit words', 'q5.23', 'three-way-hall.bqplan'],
  ['Q2.30 halved', 'q2.30-halved', 'three-way-hall.bqplan'],
  ['Q1.31 negated (saturating)', 'q1.31-negated', 'two-way-monitor.bqplan'],
])('%s: %s on %s', (_label, key, planName) => {
  const profile = BUILT_IN_PROFILES.find((b) => b.key === key)!.profile;
  const plan = demo(planName);
  const l = list(plan, profile);
  const freqs = logFrequencies(200, 10, 20000);
  const n = profile.number.kind === 'fixed' ? profile.number.fractionBits : 0;
  // The written number is coefficient x scale x 2^n, scale a power of two: coefficient = integer / 2^(n + log2 scale).
  const shift = Math.log2(profile.coefficientScale);

  it.each(l.outputs.map((o) => [o.id, o] as const))('output %s: magnitude from the integers matches', (_id, o) => {
    const core = compareOutput(o, freqs, l.sampleRate);
    for (let i = 0; i < freqs.length; i++) {
      const w = (2 * Math.PI * freqs[i]) / l.sampleRate;
      let db = 20 * Math.log10(Math.abs(o.gain.quantized));
      for (const s of o.sections) {
        const k = integersOf(s.written, profile);
        const a0 = 1n << BigInt(n + shift); // a0 = 1 in the board's scale
        const num = powerFromIntegers([k.b0, k.b1, k.b2], w);
        const den = powerFromIntegers([a0, k.a1, k.a2], w);
        db += 10 * Math.log10(num / den);
      }
      expect(Math.abs(core.quantized.magnitudeDb[i] - db)).toBeLessThan(1e-6);
    }
  });

  it('reports the largest coefficient error within half an LSB where nothing saturated', () => {
    const lsb = 2 ** -(n + shift);
    for (const o of l.outputs) {
      for (const s of o.sections) {
        if (s.saturated.length > 0) continue;
        expect(s.largestError).toBeLessThanOrEqual(lsb / 2);
        const direct = Math.max(...(['b0', 'b1', 'b2', 'a1', 'a2'] as const).map((c) => Math.abs(s.quantized[c] - s.ideal[c])));
        expect(s.largestError).toBe(direct);
      }
    }
  });
});

describe('saturation and instability are flagged per section', () => {
  it('flags a1 of every low-frequency section in Q1.31 (|a1| near 2 does not fit), at the right end', () => {
    const plan = demo('two-way-monitor.bqplan');
    const asComputed = copyProfile(BUILT_IN_PROFILES.find((b) => b.key === 'q1.31-negated')!.profile);
    const negated = list(plan, asComputed);
    asComputed.feedbackSign = 'as-computed';
    const plain = list(plan, asComputed);
    const s = negated.outputs[0].sections[0];
    expect(s.saturated).toContain('a1');
    // a1 of a 32 Hz high-pass is about -1.996: written as -a1 = +1.996 it saturates high, as a1 low.
    expect(s.written.find((w) => w.name === 'a1')!.number.saturation).toBe('high');
    expect(plain.outputs[0].sections[0].written.find((w) => w.name === 'a1')!.number.saturation).toBe('low');
    expect(negated.notes.map(diagnosticMessage).join('\n')).toMatch(/saturated coefficients: woofer section 1 \(b1, a1\)/);
    expect(negated.notes.find((n) => n.code === 'export-saturated')?.severity).toBe('warning');
  });

  it('flags a section that quantization makes unstable (pole moved onto the unit circle)', () => {
    // A raw resonator with poles at radius sqrt(0.99999) = 0.999995; in Q2.14, a2 = 0.99999 rounds to 16384 / 16384 = 1.
    const plan = demo('two-way-monitor.bqplan');
    plan.outputs[0].bands.push({ id: 'res', type: 'raw', frequency: 1000, enabled: true, coefficients: { b0: 1e-3, b1: 0, b2: -1e-3, a0: 1, a1: -1.9999, a2: 0.99999 } });
    const p = copyProfile(BUILT_IN_PROFILES[0].profile);
    p.number = { kind: 'fixed', integerBits: 2, fractionBits: 14, wordBits: 16, notation: 'decimal' };
    const l = list(plan, p);
    const s = l.outputs[0].sections.find((x) => x.from === 'woofer/res')!;
    expect(s.poleRadiusIdeal).toBeLessThan(1);
    expect(s.quantized.a2).toBe(1);
    expect(s.poleRadius).toBeGreaterThanOrEqual(1);
    expect(s.stable).toBe(false);
    expect(l.notes.map(diagnosticMessage).join('\n')).toMatch(/UNSTABLE after quantization: .*woofer\/res/);
    // The app marks it by severity, not by the words of the note.
    const unstable = l.notes.find((n) => n.code === 'export-unstable');
    expect(unstable?.severity).toBe('danger');
    if (unstable?.code === 'export-unstable') expect(unstable.values.sections).toContainEqual({ outputId: 'woofer', index: s.index, from: 'woofer/res' });
  });

  it('a float profile changes nothing: quantized equals ideal, zero error', () => {
    const l = list(demo('three-way-hall.bqplan'), BUILT_IN_PROFILES[0].profile);
    for (const o of l.outputs) for (const s of o.sections) {
      expect(s.quantized).toEqual(s.ideal);
      expect(s.largestError).toBe(0);
    }
  });
});

describe('quantizeProfile (response --quantize)', () => {
  it('makes Q5.23 in the file convention', () => {
    const p = quantizeProfile('Q5.23')!;
    expect(p.number).toEqual({ kind: 'fixed', integerBits: 5, fractionBits: 23, wordBits: 32, notation: 'decimal' });
    expect(p.feedbackSign).toBe('as-computed');
    expect(p.coefficientScale).toBe(1);
    expect(quantizeProfile('Q9.30')).toBeNull();
  });
  it('shows the precision loss of a low-frequency section (references.md: b0 of a 30 Hz low-pass at 48 kHz is ~3.8e-6)', () => {
    const plan = demo('two-way-monitor.bqplan');
    plan.input.bands = [];
    plan.outputs[0].lowPass = null;
    plan.outputs[0].bands = [{ id: 'lp', type: 'lowPass', frequency: 30, q: Math.SQRT1_2, enabled: true }];
    const p = quantizeProfile('Q1.15')!;
    p.number = { ...p.number, integerBits: 2, fractionBits: 14 } as typeof p.number;
    const l = list(plan, p);
    const s = l.outputs[0].sections[0];
    expect(s.ideal.b0).toBeGreaterThan(3.7e-6);
    expect(s.ideal.b0).toBeLessThan(3.9e-6);
    expect(s.quantized.b0).toBe(0); // 3.8e-6 * 2^14 = 0.06 rounds to 0: the section is silent
    const c = compareOutput(l.outputs[0], [30], l.sampleRate);
    expect(c.quantized.magnitudeDb[0]).toBe(-Infinity);
  });
});
