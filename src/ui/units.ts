/**
 * What a user types into the app's number fields, read as plain numbers in the plan's units
 * (Hz, dB, ms, Q), and the same numbers written back for display.
 *
 * Accepted forms (case-insensitive, spaces ignored, U+2212 minus allowed):
 *   frequency  "2200", "2.2k", "2k2" (the resistor-code form), "2.2 kHz", "800hz", "1e3"
 *   gain       "-3", "-3 dB", "+2.5dB"
 *   Q          "0.707", "Q 2"; or a bandwidth: "1/3 oct", "0.5 oct", "1 octave" (caller converts)
 *   delay      "1.5", "1.5 ms", "250 us", "0.5 s"; or a distance "34.3 cm", "1 m", "120 mm",
 *              turned into time at 343 m/s (speed of sound in air at 20 degrees C, common practice)
 *
 * A comma is read only where it cannot be misread: "1,5" and "0,707" are decimal commas (a
 * thousands group has three digits and does not follow a lone 0); "12,345,678" and "1,500.5" are
 * thousands groups (more than one comma, or a comma before the decimal point). "1,500" could be
 * either, so it is refused with a hint rather than guessed.
 *
 * Every reader returns a value or a reason; none throws, and none returns NaN or Infinity. A
 * reason does not repeat the typed text (the field still shows it).
 */
import { formatFrequency } from '../format';
import { LIMITS } from '../plan/types';

export type Parsed<T = number> = { ok: true; value: T } | { ok: false; reason: string };

/** Speed of sound in air at 20 degrees C, m/s (common practice; varies about 0.6 m/s per degree). */
export const SPEED_OF_SOUND_M_PER_S = 343;

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/;

/** Lower case, no spaces, U+2212 as "-", and commas read as described above (or a refusal). */
function cleaned(text: string): Parsed<string> {
  const t = text.trim().toLowerCase().replace(/\u2212/g, '-').replace(/\s+/g, '');
  let problem: string | null = null;
  const out = t.replace(/\d[\d.,]*/g, (run) => {
    if (!run.includes(',')) return run;
    const commas = run.split(',').length - 1;
    if (/^\d{1,3}(,\d{3})+(\.\d*)?$/.test(run) && (commas > 1 || run.includes('.'))) return run.replace(/,/g, '');
    if (commas === 1 && !run.includes('.')) {
      const [whole, frac] = run.split(',');
      if (frac.length === 3 && /^[1-9]\d{0,2}$/.test(whole)) {
        problem = `"${run}" could be ${whole}${frac} or ${whole}.${frac}: write it without the comma, or with a point for decimals`;
        return run;
      }
      return `${whole}.${frac}`;
    }
    problem = `"${run}" mixes commas and points: write the number with a point for decimals and no grouping`;
    return run;
  });
  return problem ? { ok: false, reason: problem } : { ok: true, value: out };
}

function clean(text: string): string {
  const c = cleaned(text);
  return c.ok ? c.value : text.trim().toLowerCase();
}

/** The comma refusal of `text`, if any, so a reader gives it instead of its generic reason. */
function commaProblem(text: string): Parsed<never> | null {
  const c = cleaned(text);
  return c.ok ? null : c;
}

/** A plain decimal number (no units); refuses empty text, NaN and Infinity. */
export function parsePlainNumber(text: string): Parsed {
  const comma = commaProblem(text);
  if (comma) return comma;
  const t = clean(text);
  if (t === '') return { ok: false, reason: 'enter a number' };
  if (!NUMBER.test(t)) return { ok: false, reason: 'not a number' };
  const v = Number(t);
  if (!Number.isFinite(v)) return { ok: false, reason: 'number too large' };
  return { ok: true, value: v };
}

/** Frequency in Hz. `nyquistHz`, when given, is the exclusive upper bound. */
export function parseFrequency(text: string, nyquistHz?: number): Parsed {
  const comma = commaProblem(text);
  if (comma) return comma;
  let t = clean(text);
  if (t === '') return { ok: false, reason: 'enter a frequency, e.g. 2.2k or 800 Hz' };
  t = t.replace(/hz$/, '');
  let mult = 1;
  // Resistor-code form: "2k2" = 2.2 kHz.
  const code = /^(\d+)k(\d+)$/.exec(t);
  let value: number;
  if (code) {
    value = Number(`${code[1]}.${code[2]}`) * 1000;
  } else {
    if (t.endsWith('k')) {
      mult = 1000;
      t = t.slice(0, -1);
    }
    const n = parsePlainNumber(t);
    if (!n.ok) return { ok: false, reason: 'not a frequency (try 2.2k or 800 Hz)' };
    value = n.value * mult;
  }
  if (!Number.isFinite(value)) return { ok: false, reason: 'number too large' };
  if (!(value > 0)) return { ok: false, reason: 'frequency must be above 0 Hz' };
  if (nyquistHz !== undefined && !(value < nyquistHz)) {
    return { ok: false, reason: `must be below Nyquist (${formatFrequency(nyquistHz)})` };
  }
  return { ok: true, value };
}

