/**
 * The time window (gate) of an impulse response: where its peak is, which samples the spectrum
 * uses, and the half-Hann tapers at both ends (docs/measurements.md, "Gate").
 *
 * The gate starts `startMs` before the peak and lasts `lengthMs`. The fade-in is a rising
 * half-Hann over `fadeInMs` at the start; the fade-out a falling half-Hann over `fadeOutMs` at the
 * end (Hann window: F. J. Harris, Proc. IEEE 66(1), 1978). Defaults: DEFAULT_GATE. Each taper
 * stays on its side of the peak, so the peak itself always has weight 1.
 */

export interface Gate {
  /** ms before the peak where the gate starts (>= 0). */
  startMs: number;
  /** ms, the whole length of the gate (> 0). */
  lengthMs: number;
  /** ms of the rising half-Hann at the start; default half of startMs. */
  fadeInMs?: number;
  /** ms of the falling half-Hann at the end; default a fifth of lengthMs. */
  fadeOutMs?: number;
}

/**
 * 2 ms before the peak (room for a driver's rise and a little pre-ringing), 500 ms long (a room's
 * low-frequency decay; about 2 Hz of resolution), fade-in over the first 1 ms, fade-out over the
 * last 100 ms. Common practice, no source: a user gating out reflections sets a shorter length.
 */
export const DEFAULT_GATE: Required<Gate> = { startMs: 2, lengthMs: 500, fadeInMs: 1, fadeOutMs: 100 };

/** Index of the largest |sample| (the first one on a tie); -1 when every sample is 0. */
export function findPeak(samples: ArrayLike<number>): number {
  let best = 0;
  let at = -1;
  for (let i = 0; i < samples.length; i++) {
    const a = Math.abs(samples[i]);
    if (a > best) {
      best = a;
      at = i;
    }
  }
  return at;
}

/** Fills the defaults of a gate and checks its values; throws a RangeError naming the value. */
export function resolveGate(gate: Gate = DEFAULT_GATE): Required<Gate> {
  const startMs = gate.startMs;
  const lengthMs = gate.lengthMs;
  if (!(Number.isFinite(startMs) && startMs >= 0)) throw new RangeError(`gate start ${startMs} ms: must be >= 0 ms before the peak`);
  if (!(Number.isFinite(lengthMs) && lengthMs > startMs)) throw new RangeError(`gate length ${lengthMs} ms: must be longer than its start before the peak (${startMs} ms)`);
  const fadeInMs = gate.fadeInMs ?? startMs / 2;
  const fadeOutMs = gate.fadeOutMs ?? lengthMs / 5;
  if (!(Number.isFinite(fadeInMs) && fadeInMs >= 0 && fadeInMs <= startMs)) throw new RangeError(`fade-in ${fadeInMs} ms: must be from 0 to the gate start (${startMs} ms)`);
  if (!(Number.isFinite(fadeOutMs) && fadeOutMs >= 0 && fadeOutMs <= lengthMs - startMs)) {
    throw new RangeError(`fade-out ${fadeOutMs} ms: must be from 0 to the part of the gate after the peak (${lengthMs - startMs} ms)`);
  }
  return { startMs, lengthMs, fadeInMs, fadeOutMs };
}

/**
 * The gate in samples, as set: [start, end) may reach before the first sample or past the last
 * (those samples are zeros), and the tapers stay where the gate puts them. So a gate longer than
 * the file leaves the file's own end untapered, as whoever wrote the file cut it.
 */
export interface GateWindow {
  start: number;
  peak: number;
  end: number;
  fadeIn: number;
  fadeOut: number;
}

/** The gate around `peak` at `sampleRate`. */
export function gateWindow(peak: number, sampleRate: number, gate: Gate = DEFAULT_GATE): GateWindow {
  const g = resolveGate(gate);
  const toSamples = (ms: number) => Math.round((ms * sampleRate) / 1000);
  const start = peak - toSamples(g.startMs);
  const end = Math.max(peak + 1, start + toSamples(g.lengthMs));
  return {
    start,
    peak,
    end,
    fadeIn: Math.min(toSamples(g.fadeInMs), peak - start),
    fadeOut: Math.min(toSamples(g.fadeOutMs), end - peak - 1),
  };
}

/**
 * The weight of each sample from `w.start` to `w.end` (exclusive; index 0 is w.start): a half-Hann
 * rising from 0 over the fade-in, 1 in the middle, a half-Hann falling to 0 over the fade-out.
 * For the Time view and the spectrum.
 */
export function gateWeights(w: GateWindow): Float64Array {
  const n = w.end - w.start;
  const out = new Float64Array(n).fill(1);
  for (let i = 0; i < w.fadeIn; i++) out[i] = 0.5 - 0.5 * Math.cos((Math.PI * i) / w.fadeIn);
  for (let i = 0; i < w.fadeOut; i++) out[n - 1 - i] = 0.5 - 0.5 * Math.cos((Math.PI * i) / w.fadeOut);
  return out;
}
