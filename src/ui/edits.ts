/**
 * Edits of a plan as pure functions: each returns a new plan that shares every untouched part
 * with the old one (so a cache keyed on object identity knows what changed), or a reason.
 * Every result goes through the plan reader (`readPlanValue`), so the app never holds a plan
 * the file format would refuse.
 */
import { qFromBandwidthOctaves, DEFAULT_Q } from '../design/cookbook';
import { readPlanValue } from '../plan/read';
import {
  LIMITS,
  PLAN_FORMAT,
  PLAN_VERSION,
  type Band,
  type BandType,
  type Crossover,
  type EdgeKind,
  type Measurement,
  type Output,
  type Plan,
} from '../plan/types';
import { diagnostic, type Diagnostic, type DiagnosticTarget, type RateMisfit } from '../diagnostics';
import { AUDIO_BAND_TOP_FRACTION } from '../analysis/thresholds';

/** An edit applied (a new plan) or refused (why, and where; see src/diagnostics.ts). */
export type EditResult = { ok: true; plan: Plan } | { ok: false; diagnostic: Diagnostic };

function refused(reason: string, target: DiagnosticTarget = { kind: 'plan' }): { ok: false; diagnostic: Diagnostic } {
  return { ok: false, diagnostic: diagnostic('edit-refused', 'error', target, { reason }) };
}
const noBand = (chain: ChainRef, bandId: string) => ({ ok: false as const, diagnostic: diagnostic('no-such-band', 'error', { kind: 'band', chain, bandId }, { bandId }) });
const noOutput = (outputId: string) => ({ ok: false as const, diagnostic: diagnostic('no-such-output', 'error', { kind: 'plan' }, { outputId }) });

/** "input" or an output id. */
export type ChainRef = string;
export const INPUT: ChainRef = 'input';

/**
 * Measurement lists the reader has accepted, each with a stand-in that holds only what the rest
 * of the plan refers to (the ids). Plans here are never mutated, so a list that is the same object
 * as one accepted before still holds the same values: an edit that leaves it alone (every drag
 * frame) reads its ids again, not its thousands of numbers.
 */
const acceptedLists = new WeakMap<readonly Measurement[], Measurement[]>();

function standIn(m: Measurement): Measurement {
  return { id: m.id, name: 'm', source: { fileName: '', kind: 'generated' }, frequencyHz: [1, 2], magnitudeDb: [0, 0], phaseDeg: null, phaseEstimated: false, delayMs: 0, notes: [] };
}

/** Checks a whole edited plan with the reader; keeps the edited object (its structural sharing). */
export function validated(plan: Plan): EditResult {
  const list = plan.measurements;
  const known = list ? acceptedLists.get(list) : undefined;
  const r = readPlanValue(known ? { ...plan, measurements: known } : plan);
  if (r.ok) {
    if (list && !known) acceptedLists.set(list, list.map(standIn));
    return { ok: true, plan };
  }
  return { ok: false, diagnostic: r.error.diagnostic };
}

export function freshPlan(): Plan {
  return {
    format: PLAN_FORMAT,
    version: PLAN_VERSION,
    name: 'Untitled plan',
    sampleRate: 48000,
    input: { bands: [] },
    outputs: [
      { id: 'full', name: 'Full range', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [] },
    ],
  };
}

export function chainBands(plan: Plan, chain: ChainRef): Band[] {
  if (chain === INPUT) return plan.input.bands;
  return plan.outputs.find((o) => o.id === chain)?.bands ?? [];
}

function withChainBands(plan: Plan, chain: ChainRef, bands: Band[]): Plan {
  if (chain === INPUT) return { ...plan, input: { ...plan.input, bands } };
  return { ...plan, outputs: plan.outputs.map((o) => (o.id === chain ? { ...o, bands } : o)) };
}

/** Replaces fields of one band (undefined in the patch removes the field). */
export function updateBand(plan: Plan, chain: ChainRef, bandId: string, patch: Partial<Band>): EditResult {
  const bands = chainBands(plan, chain);
  const i = bands.findIndex((b) => b.id === bandId);
  if (i < 0) return noBand(chain, bandId);
  const next: Band = { ...bands[i], ...patch };
  for (const k of Object.keys(next) as (keyof Band)[]) if (next[k] === undefined) delete next[k];
  return validated(withChainBands(plan, chain, bands.map((b, j) => (j === i ? next : b))));
}