/** Gain in dB within +/- `absMax` (default: the band limit of the plan contract). */
export function parseGainDb(text: string, absMax: number = LIMITS.gainDbAbsMax): Parsed {
  const comma = commaProblem(text);
  if (comma) return comma;
  const t = clean(text).replace(/db$/, '');
  const n = parsePlainNumber(t);
  if (!n.ok) return { ok: false, reason: clean(text) === '' ? 'enter a gain in dB' : 'not a gain (try -3 dB)' };
  if (Math.abs(n.value) > absMax) return { ok: false, reason: `gain must be within \u00b1${absMax} dB` };
  return { ok: true, value: n.value };
}

export type QEntry = { kind: 'q'; q: number } | { kind: 'bandwidth'; octaves: number };

/** A Q, or a bandwidth in octaves ("1/3 oct", "0.5 octave") for the caller to convert at its frequency. */
export function parseQOrBandwidth(text: string): Parsed<QEntry> {
  const comma = commaProblem(text);
  if (comma) return comma;
  const t = clean(text);
  if (t === '') return { ok: false, reason: 'enter a Q (e.g. 0.7) or a bandwidth (e.g. 1/3 oct)' };
  const oct = /^(.*?)(octaves|octave|oct)$/.exec(t);
  if (oct) {
    const body = oct[1];
    let octaves: number;
    const frac = /^(\d+(?:\.\d+)?)\/(\d+(?:\.\d+)?)$/.exec(body);
    if (frac) octaves = Number(frac[1]) / Number(frac[2]);
    else {
      const n = parsePlainNumber(body);
      if (!n.ok) return { ok: false, reason: 'not a bandwidth (try 1/3 oct)' };
      octaves = n.value;
    }
    if (!(octaves > 0) || !Number.isFinite(octaves)) return { ok: false, reason: 'bandwidth must be above 0 octaves' };
    if (octaves > 10) return { ok: false, reason: 'bandwidth must be at most 10 octaves' };
    return { ok: true, value: { kind: 'bandwidth', octaves } };
  }
  const q = parseQ(text);
  return q.ok ? { ok: true, value: { kind: 'q', q: q.value } } : q;
}

/** A quality factor, LIMITS.qMin <= Q <= LIMITS.qMax. */
export function parseQ(text: string): Parsed {
  const comma = commaProblem(text);
  if (comma) return comma;
  const t = clean(text).replace(/^q=?/, '');
  if (t === '') return { ok: false, reason: 'enter a Q (e.g. 0.7)' };
  const n = parsePlainNumber(t);
  if (!n.ok) return { ok: false, reason: 'not a Q (try 0.7, or a bandwidth such as 1/3 oct)' };
  if (!(n.value > 0)) return { ok: false, reason: 'Q must be above 0' };
  if (!(n.value >= LIMITS.qMin)) return { ok: false, reason: `Q must be at least ${LIMITS.qMin}` };
  if (!(n.value <= LIMITS.qMax)) return { ok: false, reason: `Q must be at most ${LIMITS.qMax}` };
  return { ok: true, value: n.value };
}

/** A shelf slope S (>= LIMITS.slopeMin); the plan reader checks the upper limit that depends on the gain. */
export function parseSlope(text: string): Parsed {
  const comma = commaProblem(text);
  if (comma) return comma;
  const t = clean(text).replace(/^s=?/, '');
  const n = parsePlainNumber(t);
  if (!n.ok) return { ok: false, reason: 'not a slope (try 1)' };
  if (!(n.value > 0)) return { ok: false, reason: 'slope must be above 0' };
  if (!(n.value >= LIMITS.slopeMin)) return { ok: false, reason: `slope must be at least ${LIMITS.slopeMin}` };
  return { ok: true, value: n.value };
}

