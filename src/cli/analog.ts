/**
 * `response --analog`: beside the digital curves, the analog prototype's (each band and edge as
 * its s-domain design, src/analysis/analog-response.ts) for every unmuted output and their sum,
 * at the same frequencies: JSON `analog: { outputs, sum }`, CSV columns `analog.<id>.*`.
 */
import { analogPlanResponse, type AnalogCurves } from '../analysis/analog-response';
import { numText } from '../export/list';
import type { Plan } from '../plan/types';
import { toDegreesWrapped, type ResponseAddition, type ResponseColumns } from './response';

function columns(c: AnalogCurves): ResponseColumns {
  const out: ResponseColumns = { magnitudeDb: [], phaseDeg: [], groupDelayMs: [] };
  for (let i = 0; i < c.magnitudeDb.length; i++) {
    const m = c.magnitudeDb[i];
    const ok = Number.isFinite(m);
    out.magnitudeDb.push(ok ? m : null);
    out.phaseDeg.push(ok ? toDegreesWrapped(c.phaseRad[i]) : null);
    out.groupDelayMs.push(ok && Number.isFinite(c.groupDelayMs[i]) ? c.groupDelayMs[i] : null);
  }
  return out;
}

/** The analog addition of `response` and its stderr note (raw bands left out). */
export function analogAddition(plan: Plan, freqs: Float64Array): { addition: ResponseAddition; note: string } {
  const a = analogPlanResponse(plan, freqs);
  const outputs = a.outputs.filter((o) => !o.mute).map((o) => ({ id: o.id, cols: columns(o.curves) }));
  const sum = columns(a.sum);
  const named = [...outputs, { id: 'sum', cols: sum }];
  const cell = (x: number | null) => (x === null ? '' : numText(x));
  return {
    addition: {
      json: { analog: { outputs: outputs.map((o) => ({ id: o.id, ...o.cols })), sum } },
      csv: {
        header: named.flatMap((n) => [`analog.${n.id}.magnitudeDb`, `analog.${n.id}.phaseDeg`, `analog.${n.id}.groupDelayMs`]),
        row: (i) => named.flatMap((n) => [cell(n.cols.magnitudeDb[i]), cell(n.cols.phaseDeg[i]), cell(n.cols.groupDelayMs[i])]),
      },
    },
    note: a.leftOut.length > 0 ? `analog curves: raw bands have no analog prototype and are left out (${a.leftOut.join(', ')})\n` : '',
  };
}
