/**
 * What the measurement commands do: import a dropped or opened file (one undo step that adds it
 * to the plan, drawn at once), change how the open import reads it (channel, gate, minimum phase:
 * the spectrum is taken again from the kept samples), say what it measures, rename and remove.
 * A file that cannot be read changes nothing; the panel shows why, with the line or field.
 */
import { MeasurementFileError } from '$core/measure/errors';
import { DEFAULT_GATE, resolveGate, type Gate } from '$core/measure/gate';
import { importMeasurement, measurementKind } from '$core/measure/import';
import { withMinimumPhase } from '$core/measure/minphase';
import { impulseGate, impulseResponseToMeasurement } from '$core/measure/spectrum';
import type { MeasuredResponse } from '$core/measure/types';
import { decodeChannel, readWavHeader } from '$core/measure/wav';
import * as medits from '$core/ui/measurement-edits';
import type { MeasurementUse } from '$core/ui/measurement-edits';
import { diagnosticText } from './diagnostics';
import { commit } from './actions';
import { documentState as doc } from '../state/document.svelte';
import { measurementState as ms, type ImportSession, type WavSource } from '../state/measurements.svelte';

/** Measurement files are read whole; anything larger than this is not a measurement we can keep. */
export const MAX_MEASUREMENT_FILE_BYTES = 256 * 1024 * 1024;

function wavNotes(w: WavSource): string[] {
  const i = w.info;
  return [
    `WAV impulse response: ${i.sampleFormat === 'pcm' ? 'PCM' : 'float'} ${i.bitsPerSample}-bit, ${i.sampleRate} Hz, ` +
      `${i.channels} channel(s), channel ${w.channel + 1} used, ${i.frames} samples; gate ${w.gate.startMs} ms before the peak, ${w.gate.lengthMs} ms long`,
  ];
}

/** The measurement the session describes, from the kept source. Throws RangeError for a bad gate. */
function measurementOf(s: ImportSession, name: string): MeasuredResponse {
  let m: MeasuredResponse;
  if (s.wav) m = impulseResponseToMeasurement(s.wav.samples, s.wav.info.sampleRate, { name, notes: wavNotes(s.wav), gate: s.wav.gate });
  else m = s.text!;
  return s.minPhase ? withMinimumPhase(m) : m;
}

/**
 * Imports a file's bytes: on success the measurement is added to the plan (a system measurement
 * until the panel says otherwise; one undo step) and the import panel opens on it. Returns false
 * when the file was refused (the panel shows why; the plan is unchanged).
 */
export function importMeasurementFile(fileName: string, bytes: Uint8Array): boolean {
  const fail = (message: string) => {
    ms.failure = { fileName, message };
    return false;
  };
  if (/\.bqplan$/i.test(fileName)) return fail('this is a plan, not a measurement: open it with Open (Ctrl+O)');
  if (bytes.length > MAX_MEASUREMENT_FILE_BYTES) return fail(`${bytes.length} bytes: larger than any measurement this app reads (${MAX_MEASUREMENT_FILE_BYTES / 1024 / 1024} MB)`);
  const kind = measurementKind(bytes);
  let m: MeasuredResponse;
  let wav: WavSource | null = null;
  try {
    m = importMeasurement(fileName, bytes);
    if (kind === 'wav') {
      const { info, data } = readWavHeader(bytes);
      const samples = decodeChannel(info, data, 0);
      const gate = { startMs: DEFAULT_GATE.startMs, lengthMs: DEFAULT_GATE.lengthMs };
      wav = { info, data, channel: 0, samples, gate, window: impulseGate(samples, info.sampleRate, gate) };
    }
  } catch (e) {
    if (e instanceof MeasurementFileError) return fail(e.message);
    return fail(`not read (${e instanceof Error ? e.message : String(e)})`);
  }
  const r = medits.addMeasurement(doc.plan, m, { fileName, kind }, { kind: 'system' });
  if (!r.ok) return fail(diagnosticText(doc.plan, r.diagnostic));
  commit(r);
  ms.session = { fileName, kind, measurementId: r.measurementId!, text: kind === 'text' ? m : null, wav, minPhase: false, problem: null };
  return true;
}

