/**
 * Round trips of every export format in every kind of profile: what `import` reads back is
 * exactly what the board computes (the quantized sections), and a float export reads back to the
 * very same doubles (shortest round-trip decimals, ECMAScript Number::toString). The C header is
 * also compiled with the system C compiler (gcc) and its arrays printed, as an outside check that
 * it is valid C whose numbers are the ones listed.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { diagnosticMessage } from '../../src/diagnostics';
import { describe, expect, it } from 'vitest';
import { designPlan } from '../../src/design/chain';
import { EXPORT_FORMATS, formatExport, cIdentifier } from '../../src/export/format';
import { importedPlan, parseCoefficientList } from '../../src/export/import';
import { buildExportList, type ExportList } from '../../src/export/list';
import { BUILT_IN_PROFILES, copyProfile, effectiveOrder } from '../../src/export/profiles';
import { readPlanText } from '../../src/plan/read';
import type { BoardProfile, Plan } from '../../src/plan/types';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));

function demo(name: string): Plan {
  const r = readPlanText(readFileSync(ASSETS + name, 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}

/** The two demos, plus one with gain, polarity, delay, a shelf and a raw band. */
function plans(): Plan[] {
  const extra = demo('two-way-monitor.bqplan');
  extra.name = 'Gain, polarity and delay';
  extra.outputs[0].gainDb = -7.25;
  extra.outputs[1].invert = true;
  extra.outputs[1].delayMs = 0.37;
  extra.outputs[1].bands.push({ id: 's', type: 'highShelf', frequency: 9000, gainDb: 2.5, slope: 0.7, enabled: true });
  extra.outputs[0].bands.push({ id: 'r', type: 'raw', frequency: 1000, enabled: true, coefficients: { b0: 0.9, b1: -0.3, b2: 0.1, a0: 1, a1: -0.25, a2: 0.125 } });
  return [demo('two-way-monitor.bqplan'), demo('three-way-hall.bqplan'), extra];
}

function custom(changes: Partial<BoardProfile>): BoardProfile {
  return { ...copyProfile(BUILT_IN_PROFILES[0].profile), name: 'custom', sectionBudget: 64, ...changes };
}

const PROFILES: BoardProfile[] = [
  ...BUILT_IN_PROFILES.map((b) => b.profile),
  custom({ name: 'a1 a2 first, a0 written, negated', order: ['a1', 'a2', 'b0', 'b1', 'b2'], writeA0: true, feedbackSign: 'negated' }),
  custom({ name: 'decimal 7 digits, gain folded', number: { kind: 'decimal', significantDigits: 7 }, gain: 'first-section', delayUnit: 'ms' }),
  custom({ name: 'Q4.20 hex in 24 bits, halved, user order', order: ['b2', 'a2', 'b1', 'a1', 'b0'], number: { kind: 'fixed', integerBits: 4, fractionBits: 20, wordBits: 24, notation: 'hex' }, coefficientScale: 0.5 }),
  custom({ name: 'Q2.14 in 16 bits, a0 placed first', order: ['a0', 'b0', 'b1', 'b2', 'a1', 'a2'], writeA0: true, number: { kind: 'fixed', integerBits: 2, fractionBits: 14, wordBits: 16, notation: 'decimal' } }),
  custom({ name: 'Q3.29 quarter scale, folded gain', number: { kind: 'fixed', integerBits: 3, fractionBits: 29, wordBits: 32, notation: 'decimal' }, coefficientScale: 0.25, gain: 'first-section' }),
];

function listOf(plan: Plan, profile: BoardProfile): ExportList {
  const r = buildExportList(plan, profile);
  if (!r.ok) throw new Error(r.problems.map(diagnosticMessage).join('; '));
  return r.list;
}

const CASES = plans().flatMap((plan) => PROFILES.flatMap((profile) => EXPORT_FORMATS.map((format) => [plan.name, profile.name, format, plan, profile] as const)));

