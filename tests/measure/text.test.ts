/**
 * Text column import: every rule of docs/measurements.md ("Text columns"), each refusal with its
 * line number, and a fuzz over damaged files (always a MeasurementFileError or a valid result).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { MeasurementFileError, measurementName } from '../../src/measure/errors';
import { parseMeasurementText, unwrapDegrees } from '../../src/measure/text';

function refusal(text: string): MeasurementFileError {
  try {
    parseMeasurementText(text, 'x');
  } catch (e) {
    expect(e).toBeInstanceOf(MeasurementFileError);
    return e as MeasurementFileError;
  }
  throw new Error('expected a refusal');
}

describe('separators', () => {
  it('spaces, tabs, commas and semicolons give the same points', () => {
    const expected = { f: [20, 1000.5, 20000], m: [-3.25, 0, 1.5e-1], p: [10, -20.5, 30] };
    const files = [
      '20 -3.25 10\n1000.5   0 -20.5\n20000 1.5e-1 30\n',
      '20\t-3.25\t10\n1000.5\t0\t-20.5\n20000\t1.5e-1\t30\n',
      '20,-3.25,10\n1000.5, 0, -20.5\n20000,1.5e-1,30\n',
      '20;-3.25;10\r\n1000.5; 0 ;-20.5\r\n20000;1.5e-1;30\r\n',
      '20;-3,25;10\n1000,5;0;-20,5\n20000;1,5e-1;30;\n',
      '20\t-3,25\t10\n1000,5\t0\t-20,5\n20000\t1,5e-1\t30\n',
    ];
    for (const text of files) {
      const m = parseMeasurementText(text, 'sep');
      expect(m.frequencyHz).toEqual(expected.f);
      expect(m.magnitudeDb).toEqual(expected.m);
      expect(m.phaseDeg).toEqual(expected.p);
      expect(m.delayMs).toBe(0);
      expect(m.phaseEstimated).toBe(false);
    }
  });

  it('two columns are a magnitude-only measurement (phase null)', () => {
    const m = parseMeasurementText('100 -1\n200 -2\n', 'mag');
    expect(m.phaseDeg).toBeNull();
    expect(m.name).toBe('mag');
  });

  it('columns beyond the third are ignored', () => {
    const m = parseMeasurementText('100 -1 5 0.99\n200 -2 6 0.98\n', 'x');
    expect(m.phaseDeg).toEqual([5, 6]);
  });
});

describe('comment and header lines', () => {
  it('are skipped anywhere and the first few kept as notes, comment marks removed', () => {
    const text = [
      '* Invented measurement, 1 m on axis',
      '# mic: calibrated',
      '',
      'Freq(Hz)  SPL(dB)  Phase(deg)',
      '100 90 0',
      '; a note in the middle',
      '200 91 -10',
    ].join('\n');
    const m = parseMeasurementText(text, 'n');
    expect(m.notes).toEqual(['Invented measurement, 1 m on axis', 'mic: calibrated', 'Freq(Hz)  SPL(dB)  Phase(deg)', 'a note in the middle']);
    expect(m.frequencyHz).toEqual([100, 200]);
  });

  it('keeps at most 8 notes', () => {
    const text = Array.from({ length: 20 }, (_, i) => `# note ${i}`).join('\n') + '\n1 0\n2 0\n';
    expect(parseMeasurementText(text, 'n').notes).toHaveLength(8);
  });
});

describe('phase', () => {
  it('wrapped phase is unwrapped; unwrapped phase is kept', () => {
    const wrapped = parseMeasurementText('1 0 170\n2 0 -170\n3 0 -150\n4 0 170\n', 'w');
    expect(wrapped.phaseDeg).toEqual([170, 190, 210, 170]);
    const unwrapped = parseMeasurementText('1 0 -100\n2 0 -400\n3 0 -700\n', 'u');
    // Steps of -300 degrees are taken as +60 (the nearest whole-turn equivalent): the same
    // complex values, the smallest step between neighbours.
    expect(unwrapped.phaseDeg).toEqual([-100, -40, 20]);
  });

  it('unwrapDegrees brings each step into [-180, 180)', () => {
    expect(unwrapDegrees([0, 180, 360, 540])).toEqual([0, -180, -360, -540]);
    expect(unwrapDegrees([0, 179, 358, 537])).toEqual([0, 179, 358, 537]);
  });
});

describe('refusals name the line', () => {
  const cases: [string, string, number | null, RegExp][] = [
    ['a repeated frequency', '# h\n100 0\n100 1\n', 3, /repeats/],
    ['a step backwards', '100 0\n200 1\n150 1\n', 3, /below/],
    ['a non-number', '100 0\n200 abc\n', 2, /magnitude "abc" is not a number/],
    ['a NaN magnitude', '100 0\n200 NaN\n', 2, /not a number/],
    ['a NaN frequency line', '100 0\nNaN 1\n', 2, /frequency "NaN"/],
    ['an Infinity', '100 0\n200 Infinity\n', 2, /not a number/],
    ['an overflowing number', '100 0\n200 1e999\n', 2, /out of range/],
    ['a zero frequency', '0 0\n200 1\n', 1, /> 0/],
    ['a negative frequency', '-5 0\n200 1\n', 1, /> 0/],
    ['one column', '100\n200\n', 1, /two columns/],
    ['phase on some lines only', '100 0 5\n200 1\n', 2, /2 column\(s\) where line 1 has 3/],
    ['an empty field', '100;;5\n200;1;5\n', 1, /magnitude is empty/],
    ['a thousands separator', '1,000;0\n2,000,5;1\n', 2, /not a number/],
    ['fewer than 2 points', '# only one\n100 0\n', null, /at least 2/],
    ['no data at all', '', null, /0 data point/],
  ];
  it.each(cases)('%s', (_what, text, line, message) => {
    const e = refusal(text);
    expect(e.line).toBe(line);
    expect(e.message).toMatch(message);
    if (line !== null) expect(e.message.startsWith(`line ${line}: `)).toBe(true);
    expect(e.message).not.toMatch(/\n\s+at /); // a readable line, no stack
  });

  it('fuzzed files: either a valid measurement or a MeasurementFileError, never another error', () => {
    const good = '# header\n20 -1 10\n100 0 5\n1000 1 -20\n10000 2 -90\n';
    fc.assert(
      fc.property(fc.integer({ min: 0, max: good.length - 1 }), fc.string({ maxLength: 4 }), (at, insert) => {
        const text = good.slice(0, at) + insert + good.slice(at + 1);
        try {
          const m = parseMeasurementText(text, 'f');
          for (let i = 1; i < m.frequencyHz.length; i++) expect(m.frequencyHz[i]).toBeGreaterThan(m.frequencyHz[i - 1]);
          expect(m.frequencyHz.every((f) => Number.isFinite(f) && f > 0)).toBe(true);
          expect(m.magnitudeDb.every(Number.isFinite)).toBe(true);
        } catch (e) {
          expect(e).toBeInstanceOf(MeasurementFileError);
        }
      }),
      { numRuns: 500, seed: 42 },
    );
  });
});

describe('measurementName', () => {
  it('is the base name without its extension', () => {
    expect(measurementName('/a/b/woofer 1m.txt')).toBe('woofer 1m');
    expect(measurementName('C:\\m\\room.left.frd')).toBe('room.left');
    expect(measurementName('noext')).toBe('noext');
    expect(measurementName('.hidden')).toBe('.hidden');
  });
});

it('reads 100,000 lines (speed goal in npm run bench; here only the result)', () => {
  const lines: string[] = ['Frequency Magnitude Phase'];
  for (let i = 0; i < 100_000; i++) lines.push(`${(10 * Math.pow(2, i / 5000)).toPrecision(12)}\t${(Math.sin(i / 1000) * 6).toFixed(4)}\t${((i * 7) % 360) - 180}`);
  const m = parseMeasurementText(lines.join('\n'), 'big');
  expect(m.frequencyHz).toHaveLength(100_000);
  expect(m.notes).toEqual(['Frequency Magnitude Phase']);
});
