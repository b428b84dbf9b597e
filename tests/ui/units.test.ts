// What users type into the number fields, read as plan units. The forms are the trade's usual
// notations: SI prefixes ("2.2k"), the resistor-code "2k2" form (IEC 60062 letter-as-decimal-point
// notation), "dB", and bandwidth in octaves converted by the Audio EQ Cookbook's BW form.
import { describe, expect, it } from 'vitest';
import { qFromBandwidthOctaves } from '../../src/design/cookbook';
import {
  formatDb,
  formatFrequency,
  formatMs,
  formatQ,
  parseDelayMs,
  parseFrequency,
  parseGainDb,
  parseOutputGainDb,
  parsePlainNumber,
  parseQ,
  parseQOrBandwidth,
  parseSampleRate,
  parseSlope,
  roundFrequency,
  roundGain,
  roundQ,
  SPEED_OF_SOUND_M_PER_S,
} from '../../src/ui/units';

const value = (r: { ok: boolean; value?: unknown }) => (r.ok ? r.value : undefined);

describe('parseFrequency', () => {
  it.each([
    ['2200', 2200],
    ['2.2k', 2200],
    ['2k2', 2200], // resistor code: the letter stands for the decimal point (IEC 60062)
    ['2.2 kHz', 2200],
    ['2.2KHZ', 2200],
    ['800hz', 800],
    ['800 Hz', 800],
    ['1e3', 1000],
    ['  63 ', 63],
    ['0,5k', 500], // decimal comma
    ['10k', 10000],
  ])('%s -> %d Hz', (text, hz) => {
    expect(value(parseFrequency(text))).toBeCloseTo(hz, 9);
  });

  it.each(['', 'abc', '2.2 MHz', '--3', 'k', '1/3', 'NaN', 'Infinity', '1e999'])('refuses %j with a reason', (text) => {
    const r = parseFrequency(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason.length).toBeGreaterThan(5);
  });

  it('refuses 0 and negative frequencies', () => {
    expect(parseFrequency('0').ok).toBe(false);
    expect(parseFrequency('-100').ok).toBe(false);
  });

  it('refuses a frequency at or above Nyquist when given, naming it', () => {
    const r = parseFrequency('24k', 24000);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toContain('Nyquist (24 kHz)');
    expect(value(parseFrequency('23.9k', 24000))).toBe(23900);
  });
});

describe('parseGainDb', () => {
  it.each([
    ['-3', -3],
    ['-3 dB', -3],
    ['+2.5dB', 2.5],
    ['\u22124.5 dB', -4.5], // U+2212 minus sign, as pasted from typeset text
    ['0', 0],
    ['60', 60],
  ])('%s -> %d dB', (text, db) => {
    expect(value(parseGainDb(text))).toBe(db);
  });

  it('refuses gains beyond the plan limit of +-60 dB (LIMITS.gainDbAbsMax)', () => {
    const r = parseGainDb('61');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/60 dB/);
  });

  it.each(['', 'loud', '3 dBu', '3 V'])('refuses %j', (text) => expect(parseGainDb(text).ok).toBe(false));

  it('output gain has its own limit', () => {
    expect(parseOutputGainDb('-20 dB').ok).toBe(true);
    expect(parseOutputGainDb('-61').ok).toBe(false);
  });
});

describe('parseQOrBandwidth', () => {
  it('reads a plain Q', () => {
    expect(value(parseQOrBandwidth('0.707'))).toEqual({ kind: 'q', q: 0.707 });
    expect(value(parseQOrBandwidth('Q 2'))).toEqual({ kind: 'q', q: 2 });
  });

  it.each([
    ['1/3 oct', 1 / 3],
    ['1/3oct', 1 / 3],
    ['0.5 oct', 0.5],
    ['1 octave', 1],
    ['2 octaves', 2],
    ['1/6 Oct', 1 / 6],
  ])('%s is a bandwidth of %d octaves', (text, octaves) => {
    const r = parseQOrBandwidth(text);
    expect(r.ok).toBe(true);
    if (r.ok && r.value.kind === 'bandwidth') expect(r.value.octaves).toBeCloseTo(octaves, 12);
    else throw new Error('expected a bandwidth');
  });

  it('a 1/3-octave bandwidth gives Q about 4.32 at low frequency (cookbook BW form, analog limit)', () => {
    // Q = 1 / (2 sinh(ln2/2 * BW)); for BW = 1/3: 4.318 (Audio EQ Cookbook, w0/sin w0 -> 1).
    const q = qFromBandwidthOctaves(1 / 3, 100, 48000);
    expect(q).toBeCloseTo(4.318, 3);
  });

  it.each(['', '0', '-1', '0 oct', '1/0 oct', 'wide', '11 oct', '1001'])('refuses %j', (text) => expect(parseQOrBandwidth(text).ok).toBe(false));

  it('parseQ refuses Q <= 0 and Q above LIMITS.qMax (1000)', () => {
    expect(parseQ('0').ok).toBe(false);
    expect(parseQ('1000').ok).toBe(true);
    expect(parseQ('1000.1').ok).toBe(false);
  });

  it('parseSlope refuses S <= 0', () => {
    expect(value(parseSlope('1'))).toBe(1);
    expect(parseSlope('0').ok).toBe(false);
  });
});

