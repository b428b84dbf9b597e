/**
 * Coefficient sensitivity of each section in a board's number format, and the form the board
 * should run it in.
 *
 * A low-frequency section at a high rate has its poles close to z = 1: with w0 = 2 pi f / fs,
 * 1 + a1 + a2 is about w0^2 (4.3e-7 for 20 Hz at 192 kHz) while a1 is about -2. One step of the
 * format (2^-23 in Q5.23) is then a large part of the section's whole gain at DC and moves its pole
 * frequency by several per cent. The figures here are of the coefficients the board holds
 * (rounded as the export rounds them, docs/plan-format.md "What an export does with it"):
 * - the pole pair's natural frequency and Q, exact and as rounded (poles mapped to s by
 *   s = fs ln z), and the frequency error in per cent;
 * - the largest magnitude error of the rounded section over 20 Hz - 20 kHz.
 * Recommended forms (common practice, no single source; docs/references.md "Fixed-point
 * coefficients"): the direct form as exported when the error is small; otherwise coefficients in
 * double precision (two words each) or a low-sensitivity form that holds 1 + a1 + a2 and 1 - a2
 * directly; and, for poles within 1e-3 of the unit circle, error feedback (noise shaping of the
 * state's rounding), since the rounding noise a direct form adds grows as the poles near z = 1.
 */
import type { Section } from '../design/section';
import type { Band, BoardProfile, Plan } from '../plan/types';
import type { SourcedSection } from '../design/chain';
import { designBandBy } from '../design/band';
import { designEdge } from '../design/crossover';
import { diagnostic, type Diagnostic } from '../diagnostics';
import { fromFixed, toFixed } from './fixed';
import { largestDeviation, sectionsMagnitudeDb, crampingGrid } from '../analysis/cramping';
import { ERROR_FEEDBACK_RADIUS, SENSITIVITY_ERROR_DB, SENSITIVITY_FREQUENCY_PERCENT } from '../analysis/thresholds';

export type SectionForm = 'direct' | 'double-precision' | 'error-feedback';

export interface SectionSensitivity {
  from: string;
  /** The pole pair's (or real poles') natural frequency in Hz and Q, exact and as the board holds them. */
  poleFrequencyHz: number;
  poleQ: number;
  heldPoleFrequencyHz: number;
  heldPoleQ: number;
  /** (held - exact) / exact, per cent. */
  frequencyErrorPercent: number;
  /** Largest |held - exact| magnitude over 20 Hz - 20 kHz, dB. */
  largestErrorDb: number;
  /** Largest pole radius (exact). */
  poleRadius: number;
  form: SectionForm;
}

/** The value the board holds for a coefficient under a profile (scale and rounding undone). */
export function heldCoefficient(x: number, p: BoardProfile): number {
  const n = p.number;
  if (n.kind === 'decimal') return n.significantDigits === null ? x : Number(x.toPrecision(n.significantDigits));
  const scaled = x * p.coefficientScale;
  return fromFixed(toFixed(scaled, n).integer, n) / p.coefficientScale;
}

export function heldSection(s: Section, p: BoardProfile): Section {
  return { b0: heldCoefficient(s.b0, p), b1: heldCoefficient(s.b1, p), b2: heldCoefficient(s.b2, p), a1: heldCoefficient(s.a1, p), a2: heldCoefficient(s.a2, p) };
}

/** Natural frequency (Hz) and Q of the poles of 1 + a1 z^-1 + a2 z^-2, mapped to s = fs ln z. */
export function poleFrequencyAndQ(a1: number, a2: number, sampleRateHz: number): { frequencyHz: number; q: number; radius: number } {
  const disc = a1 * a1 - 4 * a2;
  if (a2 === 0) {
    // One real pole at -a1.
    const r = Math.abs(a1);
    return { frequencyHz: (-Math.log(r) * sampleRateHz) / (2 * Math.PI), q: 0.5, radius: r };
  }
  if (disc < 0) {
    const r = Math.sqrt(a2);
    const theta = Math.acos(Math.max(-1, Math.min(1, -a1 / (2 * r))));
    const sigma = -Math.log(r) * sampleRateHz;
    const omega = theta * sampleRateHz;
    const w = Math.hypot(sigma, omega);
    return { frequencyHz: w / (2 * Math.PI), q: w / (2 * sigma), radius: r };
  }
  const sq = Math.sqrt(disc);
  const z1 = (-a1 + sq) / 2;
  const z2 = (-a1 - sq) / 2;
  const s1 = -Math.log(Math.abs(z1)) * sampleRateHz;
  const s2 = -Math.log(Math.abs(z2)) * sampleRateHz;
  const w = Math.sqrt(Math.abs(s1 * s2));
  return { frequencyHz: w / (2 * Math.PI), q: w / (s1 + s2), radius: Math.max(Math.abs(z1), Math.abs(z2)) };
}

