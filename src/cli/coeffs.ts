/**
 * The `coeffs` listing: every output's sections in the file convention
 * H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2), input bands first, in signal order,
 * with the output's linear gain (polarity included) and delay. Numbers are written in the
 * shortest form that reads back to the same double, in every format.
 */
import { designPlan, type DesignedOutput } from '../design/chain';
import { exportNames } from '../plan/export-name';
import type { Plan } from '../plan/types';
import { cComment, cDoubleText, cIdentifier, csvCell, printable } from '../export/format';
import { numText } from '../export/list';

export interface CoeffsListing {
  sampleRate: number;
  outputs: {
    id: string;
    /** The output's export name (plan/export-name.ts): what the lists and C names call it. */
    exportName: string;
    gain: number;
    delayMs: number;
    delaySamples: number;
    sections: { b0: number; b1: number; b2: number; a1: number; a2: number; from: string }[];
  }[];
}

export function coeffsListing(plan: Plan, outputId?: string): CoeffsListing {
  const names = exportNames(plan.outputs);
  const designed = designPlan(plan)
    .map((d, i) => listOutput(d, names[i]))
    .filter((d) => outputId === undefined || d.id === outputId);
  return { sampleRate: plan.sampleRate, outputs: designed };
}

function listOutput(d: DesignedOutput, exportName: string): CoeffsListing['outputs'][number] {
  return {
    id: d.id,
    exportName,
    gain: d.gain,
    delayMs: d.delayMs,
    // Rounded to the nearest sample (the response itself uses the exact delay).
    delaySamples: Math.round(d.delaySamplesExact),
    sections: d.sections.map((s) => ({ b0: s.b0, b1: s.b1, b2: s.b2, a1: s.a1, a2: s.a2, from: s.from })),
  };
}

export function coeffsJsonText(l: CoeffsListing): string {
  return JSON.stringify(l, null, 2) + '\n';
}

export function coeffsCsvText(l: CoeffsListing): string {
  const rows = ['output,section,from,b0,b1,b2,a1,a2,gain,delayMs,delaySamples'];
  for (const o of l.outputs) {
    o.sections.forEach((s, i) => {
      rows.push([csvCell(o.exportName), i + 1, csvCell(s.from), numText(s.b0), numText(s.b1), numText(s.b2), numText(s.a1), numText(s.a2), numText(o.gain), numText(o.delayMs), o.delaySamples].join(','));
    });
    if (o.sections.length === 0) rows.push([csvCell(o.exportName), 0, '', '', '', '', '', '', numText(o.gain), numText(o.delayMs), o.delaySamples].join(','));
  }
  return rows.join('\n') + '\n';
}

export function coeffsText(l: CoeffsListing, planName: string): string {
  const lines = [
    `# ${printable(planName)}`,
    `# sample rate ${l.sampleRate} Hz`,
    '# H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2), sections in signal order',
  ];
  for (const o of l.outputs) {
    lines.push('', `output ${printable(o.exportName)}: gain ${numText(o.gain)} (linear, polarity included), delay ${numText(o.delayMs)} ms = ${o.delaySamples} samples, ${o.sections.length} sections`);
    o.sections.forEach((s, i) => {
      lines.push(`  ${String(i + 1).padStart(2)}  b0=${numText(s.b0)} b1=${numText(s.b1)} b2=${numText(s.b2)} a1=${numText(s.a1)} a2=${numText(s.a2)}  (${printable(s.from)})`);
    });
  }
  return lines.join('\n') + '\n';
}

/** A C literal that reads back to the same double. */
function cDouble(x: number): string {
  return cDoubleText(numText(x));
}

export function coeffsCText(l: CoeffsListing, planName: string): string {
  const lines = [
    '/*',
    ` * Biquad coefficients: ${cComment(planName)}`,
    ` * Sample rate: ${l.sampleRate} Hz`,
    ' * Convention: H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2),',
    ' * y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] - a1 y[n-1] - a2 y[n-2].',
    ' * Each row is {b0, b1, b2, a1, a2}, sections in signal order (input chain first).',
    ' * Gain is linear with polarity included; delay rounded to whole samples.',
    ' */',
    '#ifndef BIQUADRANT_COEFFS_H',
    '#define BIQUADRANT_COEFFS_H',
    '',
    `#define BQ_SAMPLE_RATE ${l.sampleRate}`,
  ];
  for (const o of l.outputs) {
    const name = cIdentifier(o.exportName).toUpperCase();
    const lower = cIdentifier(o.exportName).toLowerCase();
    lines.push('', `/* output ${o.exportName} */`, `#define BQ_${name}_SECTIONS ${o.sections.length}`, `#define BQ_${name}_DELAY_SAMPLES ${o.delaySamples}`);
    lines.push(`static const double bq_${lower}_gain = ${cDouble(o.gain)};`);
    if (o.sections.length === 0) {
      lines.push(`/* no sections: bq_${lower}_sos is omitted (C has no empty arrays) */`);
      continue;
    }
    lines.push(`static const double bq_${lower}_sos[${o.sections.length}][5] = {`);
    o.sections.forEach((s, i) => {
      const sep = i === o.sections.length - 1 ? '' : ',';
      lines.push(`  { ${[s.b0, s.b1, s.b2, s.a1, s.a2].map(cDouble).join(', ')} }${sep} /* ${cComment(s.from)} */`);
    });
    lines.push('};');
  }
  lines.push('', '#endif /* BIQUADRANT_COEFFS_H */');
  return lines.join('\n') + '\n';
}
