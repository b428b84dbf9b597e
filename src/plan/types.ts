/**
 * The plan model: the in-memory shape is the file shape of `*.bqplan` version 3
 * (docs/plan-format.md), with every default filled in by the reader. Version 2 adds the optional
 * board profile, version 3 the measurements, the outputs' driver measurements, acoustic offsets
 * and export names, and the air temperature; older files are migrated on reading (migrate.ts).
 * Units are in the names' documentation: Hz, dB (20 log10), ms, mm, degrees Celsius.
 */

export const PLAN_FORMAT = 'biquadrant.plan';
/** The newest plan version this build writes. */
export const PLAN_VERSION = 3;

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
  /** Version 3: how the band becomes a section; absent: the plan's `defaultDesign`, else "bilinear". */
  design?: DesignMethod;
  /** Version 3: placed by the fitter (a later fit of the same chain replaces it unless locked); absent: false. */
  fitted?: boolean;
  /** Version 3: a fit keeps this band exactly as it is; absent: false. */
  locked?: boolean;
}

/**
 * How a band becomes a digital section: "bilinear", the Audio EQ Cookbook's bilinear transform
 * (the default); "matched", a section whose magnitude follows the analog prototype up to Nyquist
 * (src/design/matched.ts).
 */
export type DesignMethod = 'bilinear' | 'matched';
export const DESIGN_METHODS: readonly DesignMethod[] = ['bilinear', 'matched'];
/** The band types with a matched design; the others stay bilinear. */
export const MATCHED_DESIGN_TYPES: readonly BandType[] = ['peaking', 'lowShelf', 'highShelf', 'lowPass', 'highPass', 'bandPass', 'notch'];

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
  /**
   * Version 3: the identifier exports use for this output (a C identifier, unique in the plan
   * ignoring case). Absent: a slug of `name` (export-name.ts), so it follows renames.
   */
  exportName?: string;
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
  /** Version 3: the id of the measurement of this output's driver alone (through no filter); absent: none. */
  driverMeasurementId?: string;
  /** Version 3: the driver's extra distance or time to the listening point; absent: 0. */
  acousticOffset?: AcousticOffset;
}

/**
 * An output's acoustic offset: positive when its driver is farther from the listening point (its
 * sound arrives later), negative when nearer. Millimetres become time through the plan's speed of
 * sound (`airTemperatureC`).
 */
export interface AcousticOffset {
  value: number;
  unit: 'mm' | 'ms';
}
export const ACOUSTIC_OFFSET_UNITS: readonly AcousticOffset['unit'][] = ['mm', 'ms'];

/** Where a measurement came from: the file's name (no folder) and how it was read. */
export interface MeasurementSource {
  /** The file name without any folder, 0..255 characters ("" when unknown). */
  fileName: string;
  /** "text": columns of numbers; "wav": an impulse response; "generated": computed from a model (the notes say which). */
  kind: MeasurementKind;
}
export type MeasurementKind = 'text' | 'wav' | 'generated';
export const MEASUREMENT_KINDS: readonly MeasurementKind[] = ['text', 'wav', 'generated'];

/** Version 3: a measurement kept in the plan, referenced by outputs (driver) or the plan (system). */
export interface Measurement extends MeasuredResponse {
  /** Unique among the plan's measurements, [a-z0-9_-]{1,32}. */
  id: string;
  source: MeasurementSource;
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
  /** Version 2: how the plan's DSP board wants its coefficients; absent when none is chosen. */
  profile?: BoardProfile;
  /** Version 3: degrees Celsius, for the speed of sound of acoustic offsets in mm; absent: 20. */
  airTemperatureC?: number;
  /** Version 3: the plan's measurements (driver and system); absent: none. */
  measurements?: Measurement[];
  /** Version 3: ids of the measurements of the whole system or the room (not of one driver). */
  systemMeasurementIds?: string[];
  /** Version 3: the design method of bands that name none; absent: "bilinear". */
  defaultDesign?: DesignMethod;
  /** Version 3: the response fits aim for, at most one per output and one for the system. */
  targets?: Target[];
}

