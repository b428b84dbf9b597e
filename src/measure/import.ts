/**
 * One entry for a dropped or opened measurement file: a WAV impulse response (recognized by its
 * RIFF/WAVE header, whatever the file is called) or a text file of columns.
 */
import { MeasurementFileError, measurementName } from './errors';
import type { Gate } from './gate';
import { parseMeasurementText } from './text';
import type { MeasuredResponse } from './types';
import { looksLikeWav, parseImpulseWav } from './wav';

// TextDecoder is a global of every host the core runs in (browsers, Node); the core's type
// settings leave out the DOM and Node declarations, so it is declared here.
declare const TextDecoder: new (label: string, options: { fatal: boolean }) => { decode(bytes: Uint8Array): string };

export interface ImportOptions {
  /** Default: the file name without its extension. */
  name?: string;
  /** WAV only: 0-based channel, default 0. */
  channel?: number;
  /** WAV only: the gate, default DEFAULT_GATE. */
  gate?: Gate;
}

export type MeasurementKind = 'wav' | 'text';

/** Which importer these bytes go to. */
export function measurementKind(bytes: Uint8Array): MeasurementKind {
  return looksLikeWav(bytes) ? 'wav' : 'text';
}

/** Decodes UTF-8 text (a byte-order mark dropped); refuses bytes that are not UTF-8. */
export function decodeText(bytes: Uint8Array): string {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new MeasurementFileError('neither a WAV file nor UTF-8 text');
  }
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

/** Imports a measurement file's bytes. Throws MeasurementFileError for a file it cannot read. */
export function importMeasurement(fileName: string, bytes: Uint8Array, options: ImportOptions = {}): MeasuredResponse {
  const name = options.name ?? measurementName(fileName);
  if (measurementKind(bytes) === 'wav') return parseImpulseWav(bytes, { name, channel: options.channel, gate: options.gate });
  return parseMeasurementText(decodeText(bytes), name);
}
