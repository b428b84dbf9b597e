/**
 * The plan model: the in-memory shape is the file shape of `*.bqplan` version 1
 * (see DEVELOPERS.md, "Plan file"), with every default filled in by the reader.
 * Units are in the names' documentation: Hz, dB (20 log10), ms.
 */

export const PLAN_FORMAT = 'biquadrant.plan';
/** The newest plan version this build writes. */
export const PLAN_VERSION = 1;

export type BandType =
  | 'peaking'
  | 'lowShelf'
  | 'highShelf'
  | 'lowPass'
  | 'highPass'
  | 'bandPass'
  | 'notch'
  | 'allPass'
  | 'lowPass1'
  | 'highPass1'
  | 'allPass1'
  | 'raw';

export const BAND_TYPES: readonly BandType[] = [
  'peaking',
  'lowShelf',
  'highShelf',
  'lowPass',
  'highPass',
  'bandPass',
  'notch',
  'allPass',
  'lowPass1',
  'highPass1',
  'allPass1',
  'raw',
];

/** Raw coefficients as the user typed them; the designer divides by a0. */
export interface RawCoefficients {
  b0: number;
  b1: number;
  b2: number;
  a0: number;
  a1: number;
  a2: number;
}

export interface Band {
  /** Unique within its chain. */
  id: string;
  type: BandType;
  /** Hz, 0 < f < sampleRate / 2 (not used by `raw`). */
  frequency: number;
  /** dB, peaking and shelves. */
  gainDb?: number;
  /** Quality factor; for shelves it wins over `slope` when both are given. */
  q?: number;
  /** Shelf slope S of the Audio EQ Cookbook, shelves only. */
  slope?: number;
  /** A disabled band stays in the plan and is left out of every response. */
  enabled: boolean;
  /** `raw` only. */
  coefficients?: RawCoefficients;
}

export type CrossoverFamily = 'butterworth' | 'linkwitz-riley' | 'bessel';
export const CROSSOVER_FAMILIES: readonly CrossoverFamily[] = ['butterworth', 'linkwitz-riley', 'bessel'];

export type BesselNormalization = 'phase' | 'delay' | 'magnitude';
export const BESSEL_NORMALIZATIONS: readonly BesselNormalization[] = ['phase', 'delay', 'magnitude'];

/** An edge: one crossover filter of an output. */
export interface Crossover {
  family: CrossoverFamily;
  /** 1..8; linkwitz-riley 2, 4, 6 or 8. */
  order: number;
  /** Hz: -3.01 dB (butterworth), -6.02 dB (linkwitz-riley), per `normalization` (bessel). */
  frequency: number;
  /** Bessel only; the reader fills in "phase" for a bessel edge. */
  normalization?: BesselNormalization;
}

export type EdgeKind = 'highPass' | 'lowPass';

/** One way of the system. Signal order: input bands, highPass, lowPass, bands, gain, polarity, delay. */
export interface Output {
  id: string;
  name: string;
  gainDb: number;
  /** >= 0, a pure delay (not rounded to samples in the response). */
  delayMs: number;
  /** Polarity inversion. */
  invert: boolean;
  /** A muted output is left out of the sum. */
  mute: boolean;
  highPass: Crossover | null;
  lowPass: Crossover | null;
  bands: Band[];
}

export interface Plan {
  format: typeof PLAN_FORMAT;
  version: number;
  name: string;
  notes?: string;
  /** Hz, 8000 .. 384000. */
  sampleRate: number;
  input: { bands: Band[] };
  /** 1 .. 16 outputs. */
  outputs: Output[];
}

/** Limits of the plan contract, shared by the validator and the UI's parameter metadata. */
export const LIMITS = {
  sampleRateMinHz: 8000,
  sampleRateMaxHz: 384000,
  outputsMin: 1,
  outputsMax: 16,
  bandsMax: 64,
  orderMin: 1,
  orderMax: 8,
  linkwitzRileyOrders: [2, 4, 6, 8] as readonly number[],
  gainDbAbsMax: 60,
  outputGainDbAbsMax: 60,
  qMax: 1000,
  delayMsMax: 10000,
  idPattern: /^[a-z0-9_-]{1,32}$/,
  bandIdMaxLength: 32,
  nameMaxLength: 200,
} as const;
