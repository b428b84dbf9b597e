/**
 * Hostile and broken plan files: control characters in names and ids, parameters the maths does
 * not support (Q 5e-324, coefficients near 1e308), nesting 5,000 levels deep, a UTF-8 byte order
 * mark, JSON syntax errors. Every one must end in a one-line refusal naming the field (or line and
 * column) and exit code 1, never a stack trace, NaN or a line an export reader takes as data.
 * The plan contract: docs/plan-format.md ("Conventions", "Limits").
 */
import { describe, expect, it } from 'vitest';
import { diagnosticMessage, targetPath, type Diagnostic } from '../../src/diagnostics';

const messageOf = (d: Diagnostic | undefined): string | undefined => (d ? diagnosticMessage(d) : undefined);
import { runCli, type CliIo } from '../../src/cli/run';
import { readPlanText, readPlanValue } from '../../src/plan/read';
import { firstSyntaxError } from '../../src/plan/json';
import type { Plan } from '../../src/plan/types';
import { buildExportList } from '../../src/export/list';
import { EXPORT_FORMATS, formatExport } from '../../src/export/format';
import { parseCoefficientList } from '../../src/export/import';
import { findBuiltInProfile } from '../../src/export/profiles';
import { maxShelfSlope, safeShelfSlope, designBand } from '../../src/design/cookbook';
import { poleRadius } from '../../src/analysis/poles';
import { analyzePlan } from '../../src/analysis/check';

const memoryIo = (files: Record<string, string>): CliIo => ({
  readText: (p) => {
    if (!(p in files)) throw new Error('no such file');
    return files[p];
  },
});

const base = (): Record<string, any> => ({
  format: 'biquadrant.plan',
  version: 2,
  name: 'hostile',
  sampleRate: 48000,
  input: { bands: [{ id: 'in1', type: 'peaking', frequency: 100, gainDb: -3, q: 1 }] },
  outputs: [{ id: 'a', name: 'A', bands: [{ id: 'b1', type: 'peaking', frequency: 1000, gainDb: 2, q: 1 }] }],
  profile: { name: 'board', sectionBudget: 16 },
});

const ATTACK = 'x\n gain 0x07FFFFFF';

describe('control characters are refused in every name and id', () => {
  const places: [string, (p: Record<string, any>, v: string) => void, string][] = [
    ['plan name', (p, v) => (p.name = v), 'name'],
    ['output name', (p, v) => (p.outputs[0].name = v), 'outputs[0].name'],
    ['output id', (p, v) => (p.outputs[0].id = v), 'outputs[0].id'],
    ['output band id', (p, v) => (p.outputs[0].bands[0].id = v), 'outputs[0].bands[0].id'],
    ['input band id', (p, v) => (p.input.bands[0].id = v), 'input.bands[0].id'],
    ['profile name', (p, v) => (p.profile.name = v), 'profile.name'],
  ];
  for (const [what, set, path] of places) {
    for (const ch of ['\n', '\r', '\u0000', '\u0007', '\u001b', '\u007f', '\u0085', '\u2028']) {
      it(`${what} with U+${ch.charCodeAt(0).toString(16).padStart(4, '0')}`, () => {
        const p = base();
        set(p, `x${ch}y`);
        const r = readPlanValue(p);
        expect(r.ok).toBe(false);
        if (!r.ok) expect(r.error.path).toBe(path);
      });
    }
  }
  it('notes keep line breaks and tabs but refuse other control characters', () => {
    expect(readPlanValue({ ...base(), notes: 'line 1\nline 2\r\n\tindented' }).ok).toBe(true);
    const r = readPlanValue({ ...base(), notes: 'bell \u0007' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.path).toBe('notes');
  });
});

describe('every export format escapes control characters regardless (a list built without the reader)', () => {
  const r = readPlanValue(base());
  if (!r.ok) throw r.error;
  // Names as a caller could pass them to the exporter directly (the reader would refuse them).
  const plan: Plan = structuredClone(r.plan);
  plan.name = ATTACK;
  plan.outputs[0].bands[0].id = ATTACK;
  plan.input.bands[0].id = 'in\r\ngain 99';
  for (const profileKey of ['float', 'q5.23', 'q1.31-negated', 'q2.30-halved']) {
    for (const format of EXPORT_FORMATS) {
      it(`${format} with ${profileKey}: no injected line, and it imports back with the same gain`, () => {
        const profile = findBuiltInProfile(profileKey);
        expect(profile).not.toBeNull();
        const list = buildExportList(plan, profile!);
        expect(list.ok).toBe(true);
        if (!list.ok) return;
        const text = formatExport(list.list, format);
        for (const line of text.split('\n')) expect(line).not.toMatch(/^\s*gain (0x07FFFFFF|99)/);
        const back = parseCoefficientList(text, profile!, format);
        expect(back.ok).toBe(true);
        if (!back.ok) return;
        expect(back.list.outputs).toHaveLength(1);
        // The output gain is 0 dB: 1 exactly (Q5.23 and Q1.31 hold 1 or its saturated neighbour).
        const g = back.list.outputs[0].gain;
        if (g !== null) expect(Math.abs(g - 1)).toBeLessThan(1e-6);
        expect(back.list.outputs[0].sections).toHaveLength(2);
      });
    }
  }
});

describe('parameters the maths does not support are refused (docs/plan-format.md, "Limits")', () => {
  it('q 5e-324 and slope 5e-324: refused, and the CLI says so on one line instead of a stack trace', () => {
    for (const [field, value] of [
      ['q', 5e-324],
      ['slope', 5e-324],
    ] as const) {
      const p = base();
      p.outputs[0].bands[0] = { id: 's', type: 'highShelf', frequency: 1000, gainDb: 3, [field]: value };
      const io = memoryIo({ 'p.bqplan': JSON.stringify(p) });
      for (const argv of [['coeffs', 'p.bqplan'], ['export', 'p.bqplan', '--profile', 'q5.23'], ['response', 'p.bqplan', '--quantize', 'Q5.23'], ['check', 'p.bqplan']]) {
        const out = runCli(argv, io);
        expect(out.code).toBe(1);
        expect(out.stderr).toMatch(new RegExp(`^error: p\\.bqplan: outputs\\[0\\]\\.bands\\[0\\]\\.${field}: must be [^\\n]*\\n$`));
      }
    }
  });
  it('raw coefficients b0 = b1 = 1e308 and 1e155 are refused at their field', () => {
    for (const big of [1e308, 1e155, 1001]) {
      const p = base();
      p.outputs[0].bands[0] = { id: 'r', type: 'raw', coefficients: { b0: big, b1: big, b2: 0, a1: 0, a2: 0 } };
      const r = readPlanValue(p);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error.path).toBe('outputs[0].bands[0].coefficients.b0');
    }
    const p = base();
    p.outputs[0].bands[0] = { id: 'r', type: 'raw', coefficients: { b0: 1000, b1: -1000, b2: 0, a1: 0, a2: 0 } };
    const r = readPlanValue(p);
    expect(r.ok).toBe(true);
    if (r.ok) {
      // 1000 (1 - z^-1): +66 dB at Nyquist; finite figures and a headroom warning.
      const a = analyzePlan(r.plan);
      expect(Number.isFinite(a.outputs[0].headroom.peakDb)).toBe(true);
      expect(a.warnings.some((w) => w.code === 'headroom' && w.severity === 'danger')).toBe(true);
    }
  });
});