describe('every format reads back to what the board computes', () => {
  it.each(CASES)('%s / %s / %s', (_p, _q, format, plan, profile) => {
    const list = listOf(plan, profile);
    const text = formatExport(list, format);
    const r = parseCoefficientList(text, profile);
    if (!r.ok) throw r.error;
    expect(r.list.outputs.map((o) => o.id)).toEqual(list.outputs.map((o) => o.exportName));
    if (format !== 'csv') expect(r.list.sampleRate).toBe(list.sampleRate); // CSV has no place for it
    r.list.outputs.forEach((o, i) => {
      const want = list.outputs[i];
      expect(o.sections.length).toBe(want.sections.length);
      o.sections.forEach((s, k) => {
        const q = want.sections[k].quantized;
        // Exact equality: every step of the round trip is exact.
        expect([s.b0, s.b1, s.b2, s.a1, s.a2]).toEqual([q.b0, q.b1, q.b2, q.a1, q.a2]);
        expect(s.a0).toBe(1);
        if (format !== 'csv' || s.from !== undefined) expect(s.from).toBe(want.sections[k].from);
      });
      expect(o.gain).toBe(want.gain.written ? want.gain.quantized : null);
      expect(o.delay?.value).toBe(profile.delayUnit === 'samples' ? want.delay.samples : want.delay.ms);
    });
  });
});

describe('float export then import is exact', () => {
  const float = BUILT_IN_PROFILES[0].profile;
  it.each(plans().flatMap((p) => EXPORT_FORMATS.map((f) => [p.name, f, p] as const)))('%s / %s', (_n, format, plan) => {
    const text = formatExport(listOf(plan, float), format);
    const r = parseCoefficientList(text, float);
    if (!r.ok) throw r.error;
    const back = importedPlan(r.list, 'imported', plan.sampleRate);
    const original = designPlan(plan);
    const again = designPlan(back);
    again.forEach((d, i) => {
      expect(d.sections.map(({ from: _f, ...s }) => s)).toEqual(original[i].sections.map(({ from: _f, ...s }) => s));
      expect(d.gain).toBeCloseTo(original[i].gain, 12); // through gainDb: 20 log10 and back
    });
  });
});

describe('the JSON export carries the per-section report', () => {
  it('saturation, pole radius and stability beside the numbers', () => {
    const q131 = BUILT_IN_PROFILES.find((b) => b.key === 'q1.31-negated')!.profile;
    const list = listOf(plans()[0], q131);
    const doc = JSON.parse(formatExport(list, 'json'));
    const s = doc.outputs[0].sections[0];
    expect(s.saturated).toEqual(list.outputs[0].sections[0].saturated);
    expect(s.saturated).toContain('a1');
    expect(s.poleRadius).toBe(list.outputs[0].sections[0].poleRadius);
    expect(s.stable).toBe(true);
    expect(doc.outputs[0].gainSaturated).toBe(true); // 1.0 does not fit Q1.31
    expect(doc.notes.join(' ')).toMatch(/saturated coefficients/);
  });
});