/** Sets a band's Q from a bandwidth in octaves at its own frequency (cookbook BW form). */
export function setBandwidth(plan: Plan, chain: ChainRef, bandId: string, octaves: number): EditResult {
  const band = chainBands(plan, chain).find((b) => b.id === bandId);
  if (!band) return noBand(chain, bandId);
  const q = qFromBandwidthOctaves(octaves, band.frequency, plan.sampleRate);
  if (!(q > 0) || !Number.isFinite(q)) return refused('that bandwidth gives no usable Q at this frequency', { kind: 'band', chain, bandId });
  return updateBand(plan, chain, bandId, { q, slope: undefined });
}

/** A band id not used in the chain: b1, b2, ... */
export function nextBandId(bands: readonly Band[]): string {
  const used = new Set(bands.map((b) => b.id));
  for (let i = 1; ; i++) if (!used.has(`b${i}`)) return `b${i}`;
}

/** Sensible fields for a band type (what a new band, or a type change, starts from). */
export function bandForType(prev: Band, type: BandType): Band {
  const b: Band = { id: prev.id, type, frequency: prev.frequency, enabled: prev.enabled };
  if (type === 'raw') {
    b.coefficients = prev.coefficients ?? { b0: 1, b1: 0, b2: 0, a0: 1, a1: 0, a2: 0 };
    return b;
  }
  if (type === 'peaking' || type === 'lowShelf' || type === 'highShelf') b.gainDb = prev.gainDb ?? 0;
  if (type === 'lowShelf' || type === 'highShelf') {
    if (prev.q !== undefined && prev.type !== 'peaking') b.q = prev.q;
    else b.slope = prev.slope ?? 1;
  } else if (!['lowPass1', 'highPass1', 'allPass1'].includes(type)) {
    b.q = prev.q ?? (type === 'peaking' ? 1 : DEFAULT_Q);
  }
  return b;
}

export function setBandType(plan: Plan, chain: ChainRef, bandId: string, type: BandType): EditResult {
  const bands = chainBands(plan, chain);
  const i = bands.findIndex((b) => b.id === bandId);
  if (i < 0) return noBand(chain, bandId);
  const next = bandForType(bands[i], type);
  return validated(withChainBands(plan, chain, bands.map((b, j) => (j === i ? next : b))));
}

export function addBand(plan: Plan, chain: ChainRef, init?: Partial<Band>): EditResult & { bandId?: string } {
  const bands = chainBands(plan, chain);
  if (bands.length >= LIMITS.bandsMax) return refused(`a chain holds at most ${LIMITS.bandsMax} bands`);
  const id = nextBandId(bands);
  const frequency = Math.min(init?.frequency ?? 1000, plan.sampleRate * AUDIO_BAND_TOP_FRACTION);
  const band: Band = { id, type: 'peaking', frequency, gainDb: 0, q: 1, enabled: true, ...init };
  band.id = id;
  band.frequency = frequency;
  const r = validated(withChainBands(plan, chain, [...bands, band]));
  return r.ok ? { ...r, bandId: id } : r;
}

export function removeBand(plan: Plan, chain: ChainRef, bandId: string): EditResult {
  const bands = chainBands(plan, chain);
  if (!bands.some((b) => b.id === bandId)) return noBand(chain, bandId);
  return validated(withChainBands(plan, chain, bands.filter((b) => b.id !== bandId)));
}

export function updateOutput(plan: Plan, outputId: string, patch: Partial<Omit<Output, 'id' | 'bands'>>): EditResult {
  if (!plan.outputs.some((o) => o.id === outputId)) return noOutput(outputId);
  return validated({ ...plan, outputs: plan.outputs.map((o) => (o.id === outputId ? { ...o, ...patch } : o)) });
}

/** An output id not used in the plan, from a name ("Mid high" -> "mid-high", "mid-high-2"). */
export function freshOutputId(plan: Plan, name: string): string {
  const base = (name.toLowerCase().replace(/[^a-z0-9_-]+/g, '-').replace(/^-+|-+$/g, '') || 'out').slice(0, 28);
  const used = new Set(plan.outputs.map((o) => o.id));
  if (!used.has(base)) return base;
  for (let i = 2; ; i++) if (!used.has(`${base}-${i}`)) return `${base}-${i}`;
}

