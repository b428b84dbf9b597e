/**
 * Built-in board profiles, named by what they are, and the small helpers every export shares.
 * A plan stores its own profile (version 2); these are starting points. Section budgets of the
 * built-ins are common practice, no source: fixed-point boards often run 10 to 16 biquads per
 * output; the float profile is generous so that nothing is refused by accident.
 */
import { readBoardProfile, PlanError } from '../plan/read';
import { PLAN_FORMAT, type BoardProfile, type CoefficientName } from '../plan/types';
import { qName } from './fixed';

export interface BuiltInProfile {
  /** Short key for the command line (`--profile q5.23`). */
  key: string;
  profile: BoardProfile;
}

const FILE_ORDER: CoefficientName[] = ['b0', 'b1', 'b2', 'a1', 'a2'];

export const BUILT_IN_PROFILES: readonly BuiltInProfile[] = [
  {
    key: 'float',
    profile: {
      name: 'float, a1/a2 as computed',
      sampleRate: null,
      order: [...FILE_ORDER],
      feedbackSign: 'as-computed',
      writeA0: false,
      number: { kind: 'decimal', significantDigits: null },
      coefficientScale: 1,
      gain: 'separate',
      delayUnit: 'samples',
      maxDelaySamples: null,
      sectionBudget: 256,
    },
  },
  {
    key: 'q1.31-negated',
    profile: {
      name: 'Q1.31, negated feedback',
      sampleRate: null,
      order: [...FILE_ORDER],
      feedbackSign: 'negated',
      writeA0: false,
      number: { kind: 'fixed', integerBits: 1, fractionBits: 31, wordBits: 32, notation: 'decimal' },
      coefficientScale: 1,
      gain: 'separate',
      delayUnit: 'samples',
      maxDelaySamples: null,
      sectionBudget: 16,
    },
  },
  {
    key: 'q5.23',
    profile: {
      name: 'Q5.23 in 32-bit words',
      sampleRate: null,
      order: [...FILE_ORDER],
      feedbackSign: 'as-computed',
      writeA0: false,
      number: { kind: 'fixed', integerBits: 5, fractionBits: 23, wordBits: 32, notation: 'hex' },
      coefficientScale: 1,
      gain: 'separate',
      delayUnit: 'samples',
      maxDelaySamples: null,
      sectionBudget: 16,
    },
  },
  {
    key: 'q2.30-halved',
    profile: {
      name: 'Q2.30 with halved coefficients',
      sampleRate: null,
      order: [...FILE_ORDER],
      feedbackSign: 'as-computed',
      writeA0: false,
      number: { kind: 'fixed', integerBits: 2, fractionBits: 30, wordBits: 32, notation: 'decimal' },
      coefficientScale: 0.5,
      gain: 'separate',
      delayUnit: 'samples',
      maxDelaySamples: null,
      sectionBudget: 16,
    },
  },
];

/** The default when a plan has no profile: the file convention, exact decimals. */
export const DEFAULT_PROFILE: BoardProfile = BUILT_IN_PROFILES[0].profile;

/** A deep copy, so edits never reach a built-in. */
export function copyProfile(p: BoardProfile): BoardProfile {
  return { ...p, order: [...p.order], number: { ...p.number } };
}

/** A built-in by key or exact name (case-insensitive), or null. */
export function findBuiltInProfile(nameOrKey: string): BoardProfile | null {
  const k = nameOrKey.trim().toLowerCase();
  const hit = BUILT_IN_PROFILES.find((b) => b.key === k || b.profile.name.toLowerCase() === k);
  return hit ? copyProfile(hit.profile) : null;
}

/**
 * Reads a profile file's parsed JSON: a bare profile object, or a plan whose `profile` is taken.
 * Returns the profile or a `PlanError` with the field path.
 */
export function readProfileValue(value: unknown): { ok: true; profile: BoardProfile } | { ok: false; error: PlanError } {
  try {
    if (typeof value === 'object' && value !== null && !Array.isArray(value) && (value as Record<string, unknown>).format === PLAN_FORMAT) {
      const p = (value as Record<string, unknown>).profile;
      if (p === undefined || p === null) return { ok: false, error: new PlanError('profile', 'this plan has no board profile') };
      return { ok: true, profile: readBoardProfile(p, 'profile') };
    }
    return { ok: true, profile: readBoardProfile(value, '') };
  } catch (e) {
    if (e instanceof PlanError) return { ok: false, error: e };
    throw e;
  }
}

/** The names written for one section, in order: `order`, with a0 put before a1 when written but not placed. */
export function effectiveOrder(p: BoardProfile): CoefficientName[] {
  if (!p.writeA0 || p.order.includes('a0')) return [...p.order];
  const out: CoefficientName[] = [];
  for (const n of p.order) {
    if (n === 'a1') out.push('a0');
    out.push(n);
  }
  return out;
}

/**
 * The one wording of the feedback sign, for every export comment, the C header and the app: what
 * each choice writes and the difference equation the board then runs.
 */
export const FEEDBACK_SIGN_WORDS: Record<BoardProfile['feedbackSign'], { choice: string; written: string; equation: string }> = {
  'as-computed': {
    choice: 'a1, a2 as computed',
    written: 'feedback as computed (a1, a2 written)',
    equation: 'y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] - a1 y[n-1] - a2 y[n-2]',
  },
  negated: {
    choice: 'negated: -a1, -a2 written',
    written: 'feedback negated (-a1, -a2 written)',
    equation: 'y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] + A1 y[n-1] + A2 y[n-2], with A1 = -a1, A2 = -a2 written',
  },
};

/** A section's numbers as the board gets them, each named with its sign: "b0 b1 b2 -a1 -a2" when negated. */
export function writtenNames(p: BoardProfile): string[] {
  return effectiveOrder(p).map((n) => (p.feedbackSign === 'negated' && (n === 'a1' || n === 'a2') ? `-${n}` : n));
}

/** One line that says what a profile does, for comment blocks and the app. */
export function describeProfile(p: BoardProfile, planSampleRate: number): string {
  const rate = p.sampleRate ?? planSampleRate;
  const num =
    p.number.kind === 'decimal'
      ? p.number.significantDigits === null
        ? 'decimal, shortest exact form'
        : `decimal, ${p.number.significantDigits} significant digits`
      : `${qName(p.number)} in ${p.number.wordBits}-bit words, ${p.number.notation === 'hex' ? "two's-complement hex" : 'signed decimal integers'}`;
  const parts = [
    `${rate} Hz`,
    `order ${writtenNames(p).join(' ')}`,
    FEEDBACK_SIGN_WORDS[p.feedbackSign].written,
    num,
  ];
  if (p.coefficientScale !== 1) parts.push(`coefficients x ${p.coefficientScale}`);
  parts.push(p.gain === 'separate' ? 'gain separate' : 'gain folded into the first section');
  parts.push(`delay in ${p.delayUnit}`);
  parts.push(`at most ${p.sectionBudget} sections per output`);
  return parts.join('; ');
}

/** A path-prefixed error when `path` is empty ('' is the whole profile document). */
export function profileErrorText(e: PlanError): string {
  return e.path ? e.message : `profile: ${e.reason}`;
}