/** Delay in ms, 0 ..= LIMITS.delayMsMax; a distance becomes time of flight at 343 m/s. */
export function parseDelayMs(text: string): Parsed {
  const comma = commaProblem(text);
  if (comma) return comma;
  const t = clean(text);
  const m = /^(.*?)(ms|us|\u00b5s|s|mm|cm|m)?$/.exec(t);
  const n = parsePlainNumber(m ? m[1] : t);
  if (!m || !n.ok) return { ok: false, reason: t === '' ? 'enter a delay in ms' : 'not a delay (try 1.5 ms or 34 cm)' };
  const unit = m[2] ?? 'ms';
  const perUnitMs: Record<string, number> = {
    ms: 1,
    us: 1e-3,
    '\u00b5s': 1e-3,
    s: 1000,
    m: 1000 / SPEED_OF_SOUND_M_PER_S,
    cm: 10 / SPEED_OF_SOUND_M_PER_S,
    mm: 1 / SPEED_OF_SOUND_M_PER_S,
  };
  const ms = n.value * perUnitMs[unit];
  if (ms < 0) return { ok: false, reason: 'delay must be 0 or more' };
  if (ms > LIMITS.delayMsMax) return { ok: false, reason: `delay must be at most ${LIMITS.delayMsMax} ms` };
  return { ok: true, value: ms };
}

/** An output gain in dB within the output limit. */
export function parseOutputGainDb(text: string): Parsed {
  return parseGainDb(text, LIMITS.outputGainDbAbsMax);
}

/** A sample rate in Hz ("48k", "44.1 kHz", "96000") within the plan limits. */
export function parseSampleRate(text: string): Parsed {
  const comma = commaProblem(text);
  if (comma) return comma;
  if (clean(text) === '') return { ok: false, reason: 'enter a sample rate (e.g. 48k)' };
  const f = parseFrequency(text);
  if (!f.ok) return { ok: false, reason: 'not a sample rate (try 48k)' };
  if (f.value < LIMITS.sampleRateMinHz || f.value > LIMITS.sampleRateMaxHz) {
    return { ok: false, reason: `sample rate must be ${LIMITS.sampleRateMinHz / 1000} to ${LIMITS.sampleRateMaxHz / 1000} kHz` };
  }
  return { ok: true, value: f.value };
}

// ---- display ------------------------------------------------------------------------------

/** Finite-or-dash: the app never shows NaN. */
function safe(x: number, f: (x: number) => string): string {
  return Number.isFinite(x) ? f(x) : '\u2013';
}

/** "63 Hz", "2.2 kHz", "12.5 kHz": src/format.ts (the command line's messages use it too). */
export { formatFrequency };

/** Compact axis label: "20", "200", "2k", "20k". */
export function formatFrequencyShort(hz: number): string {
  return safe(hz, (f) => (f >= 1000 ? `${+(f / 1000).toPrecision(3)}k` : `${+f.toPrecision(3)}`));
}

/** "+3.0 dB", "-4.5 dB", "0.0 dB". */
export function formatDb(db: number, digits = 1): string {
  return safe(db, (d) => {
    const s = d.toFixed(digits);
    const zero = Number(s) === 0;
    return `${zero ? '' : d > 0 ? '+' : ''}${zero ? (0).toFixed(digits) : s} dB`;
  });
}

export function formatQ(q: number): string {
  return safe(q, (x) => `${+x.toPrecision(3)}`);
}

export function formatMs(ms: number): string {
  return safe(ms, (x) => `${+x.toFixed(3)} ms`);
}

export function formatOctaves(oct: number): string {
  return safe(oct, (x) => `${+x.toPrecision(3)} oct`);
}

// ---- rounding of dragged and nudged values (the plan keeps what the user sees) ---------------

/** Frequency to 0.1 Hz below 100 Hz, 1 Hz below 10 kHz, 10 Hz above. */
export function roundFrequency(hz: number): number {
  if (hz < 100) return Math.round(hz * 10) / 10;
  if (hz < 10000) return Math.round(hz);
  return Math.round(hz / 10) * 10;
}

/** Gain to 0.1 dB. */
export function roundGain(db: number): number {
  const r = Math.round(db * 10) / 10;
  return Object.is(r, -0) ? 0 : r;
}

/** Q to 3 significant digits. */
export function roundQ(q: number): number {
  return Number(q.toPrecision(3));
}
