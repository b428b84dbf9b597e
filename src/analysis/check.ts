/**
 * The warnings a user must see about a plan: headroom (boost), instability, frequencies close to
 * Nyquist, and a high-frequency output with no high-pass edge (a tweeter fed full-range bass can
 * be destroyed). `check` on the command line and the app's status bar print these.
 */
import { designInput, designOutput, type DesignedOutput } from '../design/chain';
import { MONOTONIC_SHELF_SLOPE } from '../design/cookbook';
import type { Band, Output, Plan } from '../plan/types';
import { headroom, type Headroom } from './headroom';
import { largestPoleRadius } from './poles';
import { worstCasePeak, type WorstCase } from './worst-case';
import { formatFrequency } from '../ui/units';

export type Severity = 'info' | 'warning' | 'danger';

export interface Warning {
  severity: Severity;
  /** Stable identifier of the kind of warning, for tests and the UI. */
  code: 'headroom' | 'unstable' | 'near-nyquist' | 'no-high-pass' | 'marginal-stability' | 'shelf-overshoot';
  /** Where: "input", an output id, or a field path. */
  where: string;
  message: string;
}

/** A frequency above this fraction of Nyquist is flagged: the bilinear transform cramps it. */
export const NEAR_NYQUIST_FRACTION = 0.9;
/** A pole radius above this is flagged as marginal (common practice, no source: low-frequency sections at high rates sit near 0.999). */
export const MARGINAL_POLE_RADIUS = 0.99999;
/** Boost below this is rounding, not headroom loss (a Linkwitz-Riley high-pass peaks at +1e-10 dB). */
export const HEADROOM_WARN_DB = 0.01;

export interface OutputAnalysis {
  id: string;
  /** Sine peak over 0 Hz .. Nyquist. */
  headroom: Headroom;
  /** Peak for any input bounded by full scale (sum |h|); never below the sine peak. */
  worstCase: WorstCase;
  largestPoleRadius: number;
  stable: boolean;
}

export interface PlanAnalysis {
  outputs: OutputAnalysis[];
  warnings: Warning[];
}

const HIGH_WORDS = /(tweet|treble|horn|high|^hf|_hf|-hf|\bhf\b|top|compression)/i;

/**
 * An output is treated as high-frequency when its name or id says so, or when it has no low-pass
 * edge while another output has one (it is the top way).
 */
export function looksHighFrequency(plan: Plan, out: Output): boolean {
  if (HIGH_WORDS.test(out.id) || HIGH_WORDS.test(out.name)) return true;
  if (plan.outputs.length < 2) return false;
  return out.lowPass === null && plan.outputs.some((o) => o !== out && o.lowPass !== null);
}

/** An enabled high-pass band (cookbook 2nd order or 1st order) of the output's own chain also protects its driver. */
function hasHighPassBand(out: Output): boolean {
  return out.bands.some((b) => b.enabled && (b.type === 'highPass' || b.type === 'highPass1'));
}

/** Frequencies above this are flagged near Nyquist. */
function nearNyquistLimit(plan: Plan): number {
  return NEAR_NYQUIST_FRACTION * (plan.sampleRate / 2);
}

/**
 * Shelves set by a slope above S = 1 overshoot: the cookbook's S = 1 is the steepest slope that
 * keeps the shelf monotonic; steeper ones bump above the shelf gain and dip below 0 dB before it.
 */
function steepShelves(bands: Band[], where: string, warnings: Warning[]): void {
  for (const b of bands) {
    if (b.enabled && (b.type === 'lowShelf' || b.type === 'highShelf') && b.q === undefined && (b.slope ?? 1) > MONOTONIC_SHELF_SLOPE) {
      warnings.push({
        severity: 'warning',
        code: 'shelf-overshoot',
        where: `${where}/${b.id}`,
        message: `band ${b.id} has shelf slope S ${b.slope}: above S = ${MONOTONIC_SHELF_SLOPE} a shelf overshoots its gain (Audio EQ Cookbook); check its peak in the headroom`,
      });
    }
  }
}

function nearNyquist(plan: Plan, bands: Band[], where: string, warnings: Warning[]): void {
  const limit = nearNyquistLimit(plan);
  for (const b of bands) {
    if (b.enabled && b.type !== 'raw' && b.frequency > limit) {
      warnings.push({
        severity: 'warning',
        code: 'near-nyquist',
        where: `${where}/${b.id}`,
        message: `band ${b.id} at ${fmtHz(b.frequency)} is within ${Math.round((1 - NEAR_NYQUIST_FRACTION) * 100)}% of Nyquist (${fmtHz(plan.sampleRate / 2)}): its shape is cramped by the bilinear transform`,
      });
    }
  }
}