describe('shelf slope: refused within a margin of the unit circle, warned above S = 1 (Audio EQ Cookbook)', () => {
  // Cookbook: alpha = sin(w0)/2 sqrt((A + 1/A)(1/S - 1) + 2) is 0 at S_max = (A + 1/A)/(A + 1/A - 2).
  const sMax = (g: number) => {
    const a = Math.pow(10, g / 40);
    return (a + 1 / a) / (a + 1 / a - 2);
  };
  const shelf = (slope: number, gainDb = 6) => {
    const p = base();
    p.outputs[0].bands[0] = { id: 's', type: 'highShelf', frequency: 5000, gainDb, slope };
    return readPlanValue(p);
  };
  it('+6 dB at S 17.4 (alpha almost 0, pole radius 0.998, +28.6 dB peak) is refused and the message gives the range', () => {
    expect(sMax(6)).toBeCloseTo(maxShelfSlope(6), 12);
    expect(sMax(6)).toBeGreaterThan(17.4);
    const r = shelf(17.4);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.path).toBe('outputs[0].bands[0].slope');
      expect(r.error.message).toMatch(/must be at most 16\.2\d* for a 6 dB shelf/);
      expect(r.error.message).toContain('S up to 1 keeps the shelf monotonic');
    }
  });
  it('the stated limit is accepted and its poles keep the margin; a hair above is refused', () => {
    for (const g of [1, 6, 12, 24, -6, -24]) {
      const safe = safeShelfSlope(g);
      expect(safe).toBeLessThan(sMax(g));
      expect(shelf(safe, g).ok).toBe(true);
      expect(shelf(safe * (1 + 1e-9), g).ok).toBe(false);
      const atSafe = poleRadius(designBand({ id: 's', type: 'highShelf', frequency: 5000, gainDb: g, slope: safe, enabled: true }, 48000)[0]);
      const atMax = poleRadius(designBand({ id: 's', type: 'highShelf', frequency: 5000, gainDb: g, slope: sMax(g), enabled: true }, 48000)[0]);
      expect(atMax).toBeCloseTo(1, 6);
      expect(atSafe).toBeLessThan(0.99);
    }
  });
  it('check warns above S = 1 (the steepest monotonic slope) and not at S = 1', () => {
    const steep = shelf(2);
    const flat = shelf(1);
    expect(steep.ok && flat.ok).toBe(true);
    if (!steep.ok || !flat.ok) return;
    expect(analyzePlan(steep.plan).warnings.some((w) => w.code === 'shelf-overshoot' && targetPath(w.target) === 'a/s')).toBe(true);
    expect(analyzePlan(flat.plan).warnings.some((w) => w.code === 'shelf-overshoot')).toBe(false);
  });
  it('an unstable output without raw bands is not told to check raw bands', () => {
    const p = base();
    p.outputs[0].bands[0] = { id: 'r', type: 'raw', coefficients: { b0: 1, b1: 0, b2: 0, a1: 0, a2: -1.2 } };
    const r = readPlanValue(p);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(messageOf(analyzePlan(r.plan).warnings.find((w) => w.code === 'unstable'))).toContain('check its raw bands');
    // A plan with no raw band, built past the reader: a negative Q puts the poles outside the circle.
    const q = readPlanValue(base());
    if (!q.ok) return;
    const plan = structuredClone(q.plan);
    plan.outputs[0].bands[0] = { id: 's', type: 'peaking', frequency: 5000, gainDb: 6, q: -1, enabled: true };
    const msg = messageOf(analyzePlan(plan).warnings.find((w) => w.code === 'unstable'));
    expect(msg).toBeDefined();
    expect(msg).not.toContain('raw bands');
  });
});

