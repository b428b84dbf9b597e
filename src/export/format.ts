/**
 * The export formats, all written from one `ExportList`: text (a line per section), CSV, JSON and
 * a C header. Numbers are the list's written texts (shortest exact decimals, decimals rounded to
 * the profile's digits, signed integers or two's-complement hex), so every format carries the
 * same values; `import.ts` reads each of them back.
 */
import type { ExportList, ExportOutput, ExportSection, WrittenNumber } from './list';
import { profileToJson } from '../plan/write';
import { diagnosticMessage } from '../diagnostics';
import { describeProfile, effectiveOrder, FEEDBACK_SIGN_WORDS, writtenNames } from './profiles';
import { qName } from './fixed';

export type ExportFormat = 'text' | 'csv' | 'json' | 'c';
export const EXPORT_FORMATS: readonly ExportFormat[] = ['text', 'csv', 'json', 'c'];

/** The file name extension of each format. */
export const FORMAT_EXTENSIONS: Record<ExportFormat, string> = { text: 'txt', csv: 'csv', json: 'json', c: 'h' };

/** The JSON export's `format` field. */
export const COEFFICIENTS_FORMAT = 'biquadrant.coefficients';

export function formatExport(list: ExportList, format: ExportFormat): string {
  switch (format) {
    case 'text':
      return exportText(list);
    case 'csv':
      return exportCsv(list);
    case 'json':
      return exportJson(list);
    case 'c':
      return exportC(list);
  }
}

/** The comment lines every format with comments starts with (without comment markers). */
export function conventionLines(list: ExportList): string[] {
  const p = list.profile;
  const lines = [
    `Biquadrant export: ${printable(list.planName)}`,
    `Board profile: ${printable(p.name)}`,
    `Sample rate: ${list.sampleRate} Hz${list.redesigned ? ` (redesigned; the plan is at ${list.planSampleRate} Hz)` : ''}`,
    `Profile: ${describeProfile(p, list.planSampleRate)}`,
    'Section: H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2), sections in signal order (input chain first)',
    `Board equation: ${FEEDBACK_SIGN_WORDS[p.feedbackSign].equation}`,
    `Numbers per section: ${writtenNames(p).join(' ')}${p.writeA0 ? ' (a0 = 1 before scaling)' : ''}`,
  ];
  if (p.coefficientScale !== 1) lines.push(`Every coefficient is multiplied by ${p.coefficientScale} before it is written (the board undoes it)`);
  if (p.number.kind === 'fixed') {
    const q = qName(p.number);
    lines.push(
      `Fixed point ${q} in ${p.number.wordBits}-bit words: integer = round(value x 2^${p.number.fractionBits}), ties away from zero, saturated at the ${q} range${p.number.notation === 'hex' ? "; written as two's-complement hex of the word" : ''}`,
    );
  }
  lines.push(
    p.gain === 'separate'
      ? `Gain: linear, polarity included, in the same number format${p.coefficientScale !== 1 ? ' (not pre-scaled)' : ''}`
      : 'Gain: folded into the first section (b0 b1 b2 multiplied by it)',
  );
  lines.push(`Delay: ${p.delayUnit === 'samples' ? 'whole samples (rounded to nearest)' : 'ms'}`);
  return lines;
}

function sectionNumbers(s: { written: { number: WrittenNumber }[] }): string[] {
  return s.written.map((w) => w.number.text);
}

export function exportText(list: ExportList): string {
  const lines = conventionLines(list).map((l) => `# ${l}`);
  lines.push(`# One line per section: ${writtenNames(list.profile).join(' ')}`);
  for (const o of list.outputs) {
    lines.push('', `output ${printable(o.exportName)}`);
    if (o.gain.written) lines.push(`gain ${o.gain.written.text}${gainSaturated(o) ? '  # SATURATED gain' : ''}`);
    lines.push(`delay ${o.delay.text} ${list.profile.delayUnit}`);
    for (const s of o.sections) lines.push(`${sectionNumbers(s).join(' ')}  # ${printable(sourceNote(s))}${scaleNote(s.scale)}${flagNote(s)}`);
  }
  return lines.join('\n') + '\n';
}