/** Frequencies in warnings read as in the app's fields ("63 Hz", "2.2 kHz"): `formatFrequency`. */
export const fmtHz = formatFrequency;

/** The frequencies of an output's enabled bands and edges (input chain included): where the peak search looks closely. */
export function bandFrequencies(plan: Plan, out: Output): number[] {
  const bands = [...plan.input.bands, ...out.bands].filter((b) => b.enabled && b.type !== 'raw').map((b) => b.frequency);
  for (const e of [out.highPass, out.lowPass]) if (e) bands.push(e.frequency);
  return bands;
}

export function analyzeOutput(plan: Plan, d: DesignedOutput): OutputAnalysis {
  const r = largestPoleRadius(d.sections);
  const out = plan.outputs.find((o) => o.id === d.id);
  const hints = out ? bandFrequencies(plan, out) : [];
  return {
    id: d.id,
    headroom: headroom(d.sections, d.gain, plan.sampleRate, hints),
    worstCase: worstCasePeak(d.sections, d.gain),
    largestPoleRadius: r,
    // NaN-safe: a radius that cannot be computed is not "stable".
    stable: r < 1,
  };
}

/** A dB figure for messages: "+20.02 dB", "unbounded" for an infinite gain. */
export function dbText(db: number): string {
  if (Number.isNaN(db)) return 'not computable';
  if (!Number.isFinite(db)) return db > 0 ? 'unbounded' : 'no output';
  return `${db >= 0 ? '+' : ''}${db.toFixed(2)} dB`;
}

/** Where a peak lies, with a note when it is outside the audio band. */
export function peakPlaceText(h: Headroom): string {
  return `${fmtHz(h.frequencyHz)}${h.outsideAudioBand ? ' (outside 20 Hz - 20 kHz)' : ''}`;
}

function hasRawBands(plan: Plan, o: Output): boolean {
  return [...plan.input.bands, ...o.bands].some((b) => b.enabled && b.type === 'raw');
}

export function analyzePlan(plan: Plan): PlanAnalysis {
  const warnings: Warning[] = [];
  const input = designInput(plan);
  const outputs = plan.outputs.map((o) => analyzeOutput(plan, designOutput(plan, o, input)));

  nearNyquist(plan, plan.input.bands, 'input', warnings);
  steepShelves(plan.input.bands, 'input', warnings);
  plan.outputs.forEach((o, i) => {
    const a = outputs[i];
    if (!a.stable) {
      warnings.push({
        severity: 'danger',
        code: 'unstable',
        where: o.id,
        message: `output ${o.id} is unstable: a pole lies at radius ${Number.isFinite(a.largestPoleRadius) ? a.largestPoleRadius.toFixed(6) : 'that cannot be computed'} (>= 1)${hasRawBands(plan, o) ? '; check its raw bands' : '; check its shelf slopes and Q values'}`,
      });
    } else if (a.largestPoleRadius > MARGINAL_POLE_RADIUS) {
      warnings.push({
        severity: 'warning',
        code: 'marginal-stability',
        where: o.id,
        message: `output ${o.id} has a pole at radius ${a.largestPoleRadius.toFixed(7)}: fixed-point coefficients may make it unstable`,
      });
    }
    // NaN-safe: a peak that cannot be computed warns as loudly as a large one.
    if (!(a.headroom.peakDb <= HEADROOM_WARN_DB)) {
      warnings.push({
        severity: !(a.headroom.peakDb <= 6) ? 'danger' : 'warning',
        code: 'headroom',
        where: o.id,
        message: `output ${o.id} boosts ${dbText(a.headroom.peakDb)} at ${peakPlaceText(a.headroom)}: a full-scale input clips; lower the input level or the gain by that much`,
      });
    }
    for (const edge of [o.highPass, o.lowPass]) {
      if (edge && edge.frequency > nearNyquistLimit(plan)) {
        warnings.push({
          severity: 'warning',
          code: 'near-nyquist',
          where: o.id,
          message: `output ${o.id}: an edge at ${fmtHz(edge.frequency)} is close to Nyquist (${fmtHz(plan.sampleRate / 2)})`,
        });
      }
    }
    nearNyquist(plan, o.bands, o.id, warnings);
    steepShelves(o.bands, o.id, warnings);
    if (!o.highPass && !hasHighPassBand(o) && looksHighFrequency(plan, o)) {
      warnings.push({
        severity: 'danger',
        code: 'no-high-pass',
        where: o.id,
        message: `output ${o.id} looks like a high-frequency way but has no high-pass edge or high-pass band: low frequencies can destroy its driver`,
      });
    }
  });
  return { outputs, warnings };
}
