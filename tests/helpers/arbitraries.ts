/**
 * fast-check arbitraries of valid plans (every field inside the contract of docs/plan-format.md
 * and src/plan/read.ts), shaped as the reader returns them: every default filled in.
 */
import fc from 'fast-check';
import {
  BAND_TYPES,
  BESSEL_NORMALIZATIONS,
  COEFFICIENT_NAMES,
  LIMITS,
  PLAN_FORMAT,
  PLAN_VERSION,
  type Band,
  type BoardProfile,
  type CoefficientName,
  type Crossover,
  type NumberFormat,
  type Output,
  type Plan,
} from '../../src/plan/types';

/** A double in [min, max] with no -0 (JSON writes -0 as 0; that case has its own test). */
const num = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true }).map((x) => (Object.is(x, -0) ? 0 : x));

/** A frequency strictly inside the reader's range: 2e-6 fs .. fs/2 - 2e-6 fs. */
const frequency = (fs: number) =>
  fc.oneof(
    fc.constantFrom(20, 100, 1000, 2200).filter((f) => f < 0.45 * fs),
    num(2e-6, 0.5 - 2e-6).map((r) => r * fs),
  );

const text = (max: number) => fc.string({ maxLength: Math.min(max, 40), unit: 'grapheme' });

export function bandArb(fs: number, id: string): fc.Arbitrary<Band> {
  return fc
    .record(
      {
        type: fc.constantFrom(...BAND_TYPES),
        frequency: frequency(fs),
        gainDb: fc.option(num(-LIMITS.gainDbAbsMax, LIMITS.gainDbAbsMax), { nil: undefined }),
        q: fc.option(num(LIMITS.qMin, LIMITS.qMax), { nil: undefined }),
        // Any S in (0, 1] is inside the cookbook limit of every gain (the limit is >= 1).
        slope: fc.option(num(LIMITS.slopeMin, 1), { nil: undefined }),
        enabled: fc.boolean(),
        coefficients: fc.record({
          b0: num(-10, 10),
          b1: num(-10, 10),
          b2: num(-10, 10),
          a0: fc.oneof(num(0.1, 10), num(-10, -0.1)),
          a1: num(-10, 10),
          a2: num(-10, 10),
        }),
      },
      { requiredKeys: ['type', 'frequency', 'enabled', 'coefficients'] },
    )
    .map((r) => {
      const b: Band = { id, type: r.type, frequency: r.frequency, enabled: r.enabled };
      if (r.gainDb !== undefined) b.gainDb = r.gainDb;
      if (r.q !== undefined) b.q = r.q;
      if (r.slope !== undefined) b.slope = r.slope;
      if (r.type === 'raw') b.coefficients = r.coefficients;
      return b;
    });
}

export function edgeArb(fs: number): fc.Arbitrary<Crossover | null> {
  return fc.option(
    fc.oneof(
      fc.record({ family: fc.constant('butterworth' as const), order: fc.integer({ min: 1, max: 8 }), frequency: frequency(fs) }),
      fc.record({ family: fc.constant('linkwitz-riley' as const), order: fc.constantFrom(2, 4, 6, 8), frequency: frequency(fs) }),
      fc.record({
        family: fc.constant('bessel' as const),
        order: fc.integer({ min: 1, max: 8 }),
        frequency: frequency(fs),
        normalization: fc.constantFrom(...BESSEL_NORMALIZATIONS),
      }),
    ),
    { nil: null },
  );
}

function bandsArb(fs: number, max: number): fc.Arbitrary<Band[]> {
  return fc.uniqueArray(fc.stringMatching(/^[A-Za-z0-9 _.-]{1,12}$/), { maxLength: max }).chain((ids) => (ids.length ? fc.tuple(...ids.map((id) => bandArb(fs, id))) : fc.constant([])));
}

function outputArb(fs: number, id: string): fc.Arbitrary<Output> {
  return fc.record({
    id: fc.constant(id),
    name: text(LIMITS.nameMaxLength),
    gainDb: num(-LIMITS.outputGainDbAbsMax, LIMITS.outputGainDbAbsMax),
    delayMs: num(0, LIMITS.delayMsMax),
    invert: fc.boolean(),
    mute: fc.boolean(),
    highPass: edgeArb(fs),
    lowPass: edgeArb(fs),
    bands: bandsArb(fs, 4),
  });
}