export function sectionSensitivity(s: SourcedSection, p: BoardProfile, sampleRateHz: number, grid = crampingGrid(sampleRateHz)): SectionSensitivity {
  const held = heldSection(s, p);
  const exact = poleFrequencyAndQ(s.a1, s.a2, sampleRateHz);
  const h = poleFrequencyAndQ(held.a1, held.a2, sampleRateHz);
  const err = largestDeviation(sectionsMagnitudeDb([held], grid, sampleRateHz), sectionsMagnitudeDb([s], grid, sampleRateHz), grid);
  const frequencyErrorPercent = ((h.frequencyHz - exact.frequencyHz) / exact.frequencyHz) * 100;
  const coarse = !(Math.abs(err.deviationDb) <= SENSITIVITY_ERROR_DB) || !(Math.abs(frequencyErrorPercent) <= SENSITIVITY_FREQUENCY_PERCENT);
  const form: SectionForm = coarse ? 'double-precision' : exact.radius > ERROR_FEEDBACK_RADIUS && p.number.kind === 'fixed' ? 'error-feedback' : 'direct';
  return {
    from: s.from,
    poleFrequencyHz: exact.frequencyHz,
    poleQ: exact.q,
    heldPoleFrequencyHz: h.frequencyHz,
    heldPoleQ: h.q,
    frequencyErrorPercent,
    largestErrorDb: Math.abs(err.deviationDb),
    poleRadius: exact.radius,
    form,
  };
}

export interface ItemSensitivity extends SectionSensitivity {
  target: { kind: 'band'; chain: string; bandId: string } | { kind: 'edge'; outputId: string; edge: 'highPass' | 'lowPass' };
  /** Some coefficient saturates in the format (the export flags it; the figures above are then not meaningful). */
  saturated: boolean;
}

const FORM_RANK: Record<SectionForm, number> = { direct: 0, 'error-feedback': 1, 'double-precision': 2 };

function saturates(s: Section, p: BoardProfile): boolean {
  const n = p.number;
  if (n.kind !== 'fixed') return false;
  return [s.b0, s.b1, s.b2, s.a1, s.a2].some((x) => toFixed(x * p.coefficientScale, n).saturation !== 'none');
}

/**
 * Each band's and edge's sections in the board profile, the one needing the most (then the
 * largest frequency error) standing for the item, in plan order (input bands once).
 */
export function planSensitivity(plan: Plan, profile: BoardProfile): ItemSensitivity[] {
  const fs = plan.sampleRate;
  const grid = crampingGrid(fs);
  const out: ItemSensitivity[] = [];
  const add = (sections: Section[], from: string, target: ItemSensitivity['target']) => {
    let worst: ItemSensitivity | null = null;
    for (const s of sections) {
      const x: ItemSensitivity = { ...sectionSensitivity({ ...s, from }, profile, fs, grid), target, saturated: saturates(s, profile) };
      if (!worst || FORM_RANK[x.form] > FORM_RANK[worst.form] || (FORM_RANK[x.form] === FORM_RANK[worst.form] && Math.abs(x.frequencyErrorPercent) > Math.abs(worst.frequencyErrorPercent))) worst = x;
    }
    if (worst) out.push(worst);
  };
  const bands = (chain: string, list: readonly Band[]) => {
    for (const b of list) if (b.enabled && b.type !== 'raw') add(designBandBy(b, fs, plan.defaultDesign), `${chain}/${b.id}`, { kind: 'band', chain, bandId: b.id });
  };
  bands('input', plan.input.bands);
  for (const o of plan.outputs) {
    for (const kind of ['highPass', 'lowPass'] as const) {
      const e = o[kind];
      if (e) add(designEdge(e, kind, fs), `${o.id}/${kind}`, { kind: 'edge', outputId: o.id, edge: kind });
    }
    bands(o.id, o.bands);
  }
  return out;
}

/** The items a board's number format does not hold well, as `check` diagnostics (saturation is the export's own flag). */
export function sensitivityDiagnostics(plan: Plan): Diagnostic<'coefficient-sensitivity'>[] {
  if (!plan.profile) return [];
  return planSensitivity(plan, plan.profile)
    .filter((x) => x.form !== 'direct' && !x.saturated)
    .map((x) =>
      diagnostic('coefficient-sensitivity', x.form === 'double-precision' ? 'warning' : 'info', x.target, {
        form: x.form as 'error-feedback' | 'double-precision',
        frequencyErrorPercent: x.frequencyErrorPercent,
        largestErrorDb: x.largestErrorDb,
        poleRadius: x.poleRadius,
        profileName: plan.profile!.name,
      }),
    );
}