/** The flags a section carries, for comments and the CSV's last column ('' when none). */
export function sectionFlags(s: ExportSection): string {
  const flags: string[] = [];
  if (!s.stable) flags.push(`UNSTABLE (pole radius ${s.poleRadius})`);
  if (s.saturated.length > 0) flags.push(`SATURATED ${s.saturated.join(' ')}`);
  return flags.join('; ');
}

function gainSaturated(o: ExportOutput): boolean {
  return !!o.gain.written && o.gain.written.saturation !== 'none';
}

function flagNote(s: ExportSection): string {
  const f = sectionFlags(s);
  return f ? ` -- ${f}` : '';
}

/** A section's comment: its place, its source path and what it is in words ("3 main_l/b2 (peaking)"). */
function sourceNote(s: ExportSection): string {
  return `${s.index} ${s.from}${s.what ? ` (${s.what})` : ''}`;
}

function scaleNote(scale: number): string {
  return scale === 1 ? '' : ` (b scaled x${scale.toPrecision(6)})`;
}

/** A CSV cell on one line: escaped (printable) and quoted when it holds a quote or comma. */
export function csvCell(text: string): string {
  const s = printable(text);
  return /[",]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function exportCsv(list: ExportList): string {
  const order = effectiveOrder(list.profile);
  const separate = list.profile.gain === 'separate';
  const delayColumn = list.profile.delayUnit === 'samples' ? 'delaySamples' : 'delayMs';
  const header = ['output', 'section', 'from', ...order, ...(separate ? ['gain'] : []), delayColumn, 'flags'];
  const rows = [header.join(',')];
  const tail = (o: ExportOutput) => [...(separate ? [o.gain.written?.text ?? ''] : []), o.delay.text];
  for (const o of list.outputs) {
    const gainFlag = gainSaturated(o) ? ['SATURATED gain'] : [];
    const flags = (s: ExportSection) => csvCell([sectionFlags(s), ...gainFlag].filter(Boolean).join('; '));
    for (const s of o.sections) rows.push([csvCell(o.exportName), String(s.index), csvCell(s.from), ...sectionNumbers(s), ...tail(o), flags(s)].join(','));
    if (o.sections.length === 0) rows.push([csvCell(o.exportName), '0', '', ...order.map(() => ''), ...tail(o), ''].join(','));
  }
  return rows.join('\n') + '\n';
}

/** JSON value of a written number: hex stays a string, everything else is a JSON number. */
function jsonNumber(w: WrittenNumber, hex: boolean): number | string {
  return hex ? w.text : w.value;
}

export function exportJson(list: ExportList): string {
  const hex = list.profile.number.kind === 'fixed' && list.profile.number.notation === 'hex';
  const doc = {
    format: COEFFICIENTS_FORMAT,
    plan: list.planName,
    notes: list.notes.map(diagnosticMessage),
    sampleRate: list.sampleRate,
    profile: profileToJson(list.profile),
    convention: conventionLines(list).slice(4),
    order: effectiveOrder(list.profile),
    outputs: list.outputs.map((o) => ({
      id: o.exportName,
      gain: o.gain.written ? jsonNumber(o.gain.written, hex) : null,
      delay: list.profile.delayUnit === 'samples' ? o.delay.samples : o.delay.ms,
      gainSaturated: gainSaturated(o),
      sections: o.sections.map((s) => ({
        from: s.from,
        coefficients: s.written.map((w) => jsonNumber(w.number, hex)),
        // The report beside the numbers (import ignores it): what quantization did to this section.
        saturated: s.saturated,
        poleRadius: s.poleRadius,
        stable: s.stable,
        largestError: s.largestError,
        ...(s.scale !== 1 ? { scale: s.scale } : {}),
      })),
    })),
  };
  return JSON.stringify(doc, null, 2) + '\n';
}

/** A C identifier from an output id. */
export function cIdentifier(id: string): string {
  const s = id.replace(/[^A-Za-z0-9_]/g, '_');
  return /^[0-9]/.test(s) ? `_${s}` : s;
}

/**
 * Text safe on one line of any export: control characters and line separators written as
 * \uXXXX. The plan reader refuses them in names and ids; this holds for any list regardless (a
 * line break in a name inside a comment would start a line the board reads as data).
 */
export function printable(s: string): string {
  return s.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/** Text made safe inside a C block comment (a star-slash in it would end the comment), on one line. */
export function cComment(s: string): string {
  return printable(s).replace(/\*\//g, '* /');
}

/** A decimal text as a C double literal ("1" -> "1.0"; "0.5", "1e-7" as they are). */
export function cDoubleText(text: string): string {
  return /[.eE]/.test(text) ? text : `${text}.0`;
}

/** A C literal for a written number, in the type the header declares. */
function cLiteral(w: WrittenNumber, list: ExportList): string {
  const n = list.profile.number;
  if (n.kind === 'decimal') return cDoubleText(w.text);
  if (n.notation === 'hex') return w.text;
  const bits = n.wordBits > 16 ? 32 : 16;
  // The most negative value has no literal of its own in C (the literal is the positive part).
  if (w.value === -(2 ** (bits - 1))) return `(${-(2 ** (bits - 1)) + 1} - 1)`;
  return w.text;
}

function cType(list: ExportList): string {
  const n = list.profile.number;
  if (n.kind === 'decimal') return 'double';
  const bits = n.wordBits > 16 ? 32 : 16;
  return n.notation === 'hex' ? `uint${bits}_t` : `int${bits}_t`;
}

export function exportC(list: ExportList): string {
  const order = effectiveOrder(list.profile);
  const type = cType(list);
  const lines = ['/*', ...conventionLines(list).map((l) => ` * ${cComment(l)}`), ` * Each row is {${writtenNames(list.profile).join(', ')}}.`];
  if (list.profile.number.kind === 'fixed' && list.profile.number.notation === 'hex') {
    lines.push(` * Hex words are stored in ${type}: the low ${list.profile.number.wordBits} bits are the two's complement.`);
  }
  lines.push(' */', '#ifndef BIQUADRANT_COEFFS_H', '#define BIQUADRANT_COEFFS_H', '');
  if (type !== 'double') lines.push('#include <stdint.h>', '');
  lines.push(`#define BQ_SAMPLE_RATE ${list.sampleRate}`);
  for (const o of list.outputs) {
    const upper = cIdentifier(o.exportName).toUpperCase();
    const lower = cIdentifier(o.exportName).toLowerCase();
    lines.push('', `/* output ${cComment(o.exportName)} */`, `#define BQ_${upper}_SECTIONS ${o.sections.length}`);
    lines.push(list.profile.delayUnit === 'samples' ? `#define BQ_${upper}_DELAY_SAMPLES ${o.delay.text}` : `#define BQ_${upper}_DELAY_MS ${o.delay.text}`);
    if (o.gain.written) lines.push(`static const ${type} bq_${lower}_gain = ${cLiteral(o.gain.written, list)};${gainSaturated(o) ? ' /* SATURATED */' : ''}`);
    if (o.sections.length === 0) {
      lines.push(`/* no sections: bq_${lower}_sos is omitted (C has no empty arrays) */`);
      continue;
    }
    lines.push(`static const ${type} bq_${lower}_sos[${o.sections.length}][${order.length}] = {`);
    o.sections.forEach((s, i) => {
      const sep = i === o.sections.length - 1 ? '' : ',';
      lines.push(`  { ${s.written.map((w) => cLiteral(w.number, list)).join(', ')} }${sep} /* ${cComment(sourceNote(s))}${scaleNote(s.scale)}${flagNote(s)} */`);
    });
    lines.push('};');
  }
  lines.push('', '#endif /* BIQUADRANT_COEFFS_H */');
  return lines.join('\n') + '\n';
}
