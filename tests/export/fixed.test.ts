/**
 * Fixed-point conversion, checked against an independent exact oracle: every double is
 * mantissa x 2^exponent exactly, so x x 2^n rounded to nearest with ties away from zero is computed
 * here with BigInt integer arithmetic (no floating point at all), then saturated at the Qm.n range
 * -2^(m+n-1) .. 2^(m+n-1) - 1 (the rule: common practice, references.md "Fixed-point coefficients").
 * Hex is compared with BigInt.asUintN(w, k), the two's complement of the word by definition.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fixedRange, fromFixed, fromHex, parseQFormat, roundHalfAwayFromZero, toFixed, toHex, type FixedFormat } from '../../src/export/fixed';

/** x = sign * mant * 2^exp exactly, from the IEEE 754 bits. */
function exactParts(x: number): { neg: boolean; mant: bigint; exp: number } {
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, x);
  const bits = view.getBigUint64(0);
  const neg = bits >> 63n === 1n;
  const e = Number((bits >> 52n) & 0x7ffn);
  const frac = bits & ((1n << 52n) - 1n);
  if (e === 0) return { neg, mant: frac, exp: -1074 };
  return { neg, mant: frac | (1n << 52n), exp: e - 1075 };
}

/** round(x * 2^n), ties away from zero, in exact integer arithmetic. */
function oracleRound(x: number, n: number): bigint {
  const { neg, mant, exp } = exactParts(x);
  const e = exp + n;
  let r: bigint;
  if (e >= 0) r = mant << BigInt(e);
  else {
    const den = 1n << BigInt(-e);
    const q = mant / den;
    const rem = mant - q * den;
    r = 2n * rem >= den ? q + 1n : q; // ties (2 rem = den) go up in magnitude
  }
  return neg ? -r : r;
}

function oracleFixed(x: number, f: FixedFormat): { integer: bigint; saturation: string } {
  const r = oracleRound(x, f.fractionBits);
  const half = 1n << BigInt(f.integerBits + f.fractionBits - 1);
  if (r > half - 1n) return { integer: half - 1n, saturation: 'high' };
  if (r < -half) return { integer: -half, saturation: 'low' };
  return { integer: r, saturation: 'none' };
}

/** Every word size 16..32 with a few splits of it (m + n = w and m + n < w). */
const FORMATS: FixedFormat[] = [];
for (let w = 16; w <= 32; w++) {
  for (const m of [1, 2, 5, 8]) {
    FORMATS.push({ integerBits: m, fractionBits: w - m, wordBits: w });
    if (w - m - 4 >= 0) FORMATS.push({ integerBits: m, fractionBits: w - m - 4, wordBits: w });
  }
}

describe('round to nearest, ties away from zero (exact)', () => {
  it.each([
    [0.5, 1],
    [-0.5, -1],
    [1.5, 2],
    [2.5, 3],
    [-2.5, -3],
    [0.49999999999999994, 0], // the classic floor(x + 0.5) trap: this must not round up
    [-0.49999999999999994, 0],
    [4503599627370495.5, 4503599627370496],
    [2.4999999999999996, 2],
  ])('%s -> %s', (x, r) => {
    expect(roundHalfAwayFromZero(x)).toBe(r);
    expect(Object.is(roundHalfAwayFromZero(-0.2), -0)).toBe(false);
  });
});

