/**
 * Text column import: frequency (Hz), magnitude (dB) and optional phase (degrees, wrapped or not),
 * one point per line.
 *
 * Rules (docs/measurements.md, "Text columns"):
 * - A line that does not start with a number (after leading blanks) is a comment or header line:
 *   it is skipped, and the first MAX_NOTES non-empty ones are kept as the measurement's notes.
 *   A line starting with NaN or Infinity counts as a data line, so it is refused, not skipped.
 * - Separators are taken from the first data line: a semicolon, else a tab, else commas and/or
 *   spaces. With semicolons or tabs a comma is a decimal comma ("1,5" is 1.5); otherwise a comma
 *   separates columns. A trailing separator is allowed.
 * - Columns beyond the third are ignored. Every data line has as many of the first three columns
 *   as the first data line (a file has phase on every line or on none).
 * - Frequencies are > 0 and strictly increasing; every value is a finite number. Each refusal
 *   names its line.
 * - Phase is unwrapped (each step brought into [-180, 180) by whole turns); the delay is 0.
 */
import { MeasurementFileError } from './errors';
import type { MeasuredResponse } from './types';

/** How many comment or header lines are kept as notes. */
export const MAX_NOTES = 8;

type SeparatorMode = 'semicolon' | 'tab' | 'plain';

// A plain decimal number: sign, digits with an optional point, optional exponent.
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
// A data line starts with a digit, a sign or point before a digit, or a spelled non-finite value.
const DATA_START = /^(?:[+-]?\.?\d|[+-]?(?:nan|inf))/i;
// Comment markers stripped from the start of a kept note.
const COMMENT_MARK = /^(?:#|\/\/|;|\*|!|%|')+\s*/;

function separatorMode(line: string): SeparatorMode {
  if (line.includes(';')) return 'semicolon';
  if (line.includes('\t')) return 'tab';
  return 'plain';
}

function decimalComma(field: string): string {
  const s = field.trim();
  return s.includes(',') ? s.replace(',', '.') : s;
}

function splitFields(line: string, mode: SeparatorMode): string[] {
  let fields: string[];
  if (mode === 'semicolon') fields = line.split(';').map(decimalComma);
  else if (mode === 'tab') fields = line.split(/[\t ]+/).map(decimalComma);
  else fields = line.split(/\s*,\s*|\s+/);
  if (fields.length > 1 && fields[fields.length - 1] === '') fields.pop();
  return fields;
}

const COLUMN_NAMES = ['frequency', 'magnitude', 'phase'];

function parseField(s: string, column: number, line: number): number {
  if (!NUMBER.test(s)) {
    throw new MeasurementFileError(`${COLUMN_NAMES[column]} "${s}" is not a number`, { line });
  }
  const x = Number(s);
  if (!Number.isFinite(x)) throw new MeasurementFileError(`${COLUMN_NAMES[column]} "${s}" is out of range`, { line });
  return x;
}

/**
 * Reads a text file of columns into a MeasuredResponse named `name`. Throws MeasurementFileError
 * (with the line number where there is one) for anything it cannot read exactly.
 */
export function parseMeasurementText(text: string, name: string): MeasuredResponse {
  const lines = text.split(/\r\n|\r|\n/);
  const notes: string[] = [];
  const frequencyHz: number[] = [];
  const magnitudeDb: number[] = [];
  let phase: number[] | null = null;
  let mode: SeparatorMode | null = null;
  let columns = 0;
  let firstDataLine = 0;

  for (let i = 0; i < lines.length; i++) {
    const lineNo = i + 1;
    const line = lines[i].trim();
    if (line === '') continue;
    if (!DATA_START.test(line)) {
      if (notes.length < MAX_NOTES) {
        const note = line.replace(COMMENT_MARK, '').trim();
        if (note !== '') notes.push(note);
      }
      continue;
    }
    if (mode === null) {
      mode = separatorMode(line);
      firstDataLine = lineNo;
    }
    const fields = splitFields(line, mode);
    const have = Math.min(fields.length, 3);
    if (columns === 0) {
      if (have < 2) throw new MeasurementFileError('needs at least two columns: frequency (Hz) and magnitude (dB)', { line: lineNo });
      columns = have;
      if (columns === 3) phase = [];
    } else if (have !== columns) {
      throw new MeasurementFileError(`${have} column(s) where line ${firstDataLine} has ${columns}`, { line: lineNo });
    }
    for (let c = 0; c < columns; c++) {
      if (fields[c] === '') throw new MeasurementFileError(`${COLUMN_NAMES[c]} is empty`, { line: lineNo });
    }
    const f = parseField(fields[0], 0, lineNo);
    if (!(f > 0)) throw new MeasurementFileError(`frequency ${fields[0]} Hz must be > 0`, { line: lineNo });
    const n = frequencyHz.length;
    if (n > 0 && !(f > frequencyHz[n - 1])) {
      const what = f === frequencyHz[n - 1] ? 'repeats' : 'is below';
      throw new MeasurementFileError(`frequency ${fields[0]} Hz ${what} the previous one (${frequencyHz[n - 1]} Hz); frequencies must increase`, {
        line: lineNo,
      });
    }
    frequencyHz.push(f);
    magnitudeDb.push(parseField(fields[1], 1, lineNo));
    if (phase !== null) phase.push(parseField(fields[2], 2, lineNo));
  }

  if (frequencyHz.length < 2) {
    throw new MeasurementFileError(`${frequencyHz.length} data point(s); a measurement needs at least 2 lines of frequency and magnitude`);
  }
  return {
    name,
    frequencyHz,
    magnitudeDb,
    phaseDeg: phase === null ? null : unwrapDegrees(phase),
    phaseEstimated: false,
    delayMs: 0,
    notes,
  };
}

/** Unwraps a phase in degrees in place (each step brought into [-180, 180)) and returns it. */
export function unwrapDegrees(phaseDeg: number[]): number[] {
  let offset = 0;
  let prevRaw = phaseDeg.length > 0 ? phaseDeg[0] : 0;
  for (let i = 1; i < phaseDeg.length; i++) {
    const raw = phaseDeg[i];
    const step = raw - prevRaw;
    offset -= 360 * Math.round(step / 360);
    prevRaw = raw;
    phaseDeg[i] = raw + offset;
  }
  return phaseDeg;
}