describe('parseDelayMs', () => {
  it.each([
    ['1.5', 1.5],
    ['1.5 ms', 1.5],
    ['250 us', 0.25],
    ['250 \u00b5s', 0.25],
    ['0.5 s', 500],
    ['0', 0],
  ])('%s -> %d ms', (text, ms) => expect(value(parseDelayMs(text))).toBeCloseTo(ms, 12));

  it('turns a distance into time of flight at 343 m/s (speed of sound at 20 C, common practice)', () => {
    expect(SPEED_OF_SOUND_M_PER_S).toBe(343);
    expect(value(parseDelayMs('34.3 cm'))).toBeCloseTo(1, 12);
    expect(value(parseDelayMs('1 m'))).toBeCloseTo(1000 / 343, 12);
    expect(value(parseDelayMs('343 mm'))).toBeCloseTo(1, 12);
  });

  it.each(['', '-1', '-1 ms', 'soon', '10001', '11 s'])('refuses %j', (text) => expect(parseDelayMs(text).ok).toBe(false));
});

describe('parseSampleRate and parsePlainNumber', () => {
  it('reads rates with prefixes and refuses rates outside 8 to 384 kHz', () => {
    expect(value(parseSampleRate('48k'))).toBe(48000);
    expect(value(parseSampleRate('44.1 kHz'))).toBe(44100);
    expect(parseSampleRate('4k').ok).toBe(false);
    expect(parseSampleRate('400k').ok).toBe(false);
  });

  it('refuses non-numbers instead of returning NaN', () => {
    for (const t of ['NaN', 'Infinity', '', '1..2', '0x10']) expect(parsePlainNumber(t).ok).toBe(false);
  });
});

describe('display', () => {
  it('formats with units and never prints NaN', () => {
    expect(formatFrequency(2200)).toBe('2.2 kHz');
    expect(formatFrequency(63)).toBe('63 Hz');
    expect(formatFrequency(12500)).toBe('12.5 kHz');
    expect(formatDb(-4.5)).toBe('-4.5 dB');
    expect(formatDb(3)).toBe('+3.0 dB');
    expect(formatDb(-0.04)).toBe('0.0 dB'); // no "-0.0"
    expect(formatQ(0.70710678)).toBe('0.707');
    expect(formatMs(1.23456)).toBe('1.235 ms');
    for (const f of [formatFrequency, formatDb, formatQ, formatMs]) {
      expect(f(NaN)).not.toMatch(/NaN/);
      expect(f(Infinity)).not.toMatch(/Infinity/);
    }
  });

  it('rounds dragged values to what the fields show', () => {
    expect(roundFrequency(63.04)).toBe(63);
    expect(roundFrequency(1234.4)).toBe(1234);
    expect(roundFrequency(12345)).toBe(12350);
    expect(roundGain(-0.04)).toBe(0);
    expect(Object.is(roundGain(-0.04), -0)).toBe(false);
    expect(roundQ(4.31812)).toBe(4.32);
  });
});

describe('refusal wording: the reason, not the typed text again (the field still shows it)', () => {
  it('says what is wanted and asks for a value when empty', async () => {
    const { parseQ, parseQOrBandwidth, parseSampleRate } = await import('../../src/ui/units');
    const q = parseQOrBandwidth('NaN');
    expect(q.ok).toBe(false);
    if (!q.ok) expect(q.reason).toBe('not a Q (try 0.7, or a bandwidth such as 1/3 oct)');
    const bw = parseQOrBandwidth('abc oct');
    expect(!bw.ok && bw.reason).toBe('not a bandwidth (try 1/3 oct)');
    if (!bw.ok) expect(bw.reason).not.toMatch(/abc/);
    const empty = parseQ('  ');
    expect(!empty.ok && empty.reason).toBe('enter a Q (e.g. 0.7)');
    const rate = parseSampleRate('');
    expect(!rate.ok && rate.reason).toBe('enter a sample rate (e.g. 48k)');
  });
});

describe('commas are never silently read as decimals where they could group thousands', () => {
  it.each([
    ['1,500', /could be 1500 or 1\.500/],
    ['2,200 Hz', /could be 2200 or 2\.200/],
    ['1.500,5', /mixes commas and points/],
  ])('%s is refused with a hint', async (text, why) => {
    const { parseFrequency } = await import('../../src/ui/units');
    const r = parseFrequency(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(why);
  });

  it.each([
    ['1,5k', 1500], // decimal comma: a thousands group has three digits
    ['0,707', 0.707], // a group never follows a lone 0
    ['1,500.5', 1500.5], // a comma before the point groups thousands
    ['12,345', null], // ambiguous (12345 or 12.345): refused below
    ['1,234,567', 1234567],
  ])('%s reads as %s', async (text, want) => {
    const { parseFrequency, parsePlainNumber } = await import('../../src/ui/units');
    const r = text === '0,707' ? parsePlainNumber(text) : parseFrequency(text);
    if (want === null) expect(r.ok).toBe(false);
    else expect(r.ok && r.value).toBe(want);
  });

  it('gain, Q, delay and sample rate refuse "1,500" too', async () => {
    const u = await import('../../src/ui/units');
    for (const r of [u.parseGainDb('1,500'), u.parseQ('1,500'), u.parseDelayMs('1,500'), u.parseSampleRate('44,100'), u.parseQOrBandwidth('1,500 oct')]) {
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.reason).toMatch(/could be/);
    }
  });
});
