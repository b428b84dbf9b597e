/**
 * WAV impulse responses: PCM 16/24/32-bit and IEEE float 32/64-bit, any sample rate, one channel
 * chosen (docs/measurements.md, "WAV impulse responses").
 *
 * The chunks and the format header are read by the `wavefile` library. The samples of the chosen
 * channel are then decoded here with a DataView: wavefile's own sample decoding takes about a
 * second for a million float samples, three times the whole import's budget. PCM is scaled so
 * full scale is 1 (divided by 2^(bits-1)); float is kept as written.
 */
import * as wavefileModule from 'wavefile';
import { MeasurementFileError } from './errors';
import { resolveGate, type Gate } from './gate';
import { impulseResponseToMeasurement } from './spectrum';
import type { MeasuredResponse } from './types';

type WaveFileClass = typeof wavefileModule.WaveFile;
// wavefile ships an ES module with a named export (bundlers) and a CommonJS build (Node), whose
// exports arrive under `default` when imported from an ES module (looked up by a computed key so
// bundlers, which see the ES module, do not warn about a missing default export).
const wavefileExports = wavefileModule as unknown as Record<string, { WaveFile?: WaveFileClass } | WaveFileClass | undefined>;
const DEFAULT_KEY = 'default';
const WaveFile: WaveFileClass = (wavefileExports.WaveFile as WaveFileClass | undefined) ?? (wavefileExports[DEFAULT_KEY] as { WaveFile: WaveFileClass }).WaveFile;

/** Sample rates read: any from 1 kHz (below, the grid from 10 Hz hardly exists) to 8 x 192 kHz. */
export const MIN_SAMPLE_RATE = 1000;
export const MAX_SAMPLE_RATE = 1536000;

const FORMAT_PCM = 1;
const FORMAT_FLOAT = 3;
const FORMAT_EXTENSIBLE = 0xfffe;

interface FmtChunk {
  audioFormat: number;
  numChannels: number;
  sampleRate: number;
  blockAlign: number;
  bitsPerSample: number;
  subformat: number[];
}

/** What the header says, checked. */
export interface WavInfo {
  sampleFormat: 'pcm' | 'float';
  bitsPerSample: 16 | 24 | 32 | 64;
  channels: number;
  sampleRate: number;
  frames: number;
  bigEndian: boolean;
}

/** True when the bytes start like a WAV file (RIFF, RIFX or RF64 with WAVE). */
export function looksLikeWav(bytes: Uint8Array): boolean {
  if (bytes.length < 12) return false;
  const tag = String.fromCharCode(bytes[0], bytes[1], bytes[2], bytes[3]);
  const wave = String.fromCharCode(bytes[8], bytes[9], bytes[10], bytes[11]);
  return (tag === 'RIFF' || tag === 'RIFX' || tag === 'RF64') && wave === 'WAVE';
}

function wavefileField(message: string): string {
  if (/WAVE/.test(message)) return 'RIFF.format';
  if (/fmt/.test(message)) return 'fmt';
  if (/data/.test(message)) return 'data';
  if (/RIFF|RIFX|RF64|container|format/i.test(message)) return 'RIFF';
  return 'header';
}