describe.each(FORMATS.map((f) => [`Q${f.integerBits}.${f.fractionBits} in ${f.wordBits} bits`, f] as const))('%s', (_name, f) => {
  const { min, max } = fixedRange(f);
  const lsb = 2 ** -f.fractionBits;

  it('has the range -2^(m+n-1) .. 2^(m+n-1) - 1', () => {
    expect(BigInt(max)).toBe((1n << BigInt(f.integerBits + f.fractionBits - 1)) - 1n);
    expect(BigInt(min)).toBe(-(1n << BigInt(f.integerBits + f.fractionBits - 1)));
  });

  it('rounds ties away from zero on both signs', () => {
    for (const k of [0, 1, 2, 7, 1000]) {
      const tie = (k + 0.5) * lsb;
      expect(toFixed(tie, f)).toEqual({ integer: k + 1, saturation: 'none' });
      expect(toFixed(-tie, f)).toEqual({ integer: -(k + 1), saturation: 'none' });
      // Just below a tie rounds down (one ulp less than the tie, in the scaled domain).
      const below = (k + 0.5 - 2 ** -20) * lsb;
      expect(toFixed(below, f).integer).toBe(k);
    }
  });

  it('saturates at both ends and flags which', () => {
    const top = 2 ** (f.integerBits - 1); // one LSB above the largest value
    expect(toFixed(top, f)).toEqual({ integer: max, saturation: 'high' });
    expect(toFixed(top - lsb, f)).toEqual({ integer: max, saturation: 'none' });
    // max + 0.5 LSB rounds (away from zero) to max + 1: saturates. max + 0.25 LSB does not.
    expect(toFixed((max + 0.5) * lsb, f)).toEqual({ integer: max, saturation: 'high' });
    expect(toFixed((max + 0.25) * lsb, f)).toEqual({ integer: max, saturation: 'none' });
    expect(toFixed(-top, f)).toEqual({ integer: min, saturation: 'none' }); // the most negative value fits
    expect(toFixed((min - 0.5) * lsb, f)).toEqual({ integer: min, saturation: 'low' });
    expect(toFixed((min - 0.25) * lsb, f)).toEqual({ integer: min, saturation: 'none' });
    expect(toFixed(-1e6, f)).toEqual({ integer: min, saturation: 'low' });
    expect(toFixed(1e6, f)).toEqual({ integer: max, saturation: 'high' });
  });

  it('writes negative numbers as the two\'s complement of the word', () => {
    const digits = Math.ceil(f.wordBits / 4);
    for (const k of [-1, -2, min, min + 1, max, 0, 1, -12345]) {
      const expected = '0x' + BigInt.asUintN(f.wordBits, BigInt(k)).toString(16).toUpperCase().padStart(digits, '0');
      expect(toHex(k, f.wordBits)).toBe(expected);
      expect(fromHex(expected, f.wordBits)).toBe(k);
    }
    // -1 is all ones: the top digit holds the w mod 4 leftover bits.
    const top = f.wordBits % 4 === 0 ? 'F' : ((1 << f.wordBits % 4) - 1).toString(16).toUpperCase();
    expect(toHex(-1, f.wordBits)).toBe('0x' + top + 'F'.repeat(digits - 1));
  });

  it('agrees with the exact BigInt oracle on random doubles', () => {
    fc.assert(
      fc.property(fc.double({ min: -40, max: 40, noNaN: true, noDefaultInfinity: true }), (x) => {
        const got = toFixed(x, f);
        const want = oracleFixed(x, f);
        return BigInt(got.integer) === want.integer && got.saturation === want.saturation;
      }),
      { numRuns: 300, seed: 4 },
    );
  });

  it('reads an integer back exactly as integer / 2^n', () => {
    for (const k of [min, -1, 0, 1, max]) expect(fromFixed(k, f) * 2 ** f.fractionBits).toBe(k);
  });
});

describe('hex words', () => {
  it('refuses what does not fit the word', () => {
    expect(fromHex('0x1FFFF', 16)).toBeNull();
    expect(fromHex('0xG1', 16)).toBeNull();
    expect(() => toHex(32768, 16)).toThrow();
    expect(() => toHex(-32769, 16)).toThrow();
  });
  it('sign-extends 32-bit words of Q5.23', () => {
    expect(fromHex('0xFF800000', 32)).toBe(-(2 ** 23));
    expect(toHex(-(2 ** 23), 32)).toBe('0xFF800000');
  });
});

describe('Qm.n names', () => {
  it('parses Q5.23 and refuses more than 32 bits', () => {
    expect(parseQFormat('Q5.23')).toEqual({ integerBits: 5, fractionBits: 23, wordBits: 32 });
    expect(parseQFormat('q1.15')).toEqual({ integerBits: 1, fractionBits: 15, wordBits: 16 });
    expect(parseQFormat('Q1.7')).toEqual({ integerBits: 1, fractionBits: 7, wordBits: 16 });
    expect(parseQFormat('Q2.31')).toBeNull();
    expect(parseQFormat('Q0.31')).toBeNull();
    expect(parseQFormat('5.23')).toBeNull();
  });
});