/**
 * One piece of a target curve, in dB; a target is the sum of its parts (docs/fitting.md).
 * `points`: [frequency Hz, dB] pairs, straight lines on log f, constant beyond the ends.
 * `crossover`: the magnitude of the output's own edges (its electrical crossover shape).
 */
export type TargetPart =
  | { kind: 'flat' }
  | { kind: 'tilt'; dbPerOctave: number; pivotHz: number }
  | { kind: 'lowShelf' | 'highShelf'; frequency: number; gainDb: number }
  | { kind: 'points'; points: [number, number][] }
  | { kind: 'crossover' };
export type TargetPartKind = TargetPart['kind'];
export const TARGET_PART_KINDS: readonly TargetPartKind[] = ['flat', 'tilt', 'lowShelf', 'highShelf', 'points', 'crossover'];

/** Version 3: what a fit of an output (its acoustic response) or of the system aims for. */
export interface Target {
  scope: 'output' | 'system';
  /** The output, when `scope` is "output". */
  outputId?: string;
  parts: TargetPart[];
  /** How the target's level is aligned to the response over the range when `levelDb` is absent. */
  alignment: 'mean' | 'median';
  /** dB added to the target's shape; absent: found by `alignment`. */
  levelDb?: number;
  /** Hz, the range of the fit; absent: 20 Hz and 20 kHz, within the measurement and the audio band. */
  fromHz?: number;
  toHz?: number;
  /** dB, the tolerance drawn around the target and reported against (default 1). */
  toleranceDb: number;
}

/** The air temperature a plan without one uses, degrees Celsius. */
export const DEFAULT_AIR_TEMPERATURE_C = 20;

/** A coefficient's name in a board's list. `a0` is written only when the profile says so. */
export type CoefficientName = 'b0' | 'b1' | 'b2' | 'a0' | 'a1' | 'a2';
export const COEFFICIENT_NAMES: readonly CoefficientName[] = ['b0', 'b1', 'b2', 'a0', 'a1', 'a2'];

/**
 * How a board wants numbers written.
 * - `decimal`: `significantDigits` 1..17, or null for the shortest decimal that reads back to the
 *   same double (exact round trip).
 * - `fixed`: Qm.n, m = `integerBits` (sign included, >= 1), n = `fractionBits`, m + n <= `wordBits`
 *   (16..32); integers written as signed decimal or as two's-complement hex of the word width.
 */
export type NumberFormat =
  | { kind: 'decimal'; significantDigits: number | null }
  | { kind: 'fixed'; integerBits: number; fractionBits: number; wordBits: number; notation: 'decimal' | 'hex' };

/**
 * A board profile: how one DSP board wants its coefficient list. Exports follow it; the plan's
 * own convention (a section is (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2)) is the default.
 */
export interface BoardProfile {
  name: string;
  /** Hz; null: the plan's rate. A different rate redesigns the plan at this rate on export. */
  sampleRate: number | null;
  /** The order of a section's numbers: a permutation of b0 b1 b2 a1 a2 (and a0 when `writeA0`). */
  order: CoefficientName[];
  /** "as-computed": a1, a2 as in the file convention; "negated": -a1, -a2 (boards that add the feedback terms). */
  feedbackSign: 'as-computed' | 'negated';
  /** Write a0 (always 1 before pre-scaling); inserted before a1 when `order` does not place it. */
  writeA0: boolean;
  number: NumberFormat;
  /** Every written coefficient is multiplied by this power of two (0.5: halved, for boards that shift left by one). */
  coefficientScale: number;
  /** "separate": the output gain is its own number; "first-section": folded into the first section's b0 b1 b2. */
  gain: 'separate' | 'first-section';
  /** How the output delay is written: whole samples (rounded to nearest) or ms. */
  delayUnit: 'samples' | 'ms';
  /** The longest delay the board runs, in samples; null: no limit. */
  maxDelaySamples: number | null;
  /** The most sections the board runs per output (input chain sections included). */
  sectionBudget: number;
}