/** Parses the header and returns it with the raw bytes of the data chunk. */
export function readWavHeader(bytes: Uint8Array): { info: WavInfo; data: Uint8Array } {
  if (bytes.length < 12) throw new MeasurementFileError(`${bytes.length} bytes; too short for a WAV file`, { field: 'RIFF' });
  const wav = new WaveFile();
  try {
    wav.fromBuffer(bytes, true);
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    throw new MeasurementFileError(`not a readable WAV file (${message.replace(/\s+$/, '')})`, { field: wavefileField(message) });
  }
  const fmt = wav.fmt as FmtChunk;
  const data = (wav.data as { samples: Uint8Array }).samples;
  let format = fmt.audioFormat;
  if (format === FORMAT_EXTENSIBLE) {
    format = fmt.subformat?.[0] ?? 0;
    if (format !== FORMAT_PCM && format !== FORMAT_FLOAT) {
      throw new MeasurementFileError(`extensible sub-format ${format} is neither PCM (1) nor IEEE float (3)`, { field: 'fmt.subFormat' });
    }
  }
  if (format !== FORMAT_PCM && format !== FORMAT_FLOAT) {
    throw new MeasurementFileError(`${fmt.audioFormat} is neither PCM (1) nor IEEE float (3); compressed WAV files are not read`, { field: 'fmt.audioFormat' });
  }
  const bits = fmt.bitsPerSample;
  const allowed = format === FORMAT_PCM ? [16, 24, 32] : [32, 64];
  if (!allowed.includes(bits)) {
    throw new MeasurementFileError(`${bits} bits: ${format === FORMAT_PCM ? 'PCM is read at 16, 24 or 32 bits' : 'float is read at 32 or 64 bits'}`, {
      field: 'fmt.bitsPerSample',
    });
  }
  if (!(Number.isInteger(fmt.numChannels) && fmt.numChannels >= 1)) {
    throw new MeasurementFileError(`${fmt.numChannels}: a WAV file needs at least one channel`, { field: 'fmt.numChannels' });
  }
  if (!(fmt.sampleRate >= MIN_SAMPLE_RATE && fmt.sampleRate <= MAX_SAMPLE_RATE)) {
    throw new MeasurementFileError(`${fmt.sampleRate} Hz: read from ${MIN_SAMPLE_RATE} to ${MAX_SAMPLE_RATE} Hz`, { field: 'fmt.sampleRate' });
  }
  const blockAlign = (fmt.numChannels * bits) / 8;
  if (fmt.blockAlign !== blockAlign) {
    throw new MeasurementFileError(`${fmt.blockAlign} bytes per frame where ${fmt.numChannels} channel(s) of ${bits} bits take ${blockAlign}`, {
      field: 'fmt.blockAlign',
    });
  }
  const frames = Math.floor(data.length / blockAlign);
  if (frames < 2) throw new MeasurementFileError(`${frames} sample frame(s); an impulse response needs at least 2`, { field: 'data' });
  return {
    info: {
      sampleFormat: format === FORMAT_PCM ? 'pcm' : 'float',
      bitsPerSample: bits as WavInfo['bitsPerSample'],
      channels: fmt.numChannels,
      sampleRate: fmt.sampleRate,
      frames,
      bigEndian: wav.container === 'RIFX',
    },
    data,
  };
}

/** The samples of one channel (0-based), PCM scaled to full scale 1. */
export function decodeChannel(info: WavInfo, data: Uint8Array, channel: number): Float64Array {
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
  const bytes = info.bitsPerSample / 8;
  const stride = info.channels * bytes;
  const little = !info.bigEndian;
  const out = new Float64Array(info.frames);
  let at = channel * bytes;
  if (info.sampleFormat === 'float') {
    if (bytes === 4) for (let i = 0; i < out.length; i++, at += stride) out[i] = view.getFloat32(at, little);
    else for (let i = 0; i < out.length; i++, at += stride) out[i] = view.getFloat64(at, little);
  } else if (bytes === 2) {
    for (let i = 0; i < out.length; i++, at += stride) out[i] = view.getInt16(at, little) / 32768;
  } else if (bytes === 4) {
    for (let i = 0; i < out.length; i++, at += stride) out[i] = view.getInt32(at, little) / 2147483648;
  } else {
    for (let i = 0; i < out.length; i++, at += stride) {
      const b0 = data[at + (little ? 0 : 2)];
      const b1 = data[at + 1];
      const b2 = data[at + (little ? 2 : 0)];
      const u = b0 | (b1 << 8) | (b2 << 16);
      out[i] = (u & 0x800000 ? u - 0x1000000 : u) / 8388608;
    }
  }
  for (let i = 0; i < out.length; i++) {
    if (!Number.isFinite(out[i])) throw new MeasurementFileError(`sample ${i} of channel ${channel + 1} is ${out[i]}`, { field: 'data' });
  }
  return out;
}

export interface WavImportOptions {
  name: string;
  /** 0-based; default 0 (the first). */
  channel?: number;
  gate?: Gate;
}

/** Reads a WAV impulse response and returns its gated spectrum (see spectrum.ts). */
export function parseImpulseWav(bytes: Uint8Array, options: WavImportOptions): MeasuredResponse {
  try {
    resolveGate(options.gate);
  } catch (e) {
    throw new MeasurementFileError((e as Error).message, { field: 'gate' });
  }
  const { info, data } = readWavHeader(bytes);
  const channel = options.channel ?? 0;
  if (!(Number.isInteger(channel) && channel >= 0 && channel < info.channels)) {
    throw new MeasurementFileError(`channel ${channel + 1} asked for; the file has ${info.channels}`, { field: 'channel' });
  }
  const samples = decodeChannel(info, data, channel);
  const notes = [
    `WAV impulse response: ${info.sampleFormat === 'pcm' ? 'PCM' : 'float'} ${info.bitsPerSample}-bit, ${info.sampleRate} Hz, ` +
      `${info.channels} channel(s), channel ${channel + 1} used, ${info.frames} samples`,
  ];
  try {
    return impulseResponseToMeasurement(samples, info.sampleRate, { name: options.name, notes, gate: options.gate });
  } catch (e) {
    if (e instanceof RangeError) throw new MeasurementFileError(e.message, { field: 'data' });
    throw e;
  }
}