describe('import of pasted lists', () => {
  const q523 = BUILT_IN_PROFILES.find((b) => b.key === 'q5.23')!.profile;
  it('reads bare lines of hex words with comments and mixed separators', () => {
    const r = parseCoefficientList('// pasted\n0x00800000, 0, 0; 0 0\n00400000\t0 0 0 0 # half\n', q523);
    if (!r.ok) throw r.error;
    expect(r.list.outputs[0].sections.map((s) => s.b0)).toEqual([1, 0.5]);
  });
  it('names the line of a short row', () => {
    const r = parseCoefficientList('0x00800000 0 0 0 0\n0x00800000 0 0 0\n', q523);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toBe('line 2: expected 5 numbers (b0 b1 b2 a1 a2), found 4');
  });
  it('refuses an integer outside the Q format', () => {
    const q131 = BUILT_IN_PROFILES.find((b) => b.key === 'q1.31-negated')!.profile;
    const r = parseCoefficientList('2147483648 0 0 0 0\n', q131);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toMatch(/line 1: 2147483648 is outside Q1.31/);
  });
  it('undoes negated feedback and halving exactly', () => {
    const halved = BUILT_IN_PROFILES.find((b) => b.key === 'q2.30-halved')!.profile;
    // b0 = 1 halved = 0.5 = 2^29 in Q2.30; a1 = -1.5 halved = -0.75.
    const r = parseCoefficientList(`${2 ** 29} 0 0 ${-0.75 * 2 ** 30} 0\n`, halved);
    if (!r.ok) throw r.error;
    expect(r.list.outputs[0].sections[0]).toMatchObject({ b0: 1, a1: -1.5 });
    const neg = BUILT_IN_PROFILES.find((b) => b.key === 'q1.31-negated')!.profile;
    const n = parseCoefficientList(`${2 ** 30} 0 0 ${2 ** 30} ${-(2 ** 29)}\n`, neg);
    if (!n.ok) throw n.error;
    expect(n.list.outputs[0].sections[0]).toMatchObject({ b0: 0.5, a1: -0.5, a2: 0.25 });
  });
});

describe('import of an edited JSON export', () => {
  const float = BUILT_IN_PROFILES[0].profile;
  const json = () => {
    const r = buildExportList(demo('two-way-monitor.bqplan'), float);
    if (!r.ok) throw new Error(diagnosticMessage(r.problems[0]));
    return formatExport(r.list, 'json');
  };
  it('refuses a bare NaN at the field path of the coefficient that holds it', () => {
    const text = json().replace(/("coefficients": \[\s*)[-0-9.e]+/, '$1NaN');
    expect(text).toContain('NaN');
    const r = parseCoefficientList(text, float);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toBe('outputs[0].sections[0].coefficients[0]: must be a finite number, not NaN (not valid JSON either)');
  });
  it('says when the text is not JSON at all', () => {
    const r = parseCoefficientList(json().slice(0, -3), float, 'json');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toMatch(/^not valid JSON at line \d+, column \d+ \(unexpected end of text\)$/);
  });
});

describe('the C header compiles and holds the listed numbers (gcc)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'bq-c-'));
  const plan = plans()[2];
  it.each(PROFILES.map((p) => [p.name, p] as const))('%s', (_n, profile) => {
    const list = listOf(plan, profile);
    writeFileSync(join(dir, 'coeffs.h'), formatExport(list, 'c'));
    const n = effectiveOrder(profile).length;
    const fixed = profile.number.kind === 'fixed';
    const fmt = fixed ? '%lld' : '%.17g';
    const cast = fixed ? '(long long)' : '';
    const body = list.outputs
      .map((o) => {
        const id = cIdentifier(o.id).toLowerCase();
        return `for (int i = 0; i < ${o.sections.length}; i++) for (int j = 0; j < ${n}; j++) printf("${fmt}\\n", ${cast}bq_${id}_sos[i][j]);`;
      })
      .join('\n');
    writeFileSync(join(dir, 'main.c'), `#include <stdio.h>\n#include "coeffs.h"\nint main(void) {\n${body}\nreturn 0;\n}\n`);
    execFileSync('gcc', ['-std=c99', '-Wall', '-Werror', '-Wno-unused-const-variable', '-o', join(dir, 'main'), join(dir, 'main.c')]);
    const printed = execFileSync(join(dir, 'main'), { encoding: 'utf8' }).trim().split('\n');
    const hex = profile.number.kind === 'fixed' && profile.number.notation === 'hex';
    const word = profile.number.kind === 'fixed' ? profile.number.wordBits : 0;
    const expected = list.outputs.flatMap((o) =>
      o.sections.flatMap((s) => s.written.map((w) => (hex ? String(BigInt.asUintN(word, BigInt(w.number.value))) : fixed ? String(w.number.value) : String(w.number.value)))),
    );
    expect(printed.map((x) => (fixed ? x : String(Number(x))))).toEqual(expected);
  });
});