export function addOutput(plan: Plan): EditResult & { outputId?: string } {
  if (plan.outputs.length >= LIMITS.outputsMax) return refused(`a plan holds at most ${LIMITS.outputsMax} outputs`);
  const name = `Output ${plan.outputs.length + 1}`;
  const id = freshOutputId(plan, name);
  const out: Output = { id, name, gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [] };
  const r = validated({ ...plan, outputs: [...plan.outputs, out] });
  return r.ok ? { ...r, outputId: id } : r;
}

export function duplicateOutput(plan: Plan, outputId: string): EditResult & { outputId?: string } {
  if (plan.outputs.length >= LIMITS.outputsMax) return refused(`a plan holds at most ${LIMITS.outputsMax} outputs`);
  const i = plan.outputs.findIndex((o) => o.id === outputId);
  if (i < 0) return noOutput(outputId);
  const src = plan.outputs[i];
  const name = `${src.name} copy`.slice(0, LIMITS.nameMaxLength);
  const id = freshOutputId(plan, `${src.id}-copy`);
  const copy: Output = JSON.parse(JSON.stringify({ ...src, id, name })) as Output;
  const outputs = [...plan.outputs.slice(0, i + 1), copy, ...plan.outputs.slice(i + 1)];
  const r = validated({ ...plan, outputs });
  return r.ok ? { ...r, outputId: id } : r;
}

export function removeOutput(plan: Plan, outputId: string): EditResult {
  if (plan.outputs.length <= LIMITS.outputsMin) return refused('a plan keeps at least one output');
  if (!plan.outputs.some((o) => o.id === outputId)) return noOutput(outputId);
  return validated({ ...plan, outputs: plan.outputs.filter((o) => o.id !== outputId) });
}

/** Moves an output up (-1) or down (+1) in the list. */
export function moveOutput(plan: Plan, outputId: string, by: -1 | 1): EditResult {
  const i = plan.outputs.findIndex((o) => o.id === outputId);
  const j = i + by;
  if (i < 0 || j < 0 || j >= plan.outputs.length) return refused('cannot move further');
  const outputs = [...plan.outputs];
  [outputs[i], outputs[j]] = [outputs[j], outputs[i]];
  return validated({ ...plan, outputs });
}

/** Sets or clears (null) an output's edge; bessel edges get a normalization, others lose it. */
export function setEdge(plan: Plan, outputId: string, kind: EdgeKind, edge: Crossover | null): EditResult {
  let e = edge;
  if (e) {
    e = { family: e.family, order: e.order, frequency: e.frequency };
    if (e.family === 'bessel') e.normalization = edge?.normalization ?? 'phase';
    if (e.family === 'linkwitz-riley' && !LIMITS.linkwitzRileyOrders.includes(e.order)) {
      // Nearest allowed order rather than a refusal when the family changes under an odd order.
      e.order = Math.min(8, Math.max(2, 2 * Math.round(e.order / 2)));
    }
  }
  return updateOutput(plan, outputId, kind === 'highPass' ? { highPass: e } : { lowPass: e });
}

/**
 * The neighbouring output across this output's edge: for a low-pass edge, the output just above
 * in frequency (the one whose high-pass is nearest), for a high-pass edge the one just below.
 * Falls back to the next (low-pass) or previous (high-pass) output in the list.
 */
export function neighbourAcross(plan: Plan, outputId: string, kind: EdgeKind): Output | null {
  const me = plan.outputs.find((o) => o.id === outputId);
  const edge = me && (kind === 'lowPass' ? me.lowPass : me.highPass);
  if (!me || !edge) return null;
  const others = plan.outputs.filter((o) => o !== me);
  const octaves = (a: number, b: number) => Math.abs(Math.log2(a / b));
  const candidates = others
    .map((o) => ({ o, e: kind === 'lowPass' ? o.highPass : o.lowPass }))
    .filter((c) => c.e !== null)
    .sort((a, b) => octaves(a.e!.frequency, edge.frequency) - octaves(b.e!.frequency, edge.frequency));
  if (candidates.length > 0 && octaves(candidates[0].e!.frequency, edge.frequency) < 2) return candidates[0].o;
  const i = plan.outputs.indexOf(me);
  const j = kind === 'lowPass' ? i + 1 : i - 1;
  return plan.outputs[j] ?? null;
}