/** Limits of the plan contract, shared by the validator and the UI's parameter metadata. */
export const LIMITS = {
  sampleRateMinHz: 8000,
  sampleRateMaxHz: 384000,
  outputsMin: 1,
  outputsMax: 16,
  bandsMax: 64,
  /**
   * Sections in one output's signal path (input bands, edge sections, its bands): 64 + 8 + 64, the
   * most a plan within the other limits exports. An output may hold more than `bandsMax` bands
   * (an imported board list of raw sections) as long as its path stays within this, so every
   * export of a valid plan imports back.
   */
  pathSectionsMax: 136,
  orderMin: 1,
  orderMax: 8,
  linkwitzRileyOrders: [2, 4, 6, 8] as readonly number[],
  gainDbAbsMax: 60,
  outputGainDbAbsMax: 60,
  /** Q and shelf slope S: below 0.01 the cookbook's alpha (sin w0 / 2Q) grows past any use, and at 5e-324 it is Infinity (NaN coefficients). */
  qMin: 0.01,
  qMax: 1000,
  slopeMin: 0.01,
  /** Raw coefficients divided by a0. */
  rawCoefficientAbsMax: 1000,
  notesMaxLength: 100000,
  delayMsMax: 10000,
  idPattern: /^[a-z0-9_-]{1,32}$/,
  exportNameMaxLength: 32,
  bandIdMaxLength: 32,
  nameMaxLength: 200,
  /** Board profiles (version 2). */
  wordBitsMin: 16,
  wordBitsMax: 32,
  significantDigitsMax: 17,
  coefficientScaleLog2Max: 8,
  sectionBudgetMax: 1024,
  maxDelaySamplesMax: 16777216,
  /** Measurements (version 3). */
  measurementsMax: 64,
  measurementPointsMin: 2,
  measurementPointsMax: 65536,
  measurementFrequencyMaxHz: 1e6,
  measurementMagnitudeDbAbsMax: 1000,
  /** Unwrapped phase grows with frequency; this only keeps the numbers sane. */
  measurementPhaseDegAbsMax: 1e9,
  measurementDelayMsAbsMax: 10000,
  measurementNotesMax: 32,
  measurementNoteMaxLength: 500,
  fileNameMaxLength: 255,
  /** |acoustic offset|: 100 m, or the time sound takes for it. */
  acousticOffsetMmAbsMax: 100000,
  acousticOffsetMsAbsMax: 300,
  airTemperatureCMin: -40,
  airTemperatureCMax: 60,
  /** Targets (version 3). */
  targetPartsMax: 16,
  targetPointsMax: 4096,
  targetDbAbsMax: 100,
  targetTiltDbPerOctaveAbsMax: 24,
  targetToleranceDbMin: 0.1,
  targetToleranceDbMax: 24,
} as const;

/**
 * A measured response as the importers give it and the plan keeps it: magnitude (and phase, when
 * the source has it) at strictly increasing frequencies. Phase is stored relative to `delayMs`
 * (the excess-phase form): the full phase is phaseDeg - 360 f delayMs / 1000.
 */
export interface MeasuredResponse {
  /** Shown in the legend; by default the file name without its extension. */
  name: string;
  /** Hz, strictly increasing, all > 0. */
  frequencyHz: number[];
  /** dB (20 log10 |H|), one per frequency. */
  magnitudeDb: number[];
  /** Degrees, unwrapped, relative to `delayMs`; null for a magnitude-only measurement. */
  phaseDeg: number[] | null;
  /** True when `phaseDeg` is a minimum-phase estimate from the magnitude, not measured. */
  phaseEstimated: boolean;
  /** ms: the arrival time removed from the phase (0 when the source gives none). */
  delayMs: number;
  /** The first few comment or header lines of the source, kept as notes. */
  notes: string[];
}
