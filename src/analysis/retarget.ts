/**
 * A plan at another sample rate, and what moves. Every band keeps its frequency, gain and Q and
 * every edge its frequency (the export's redesign rule, docs/plan-format.md "What an export does
 * with it"); each band and edge is then designed anew at the new rate. The report gives, per band
 * and edge, the largest magnitude difference (dB) between the old design at the old rate and the
 * new design at the new rate over 20 Hz to 20 kHz (or to 99.9 % of the lower Nyquist). Raw bands
 * keep their coefficients, so their response moves with the rate.
 *
 * Methods: "keep" leaves every band's design method as it is; "bilinear" makes every band
 * bilinear; "matched" gives a matched design to each band that has one and would move by more than
 * RETARGET_TOLERANCE_DB as it is (keeping the analog intent), and leaves the others as they are.
 */
import { designBandBy } from '../design/band';
import { designEdge } from '../design/crossover';
import { hasMatchedDesign } from '../design/matched';
import type { Section } from '../design/section';
import { readPlanValue } from '../plan/read';
import type { PlanError } from '../plan/error';
import type { Band, DesignMethod, EdgeKind, Plan } from '../plan/types';
import { planToJson } from '../plan/write';
import { logFrequencies } from '../response/chain-response';
import { largestDeviation, sectionsMagnitudeDb, type Deviation } from './cramping';
import { CRAMPING_LOW_HZ, CRAMPING_POINTS, HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION, RETARGET_TOLERANCE_DB } from './thresholds';

export type RetargetMethod = 'keep' | 'bilinear' | 'matched';

export interface RetargetEntry extends Deviation {
  target: { kind: 'band'; chain: string; bandId: string; type: Band['type'] } | { kind: 'edge'; outputId: string; edge: EdgeKind };
  /** The item's design frequency (Hz). */
  itemFrequencyHz: number;
  /** Its design method before and after ("bilinear" for edges). */
  methodBefore: DesignMethod;
  methodAfter: DesignMethod;
  /** True when it moves by more than the tolerance. */
  moves: boolean;
}

export interface RetargetResult {
  plan: Plan;
  fromHz: number;
  toHz: number;
  /** The compared range. */
  rangeHz: [number, number];
  toleranceDb: number;
  entries: RetargetEntry[];
}

/** The compared range of a rate change: 20 Hz to 20 kHz or 99.9 % of the lower Nyquist. */
export function retargetGrid(fromRateHz: number, toRateHz: number): Float64Array {
  const top = Math.min(HEADROOM_HIGH_HZ, RESPONSE_TOP_NYQUIST_FRACTION * (Math.min(fromRateHz, toRateHz) / 2));
  return logFrequencies(CRAMPING_POINTS, CRAMPING_LOW_HZ, top);
}

function moved(before: Section[], after: Section[], fromHz: number, toHz: number, grid: Float64Array): Deviation {
  return largestDeviation(sectionsMagnitudeDb(after, grid, toHz), sectionsMagnitudeDb(before, grid, fromHz), grid);
}

const methodOf = (b: Band, plan: Plan): DesignMethod => (b.design ?? plan.defaultDesign ?? 'bilinear') === 'matched' && hasMatchedDesign(b.type) ? 'matched' : 'bilinear';

/**
 * The plan at `toRateHz` with its report, or the reader's refusal (a band or edge at or above the
 * new Nyquist, named by its field path).
 */
export function retargetPlan(plan: Plan, toRateHz: number, method: RetargetMethod = 'keep', toleranceDb = RETARGET_TOLERANCE_DB): { ok: true; result: RetargetResult } | { ok: false; error: PlanError } {
  const json = planToJson(plan) as Record<string, unknown>;
  json.sampleRate = toRateHz;
  const read = readPlanValue(json);
  if (!read.ok) return read;
  let next = read.plan;
  const fromHz = plan.sampleRate;
  const grid = retargetGrid(fromHz, toRateHz);
  if (method === 'bilinear') {
    const clear = (bands: Band[]) => bands.map(({ design: _d, ...b }) => b as Band);
    next = { ...next, defaultDesign: undefined, input: { bands: clear(next.input.bands) }, outputs: next.outputs.map((o) => ({ ...o, bands: clear(o.bands) })) };
    delete next.defaultDesign;
  }
  const entries: RetargetEntry[] = [];
  const bandEntries = (chain: string, before: readonly Band[], after: Band[]): Band[] =>
    after.map((b, i) => {
      const old = before[i];
      const oldSections = designBandBy(old, fromHz, plan.defaultDesign);
      let nb = b;
      let d = moved(oldSections, designBandBy(nb, toRateHz, next.defaultDesign), fromHz, toRateHz, grid);
      if (method === 'matched' && Math.abs(d.deviationDb) > toleranceDb && hasMatchedDesign(b.type) && methodOf(b, next) !== 'matched') {
        nb = { ...b, design: 'matched' };
        d = moved(oldSections, designBandBy(nb, toRateHz, next.defaultDesign), fromHz, toRateHz, grid);
      }
      if (b.enabled) {
        entries.push({
          ...d,
          target: { kind: 'band', chain, bandId: b.id, type: b.type },
          itemFrequencyHz: b.frequency,
          methodBefore: methodOf(old, plan),
          methodAfter: methodOf(nb, next),
          moves: Math.abs(d.deviationDb) > toleranceDb,
        });
      }
      return nb;
    });
  const inputBands = bandEntries('input', plan.input.bands, next.input.bands);
  const outputs = next.outputs.map((o, k) => {
    const old = plan.outputs[k];
    for (const kind of ['highPass', 'lowPass'] as const) {
      const e = o[kind];
      const oe = old[kind];
      if (!e || !oe) continue;
      const d = moved(designEdge(oe, kind, fromHz), designEdge(e, kind, toRateHz), fromHz, toRateHz, grid);
      entries.push({ ...d, target: { kind: 'edge', outputId: o.id, edge: kind }, itemFrequencyHz: e.frequency, methodBefore: 'bilinear', methodAfter: 'bilinear', moves: Math.abs(d.deviationDb) > toleranceDb });
    }
    return { ...o, bands: bandEntries(o.id, old.bands, o.bands) };
  });
  // Entries in plan order: input bands, then per output its edges and bands.
  next = { ...next, input: { bands: inputBands }, outputs };
  return { ok: true, result: { plan: next, fromHz, toHz: toRateHz, rangeHz: [grid[0], grid[grid.length - 1]], toleranceDb, entries } };
}