/** Reads a `File` (drop, file input) and imports it. */
export async function importMeasurementBlob(file: File): Promise<boolean> {
  if (file.size > MAX_MEASUREMENT_FILE_BYTES) {
    ms.failure = { fileName: file.name, message: `${file.size} bytes: larger than any measurement this app reads` };
    return false;
  }
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(await file.arrayBuffer());
  } catch (e) {
    ms.failure = { fileName: file.name, message: `cannot read the file (${e instanceof Error ? e.message : String(e)})` };
    return false;
  }
  return importMeasurementFile(file.name, bytes);
}

/** Takes the spectrum again with the session's settings and replaces the measurement's data. */
function reimport(next: ImportSession): boolean {
  const stored = (doc.plan.measurements ?? []).find((m) => m.id === next.measurementId);
  if (!stored) {
    ms.close();
    return false;
  }
  let m: MeasuredResponse;
  try {
    m = measurementOf(next, stored.name);
  } catch (e) {
    ms.session = { ...next, problem: e instanceof Error ? e.message : String(e) };
    return false;
  }
  const r = medits.replaceMeasurementData(doc.plan, next.measurementId, m);
  if (!r.ok) {
    ms.session = { ...next, problem: diagnosticText(doc.plan, r.diagnostic) };
    return false;
  }
  commit(r, `measurement-data:${next.measurementId}`);
  ms.session = { ...next, problem: null };
  return true;
}

/**
 * A new gate for the open WAV import (ms before the peak, length). Returns null when applied, or
 * the reason it was refused (the field that asked shows it; the plan keeps its last spectrum).
 */
export function setImportGate(gate: Pick<Gate, 'startMs' | 'lengthMs'>): string | null {
  const s = ms.session;
  if (!s?.wav) return 'no impulse response is being imported';
  try {
    resolveGate(gate);
  } catch (e) {
    return (e as Error).message;
  }
  const g = { startMs: gate.startMs, lengthMs: gate.lengthMs };
  return reimport({ ...s, wav: { ...s.wav, gate: g, window: impulseGate(s.wav.samples, s.wav.info.sampleRate, g) } }) ? null : (ms.session?.problem ?? 'not accepted');
}

/** Another channel (0-based) of the open WAV import. */
export function setImportChannel(channel: number): boolean {
  const s = ms.session;
  if (!s?.wav || !(channel >= 0 && channel < s.wav.info.channels)) return false;
  let samples: Float64Array;
  try {
    samples = decodeChannel(s.wav.info, s.wav.data, channel);
    const window = impulseGate(samples, s.wav.info.sampleRate, s.wav.gate);
    return reimport({ ...s, wav: { ...s.wav, channel, samples, window } });
  } catch (e) {
    ms.session = { ...s, problem: e instanceof Error ? e.message : String(e) };
    return false;
  }
}

/** The minimum-phase version of the open import (an estimate from its magnitude), or back to the file's own phase. */
export function setImportMinPhase(on: boolean): boolean {
  const s = ms.session;
  if (!s || s.minPhase === on) return false;
  return reimport({ ...s, minPhase: on });
}

export function setMeasurementUse(id: string, use: MeasurementUse): boolean {
  return commit(medits.setMeasurementUse(doc.plan, id, use));
}

export function renameMeasurement(id: string, name: string): string | null {
  const r = medits.renameMeasurement(doc.plan, id, name);
  return r.ok ? (commit(r), null) : diagnosticText(doc.plan, r.diagnostic);
}

export function removeMeasurement(id: string): boolean {
  if (ms.session?.measurementId === id) ms.close();
  return commit(medits.removeMeasurement(doc.plan, id));
}

