/**
 * The acoustic offset field of an output: what a user types, read as the plan's
 * `AcousticOffset` (docs/plan-format.md), and written back for display.
 *
 * Accepted (case-insensitive, spaces ignored, "," as decimal mark, U+2212 minus):
 *   a distance "25", "25 mm", "2.5 cm", "-0.03 m"   -> kept in mm (a plain number is mm)
 *   a time     "0.07 ms", "70 us", "70 \u00b5s"      -> kept in ms
 * A distance stays a distance in the plan, so it follows the plan's air temperature; empty text
 * or zero means no offset. Positive: the driver is farther from the listener than its
 * measurement shows (its sound arrives later).
 */
import { speedOfSoundMps } from '../measure/acoustic';
import { DEFAULT_AIR_TEMPERATURE_C, LIMITS, type AcousticOffset } from '../plan/types';
import { parsePlainNumber, type Parsed } from './units';

const UNITS: Record<string, { unit: AcousticOffset['unit']; scale: number }> = {
  mm: { unit: 'mm', scale: 1 },
  cm: { unit: 'mm', scale: 10 },
  m: { unit: 'mm', scale: 1000 },
  ms: { unit: 'ms', scale: 1 },
  us: { unit: 'ms', scale: 1e-3 },
  '\u00b5s': { unit: 'ms', scale: 1e-3 },
};

/** An offset, or null for none (empty text or zero). */
export function parseAcousticOffset(text: string): Parsed<AcousticOffset | null> {
  const t = text.trim().toLowerCase().replace(/\u2212/g, '-').replace(/\s+/g, '').replace(/,/g, '.');
  if (t === '') return { ok: true, value: null };
  const m = /^(.*?)(mm|cm|ms|us|\u00b5s|m)?$/.exec(t)!;
  const n = parsePlainNumber(m[1]);
  if (!n.ok) return { ok: false, reason: `"${text.trim()}" is not an offset (try 25 mm or 0.07 ms)` };
  const u = UNITS[m[2] ?? 'mm'];
  const value = n.value * u.scale;
  if (value === 0) return { ok: true, value: null };
  const max = u.unit === 'mm' ? LIMITS.acousticOffsetMmAbsMax : LIMITS.acousticOffsetMsAbsMax;
  if (Math.abs(value) > max) return { ok: false, reason: `offset must be within +/-${max} ${u.unit}` };
  return { ok: true, value: { value, unit: u.unit } };
}

/** "25 mm", "-0.07 ms", "0 mm" for none. */
export function formatAcousticOffset(o: AcousticOffset | undefined): string {
  if (!o) return '0 mm';
  const digits = o.unit === 'mm' ? 1 : 3;
  return `${Number(o.value.toFixed(digits))} ${o.unit}`;
}

/**
 * The same text as a distance in mm (the app's field keeps offsets as distances): a time is
 * turned into the distance sound travels in it at the plan's air temperature (ms x m/s = mm).
 */
export function parseAcousticOffsetMm(text: string, airTemperatureC: number = DEFAULT_AIR_TEMPERATURE_C): Parsed {
  const r = parseAcousticOffset(text);
  if (!r.ok) return r;
  if (r.value === null) return { ok: true, value: 0 };
  const mm = r.value.unit === 'mm' ? r.value.value : r.value.value * speedOfSoundMps(airTemperatureC);
  if (Math.abs(mm) > LIMITS.acousticOffsetMmAbsMax) return { ok: false, reason: `offset must be within +/-${LIMITS.acousticOffsetMmAbsMax} mm` };
  return { ok: true, value: mm };
}

/** An offset as a distance in mm (0 for none), for the app's field. */
export function acousticOffsetMm(o: AcousticOffset | undefined, airTemperatureC: number = DEFAULT_AIR_TEMPERATURE_C): number {
  if (!o) return 0;
  return o.unit === 'mm' ? o.value : o.value * speedOfSoundMps(airTemperatureC);
}
