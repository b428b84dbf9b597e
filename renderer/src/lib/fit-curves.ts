/**
 * The Response view's curves of a target and a fit proposal, on the plot's grid: the target at
 * its level (NaN outside its range), its tolerance either side, and the proposal's predicted
 * response (an output's driver through its proposed chain; the system measurement with the
 * proposed input bands in place of the ones they replace).
 */
import { designBand } from '$core/design/cookbook';
import { addSectionDb, gridTrig } from '$core/fit/bands';
import { replaceable, targetCurve, targetOf, type FitScope } from '$core/fit/plan-fit';
import { interpolateMeasurement, predictAcoustic } from '$core/measure/acoustic';
import type { Plan } from '$core/plan/types';

export interface TargetCurves {
  levelDb: number;
  target: Float64Array;
  low: Float64Array;
  high: Float64Array;
  toleranceDb: number;
}

/** `levelDb`: the level a fit proposal ended at (the mean alignment is refined with the bands). */
export function targetCurves(plan: Plan, scope: FitScope, grid: Float64Array, levelDb?: number): TargetCurves | null {
  const t = targetOf(plan, scope);
  if (!t) return null;
  const c = targetCurve(plan, scope, t, grid);
  if (!c) return null;
  if (levelDb !== undefined) {
    for (let i = 0; i < c.db.length; i++) c.db[i] += levelDb - c.levelDb;
    c.levelDb = levelDb;
  }
  const n = grid.length;
  const target = new Float64Array(n);
  const low = new Float64Array(n);
  const high = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const inside = grid[i] >= c.fromHz * (1 - 1e-9) && grid[i] <= c.toHz * (1 + 1e-9);
    target[i] = inside ? c.db[i] : NaN;
    low[i] = inside ? c.db[i] - t.toleranceDb : NaN;
    high[i] = inside ? c.db[i] + t.toleranceDb : NaN;
  }
  return { levelDb: c.levelDb, target, low, high, toleranceDb: t.toleranceDb };
}

/** The proposal's predicted magnitude (dB) on the grid, or null when it cannot be predicted. */
export function proposalCurve(current: Plan, proposal: Plan, scope: FitScope, grid: Float64Array): Float64Array | null {
  if (scope.kind === 'output') {
    const p = predictAcoustic(proposal, grid).outputs.find((o) => o.id === scope.outputId);
    return p ? Float64Array.from(p.response.magnitudeDb) : null;
  }
  const id = current.systemMeasurementIds?.[0];
  const m = (current.measurements ?? []).find((x) => x.id === id);
  if (!m) return null;
  const db = Float64Array.from(interpolateMeasurement(m, grid).magnitudeDb);
  const trig = gridTrig(grid, current.sampleRate);
  // Measured through the plan as it stands: out with the bands the fit replaces, in with its own.
  for (const b of current.input.bands) if (b.enabled && replaceable(b)) for (const s of designBand(b, current.sampleRate)) addSectionDb(s, trig, db, -1);
  for (const b of proposal.input.bands) if (b.enabled && replaceable(b)) for (const s of designBand(b, current.sampleRate)) addSectionDb(s, trig, db);
  return db;
}
