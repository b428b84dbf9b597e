/**
 * Fixed-point conversion: Qm.n in a word of w bits (common practice, no single source; see
 * docs/plan-format.md, "Board profile").
 *
 * - m integer bits (sign included), n fraction bits, m + n <= w, 16 <= w <= 32.
 * - integer = round-to-nearest(x * 2^n), ties away from zero (0.5 LSB goes up in magnitude:
 *   2.5 -> 3, -2.5 -> -3).
 * - The Qm.n range is -2^(m+n-1) .. 2^(m+n-1) - 1 (the word's own range when m + n = w); a rounded
 *   value outside it saturates at that end and is flagged.
 * - Hex is the two's complement of the word width (w bits, sign-extended from m + n bits).
 *
 * Exactness without BigInt: x * 2^n (n >= 0) is a power-of-two scaling up, exact for every finite
 * double below 2^990 (a subnormal only gains exponent; no bit is lost). Rounding uses floor and a subtraction that is
 * exact by Sterbenz's lemma (floor(a) <= a < 2 floor(a) for a >= 1; for a < 1 the floor is 0). Every
 * integer involved is below 2^33 in magnitude, far inside the 2^53 of exact doubles, so the two's
 * complement (integer + 2^w) is exact too.
 */

export interface FixedFormat {
  integerBits: number;
  fractionBits: number;
  wordBits: number;
}

export type Saturation = 'none' | 'high' | 'low';

export interface FixedValue {
  /** The signed integer written (after saturation). */
  integer: number;
  saturation: Saturation;
}

/** Rounds to the nearest integer, ties away from zero; exact for every finite double. */
export function roundHalfAwayFromZero(v: number): number {
  const a = Math.abs(v);
  if (a >= 2 ** 52) return v; // already an integer
  const f = Math.floor(a);
  const frac = a - f; // exact (see the file comment)
  const r = frac >= 0.5 ? f + 1 : f;
  return r === 0 ? 0 : v < 0 ? -r : r;
}

export function fixedRange(f: FixedFormat): { min: number; max: number } {
  const half = 2 ** (f.integerBits + f.fractionBits - 1);
  return { min: -half, max: half - 1 };
}

/** The value of one LSB: 2^-n. */
export function lsb(f: FixedFormat): number {
  return 2 ** -f.fractionBits;
}

/** x in Qm.n: rounded (ties away from zero), then saturated at the format's ends. */
export function toFixed(x: number, f: FixedFormat): FixedValue {
  if (!Number.isFinite(x)) throw new RangeError(`cannot convert ${x} to Q${f.integerBits}.${f.fractionBits}`);
  const r = roundHalfAwayFromZero(x * 2 ** f.fractionBits);
  const { min, max } = fixedRange(f);
  if (r > max) return { integer: max, saturation: 'high' };
  if (r < min) return { integer: min, saturation: 'low' };
  return { integer: r, saturation: 'none' };
}

/** The value an integer stands for: integer / 2^n (exact). */
export function fromFixed(integer: number, f: FixedFormat): number {
  return integer * 2 ** -f.fractionBits;
}

/** Two's complement of the word width, upper-case hex with 0x and ceil(w/4) digits. */
export function toHex(integer: number, wordBits: number): string {
  if (!Number.isInteger(integer) || integer < -(2 ** (wordBits - 1)) || integer >= 2 ** (wordBits - 1)) {
    throw new RangeError(`${integer} does not fit a ${wordBits}-bit word`);
  }
  const u = integer < 0 ? integer + 2 ** wordBits : integer;
  return '0x' + u.toString(16).toUpperCase().padStart(Math.ceil(wordBits / 4), '0');
}

/**
 * Reads a hex word (with or without 0x) as the two's complement of `wordBits`; null when it is not
 * hex or does not fit the word.
 */
export function fromHex(text: string, wordBits: number): number | null {
  const m = /^[+]?(?:0x)?([0-9a-f]+)$/i.exec(text.trim());
  if (!m || m[1].length > 16) return null;
  const u = parseInt(m[1], 16);
  if (!(u < 2 ** wordBits)) return null;
  return u >= 2 ** (wordBits - 1) ? u - 2 ** wordBits : u;
}

/** "Q5.23", "Q1.31"; parsed back by `parseQFormat`. */
export function qName(f: { integerBits: number; fractionBits: number }): string {
  return `Q${f.integerBits}.${f.fractionBits}`;
}

/** Parses "Q5.23" (word: 16 bits when m + n fits, else 32); null when malformed or out of range. */
export function parseQFormat(text: string): FixedFormat | null {
  const m = /^Q(\d{1,2})\.(\d{1,2})$/i.exec(text.trim());
  if (!m) return null;
  const integerBits = Number(m[1]);
  const fractionBits = Number(m[2]);
  const bits = integerBits + fractionBits;
  if (integerBits < 1 || bits > 32) return null;
  return { integerBits, fractionBits, wordBits: bits <= 16 ? 16 : 32 };
}