describe('the syntax scan agrees with JSON.parse (RFC 8259): valid or not, and where V8 names a position, the same one', () => {
  const texts = ['{"a": 1,}', '[1 2]', '{"a" 1}', '{"a":"b\nc"}', '{', '{"a":1}}', '[[[1]]', '{"a": 01}', '{"a": [1, {"b": null}], "c": -1.5e-3}', '"x"', ' [ ] ', '{"a": tru}', '{"a": x}', ''];
  for (const t of texts) {
    it(JSON.stringify(t), () => {
      let position: number | null = null;
      let valid = true;
      try {
        JSON.parse(t);
      } catch (e) {
        valid = false;
        const m = /position (\d+)/.exec((e as Error).message);
        if (m) position = Number(m[1]);
      }
      const scan = firstSyntaxError(t);
      expect(scan === -1).toBe(valid);
      if (position !== null) expect(scan).toBe(position);
    });
  }
});

describe('deep nesting, byte order mark, syntax errors', () => {
  const deep = (d: number) => JSON.stringify(base()).replace('"bands":[{"id":"b1"', `"bands":[${'['.repeat(d)}NaN${']'.repeat(d)},{"id":"b1"`);
  it('a bare NaN 5,000 levels deep: a refusal at its (shortened) path, no stack overflow', () => {
    const r = readPlanText(deep(5000));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.path.startsWith('outputs[0].bands[0][0]')).toBe(true);
      expect(r.error.path.length).toBeLessThan(130);
    }
    const cli = runCli(['check', 'd.bqplan'], memoryIo({ 'd.bqplan': deep(5000) }));
    expect(cli.code).toBe(1);
    expect(cli.stderr.split('\n')).toHaveLength(2);
  });
  it('5,000 levels of plain lists: refused at the field', () => {
    const r = readPlanText(deep(5000).replace('NaN', '1'));
    expect(r.ok).toBe(false);
  });
  it('a UTF-8 byte order mark is accepted by the reader and the CLI', () => {
    const text = '\uFEFF' + JSON.stringify(base());
    expect(readPlanText(text).ok).toBe(true);
    const out = runCli(['check', 'bom.bqplan'], memoryIo({ 'bom.bqplan': text }));
    expect(out.code).toBe(0);
  });
  it('a syntax error gives line and column on one line', () => {
    const text = '{\n  "format": "biquadrant.plan",\n  "version": 2 x\n}';
    const r = readPlanText(text);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toBe("not valid JSON at line 3, column 16 ('x')".replace("('x')", "(unexpected 'x')"));
    const cli = runCli(['check', 'x.bqplan'], memoryIo({ 'x.bqplan': text }));
    expect(cli.stderr).toBe("error: x.bqplan: not valid JSON at line 3, column 16 (unexpected 'x')\n");
    // Where the engine's message has no position ("Unexpected token 'x'"), our own scan finds it.
    const bare = readPlanText('{\n  "name": x\n}');
    expect(bare.ok).toBe(false);
    if (!bare.ok) expect(bare.error.message).toBe("not valid JSON at line 2, column 11 (unexpected 'x')");
    const empty = readPlanText('');
    if (!empty.ok) expect(empty.error.message).toBe('the file is empty');
    const nl = readPlanText('{"name": "a\nb"}');
    expect(nl.ok).toBe(false);
    if (!nl.ok) expect(nl.error.message).toBe('not valid JSON at line 1, column 12 (unexpected U+000A)');
  });
});