export const profileArb: fc.Arbitrary<BoardProfile> = fc
  .record({
    name: text(LIMITS.nameMaxLength),
    sampleRate: fc.option(fc.integer({ min: LIMITS.sampleRateMinHz, max: LIMITS.sampleRateMaxHz }), { nil: null }),
    writeA0: fc.boolean(),
    perm: fc.shuffledSubarray(['b0', 'b1', 'b2', 'a1', 'a2'] as CoefficientName[], { minLength: 5, maxLength: 5 }),
    a0At: fc.option(fc.integer({ min: 0, max: 5 }), { nil: null }),
    feedbackSign: fc.constantFrom('as-computed' as const, 'negated' as const),
    number: fc.oneof(
      fc.record({ kind: fc.constant('decimal' as const), significantDigits: fc.option(fc.integer({ min: 1, max: LIMITS.significantDigitsMax }), { nil: null }) }),
      fc
        .record({ wordBits: fc.integer({ min: LIMITS.wordBitsMin, max: LIMITS.wordBitsMax }), i: fc.double({ min: 0, max: 1, noNaN: true }), f: fc.double({ min: 0, max: 1, noNaN: true }), notation: fc.constantFrom('decimal' as const, 'hex' as const) })
        .map(({ wordBits, i, f, notation }): NumberFormat => {
          const integerBits = 1 + Math.floor(i * (wordBits - 1));
          const fractionBits = Math.min(wordBits - 1, Math.floor(f * (wordBits - integerBits + 1)), wordBits - integerBits);
          return { kind: 'fixed', integerBits, fractionBits, wordBits, notation };
        }),
    ),
    scaleLog2: fc.integer({ min: -LIMITS.coefficientScaleLog2Max, max: LIMITS.coefficientScaleLog2Max }),
    gain: fc.constantFrom('separate' as const, 'first-section' as const),
    delayUnit: fc.constantFrom('samples' as const, 'ms' as const),
    maxDelaySamples: fc.option(fc.integer({ min: 0, max: LIMITS.maxDelaySamplesMax }), { nil: null }),
    sectionBudget: fc.integer({ min: 1, max: LIMITS.sectionBudgetMax }),
  })
  .map((r) => {
    const order: CoefficientName[] = [...r.perm];
    if (r.writeA0 && r.a0At !== null) order.splice(r.a0At, 0, 'a0');
    expectNames(order);
    return {
      name: r.name,
      sampleRate: r.sampleRate,
      order,
      feedbackSign: r.feedbackSign,
      writeA0: r.writeA0,
      number: r.number,
      coefficientScale: Math.pow(2, r.scaleLog2),
      gain: r.gain,
      delayUnit: r.delayUnit,
      maxDelaySamples: r.maxDelaySamples,
      sectionBudget: r.sectionBudget,
    };
  });

function expectNames(order: CoefficientName[]): void {
  for (const n of order) if (!COEFFICIENT_NAMES.includes(n)) throw new Error(`bad name ${n}`);
}

export const planArb: fc.Arbitrary<Plan> = fc
  .record({
    sampleRate: fc.oneof(fc.constantFrom(44100, 48000, 96000, 192000), num(LIMITS.sampleRateMinHz, LIMITS.sampleRateMaxHz)),
    ids: fc.uniqueArray(fc.stringMatching(/^[a-z0-9_-]{1,8}$/), { minLength: 1, maxLength: 4 }),
    name: text(LIMITS.nameMaxLength),
    notes: fc.option(fc.string({ maxLength: 60 }), { nil: undefined }),
    withProfile: fc.boolean(),
  })
  .chain(({ sampleRate, ids, name, notes, withProfile }) =>
    fc
      .record({
        input: bandsArb(sampleRate, 3),
        outputs: fc.tuple(...ids.map((id) => outputArb(sampleRate, id))),
        profile: withProfile ? profileArb : fc.constant(undefined),
      })
      .map(({ input, outputs, profile }) => {
        const plan: Plan = { format: PLAN_FORMAT, version: PLAN_VERSION, name, sampleRate, input: { bands: input }, outputs };
        if (notes !== undefined) plan.notes = notes;
        if (profile !== undefined) plan.profile = profile;
        return plan;
      }),
  );