/**
 * A new edge for an output: the other side of the neighbouring crossover when there is one (a new
 * high-pass takes the frequency, family, order and normalization of the low-pass edge of the
 * output before it in the list, or of the nearest output that has one; a new low-pass likewise
 * from the high-pass edge after it), so the two sides start matched. Without a neighbour: a
 * Linkwitz-Riley 4th order at 80 Hz (high-pass) or 2 kHz (low-pass), kept two octaves clear of
 * the output's other edge and below 0.45 of the sample rate.
 */
export function newEdge(plan: Plan, outputId: string, kind: EdgeKind): Crossover {
  const i = plan.outputs.findIndex((o) => o.id === outputId);
  const other = (o: Output) => (kind === 'highPass' ? o.lowPass : o.highPass);
  const step = kind === 'highPass' ? -1 : 1;
  // Nearest in list order, the adjacent output first, then further away on the same side, then the other side.
  const order = plan.outputs
    .map((o, k) => ({ o, k }))
    .filter(({ k }) => k !== i)
    .sort((a, b) => {
      const da = (a.k - i) * step > 0 ? Math.abs(a.k - i) : 100 + Math.abs(a.k - i);
      const db = (b.k - i) * step > 0 ? Math.abs(b.k - i) : 100 + Math.abs(b.k - i);
      return da - db;
    });
  const from = order.map(({ o }) => other(o)).find((e) => e !== null);
  if (from && from.frequency < plan.sampleRate / 2) return { ...from };
  const me = plan.outputs[i];
  const opposite = me ? (kind === 'highPass' ? me.lowPass : me.highPass) : null;
  const base = kind === 'highPass' ? 80 : 2000;
  const f = opposite ? (kind === 'highPass' ? Math.min(base, opposite.frequency / 4) : Math.max(base, opposite.frequency * 4)) : base;
  return { family: 'linkwitz-riley', order: 4, frequency: Math.min(f, plan.sampleRate * AUDIO_BAND_TOP_FRACTION) };
}

/** Gives the neighbour across this edge the complementary edge (same family, order, frequency). */
export function matchNeighbourEdge(plan: Plan, outputId: string, kind: EdgeKind): EditResult & { neighbourId?: string } {
  const me = plan.outputs.find((o) => o.id === outputId);
  const edge = me && (kind === 'lowPass' ? me.lowPass : me.highPass);
  if (!me || !edge) return refused('set this edge first');
  const n = neighbourAcross(plan, outputId, kind);
  if (!n) return refused(`no output ${kind === 'lowPass' ? 'after' : 'before'} this one to take the other side`);
  const r = setEdge(plan, n.id, kind === 'lowPass' ? 'highPass' : 'lowPass', { ...edge });
  return r.ok ? { ...r, neighbourId: n.id } : r;
}

/**
 * Changes the sample rate; every section is redesigned from the plan. Refused, naming the first
 * offenders, when a band or edge frequency does not fit below the new Nyquist.
 */
export function setSampleRate(plan: Plan, sampleRateHz: number): EditResult {
  if (!(sampleRateHz >= LIMITS.sampleRateMinHz && sampleRateHz <= LIMITS.sampleRateMaxHz)) {
    return { ok: false, diagnostic: diagnostic('rate-range', 'error', { kind: 'plan' }, { minHz: LIMITS.sampleRateMinHz, maxHz: LIMITS.sampleRateMaxHz }) };
  }
  const nyq = sampleRateHz / 2;
  const misfits: RateMisfit[] = [];
  const checkBands = (bands: Band[], chain: ChainRef) => {
    for (const b of bands) if (b.type !== 'raw' && !(b.frequency < nyq)) misfits.push({ target: { kind: 'band', chain, bandId: b.id }, frequencyHz: b.frequency });
  };
  checkBands(plan.input.bands, INPUT);
  for (const o of plan.outputs) {
    for (const edge of ['highPass', 'lowPass'] as const) {
      const e = o[edge];
      if (e && !(e.frequency < nyq)) misfits.push({ target: { kind: 'edge', outputId: o.id, edge }, frequencyHz: e.frequency });
    }
    checkBands(o.bands, o.id);
  }
  if (misfits.length > 0) {
    return { ok: false, diagnostic: diagnostic('rate-misfit', 'error', { kind: 'plan' }, { sampleRateHz, nyquistHz: nyq, misfits }) };
  }
  return validated({ ...plan, sampleRate: sampleRateHz });
}
