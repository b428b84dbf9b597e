/**
 * The plan reader and writer (docs/plan-format.md): every error names its field path;
 * unknown format and versions are refused; NaN, Infinity, numbers as strings and unknown fields
 * are refused; random JSON yields a plan or a PlanError and never throws; write -> read gives the
 * same plan and writing is stable.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { PlanError, readPlanText, readPlanValue } from '../../src/plan/read';
import { planToJson, writePlanText } from '../../src/plan/write';
import { PLAN_VERSION, type Plan } from '../../src/plan/types';
import { planArb } from '../helpers/arbitraries';

/** A valid version 2 plan as plain JSON, to be broken one field at a time. */
function good(): Record<string, any> {
  return {
    format: 'biquadrant.plan',
    version: 2,
    name: 'Test plan',
    notes: 'n',
    sampleRate: 48000,
    input: { bands: [{ id: 'b1', type: 'peaking', frequency: 63, gainDb: -4, q: 4, enabled: true }] },
    outputs: [
      { id: 'woofer', name: 'Woofer', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2200 }, bands: [] },
      {
        id: 'tweeter',
        name: 'Tweeter',
        gainDb: -2,
        delayMs: 0.1,
        invert: false,
        mute: false,
        highPass: { family: 'bessel', order: 3, frequency: 2200, normalization: 'delay' },
        lowPass: null,
        bands: [
          { id: 'p1', type: 'peaking', frequency: 8000, gainDb: 2, q: 1.2, enabled: true },
          { id: 'r1', type: 'raw', frequency: 1000, enabled: true, coefficients: { b0: 1, b1: 0, b2: 0, a0: 1, a1: 0, a2: 0 } },
        ],
      },
    ],
    profile: {
      name: 'Board',
      sampleRate: null,
      order: ['b0', 'b1', 'b2', 'a1', 'a2'],
      feedbackSign: 'negated',
      writeA0: false,
      number: { kind: 'fixed', integerBits: 2, fractionBits: 30, wordBits: 32, notation: 'hex' },
      coefficientScale: 1,
      gain: 'separate',
      delayUnit: 'samples',
      maxDelaySamples: null,
      sectionBudget: 10,
    },
  };
}

function errorOf(edit: (p: Record<string, any>) => void): PlanError {
  const p = good();
  edit(p);
  const r = readPlanValue(p);
  if (r.ok) throw new Error('expected the plan to be refused');
  return r.error;
}

describe('the reference plan', () => {
  it('reads, with defaults filled in', () => {
    const r = readPlanValue(good());
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.plan.outputs[1].highPass).toEqual({ family: 'bessel', order: 3, frequency: 2200, normalization: 'delay' });
    const minimal = readPlanValue({ format: 'biquadrant.plan', version: 1, name: 'm', sampleRate: 48000, input: {}, outputs: [{ id: 'a', lowPass: { family: 'bessel', order: 2, frequency: 100 } }] });
    expect(minimal.ok).toBe(true);
    if (!minimal.ok) return;
    expect(minimal.plan.version).toBe(PLAN_VERSION);
    expect(minimal.plan.outputs[0]).toEqual({
      id: 'a',
      name: 'a',
      gainDb: 0,
      delayMs: 0,
      invert: false,
      mute: false,
      highPass: null,
      lowPass: { family: 'bessel', order: 2, frequency: 100, normalization: 'phase' },
      bands: [],
    });
  });
});

describe('every error names the field path', () => {
  const cases: [string, (p: Record<string, any>) => void, string][] = [
    ['q zero', (p) => (p.outputs[1].bands[0].q = 0), 'outputs[1].bands[0].q: must be from 0.01 to 1000'],
    ['q negative', (p) => (p.outputs[1].bands[0].q = -3), 'outputs[1].bands[0].q: must be from 0.01 to 1000'],
    ['q string', (p) => (p.outputs[1].bands[0].q = '1.2'), 'outputs[1].bands[0].q: must be a number'],
    ['frequency NaN', (p) => (p.input.bands[0].frequency = NaN), 'input.bands[0].frequency: must be a finite number'],
    ['frequency Infinity', (p) => (p.input.bands[0].frequency = Infinity), 'input.bands[0].frequency: must be a finite number'],
    ['frequency -Infinity', (p) => (p.input.bands[0].frequency = -Infinity), 'input.bands[0].frequency: must be a finite number'],
    ['gain as string', (p) => (p.outputs[0].gainDb = '-3'), 'outputs[0].gainDb: must be a number'],
    ['sample rate as string', (p) => (p.sampleRate = '48000'), 'sampleRate: must be a number'],
    ['sample rate low', (p) => (p.sampleRate = 4000), 'sampleRate: must be between'],
    ['sample rate NaN', (p) => (p.sampleRate = NaN), 'sampleRate: must be a finite number'],
    ['delay negative', (p) => (p.outputs[1].delayMs = -1), 'outputs[1].delayMs: must be >= 0'],
    ['delay Infinity', (p) => (p.outputs[1].delayMs = Infinity), 'outputs[1].delayMs: must be a finite number'],
    ['invert as string', (p) => (p.outputs[0].invert = 'true'), 'outputs[0].invert: must be true or false'],
    ['mute as number', (p) => (p.outputs[0].mute = 1), 'outputs[0].mute: must be true or false'],
    ['order 9', (p) => (p.outputs[0].lowPass.order = 9), 'outputs[0].lowPass.order: must be a whole number'],
    ['order 2.5', (p) => (p.outputs[1].highPass.order = 2.5), 'outputs[1].highPass.order: must be a whole number'],
    ['LR order 3', (p) => (p.outputs[0].lowPass.order = 3), 'outputs[0].lowPass.order: linkwitz-riley takes order 2, 4, 6 or 8'],
    ['family unknown', (p) => (p.outputs[0].lowPass.family = 'chebyshev'), 'outputs[0].lowPass.family: must be one of'],
    ['normalization on butterworth', (p) => (p.outputs[0].lowPass = { family: 'butterworth', order: 2, frequency: 100, normalization: 'phase' }), 'outputs[0].lowPass.normalization: applies to bessel edges only'],
    ['normalization unknown', (p) => (p.outputs[1].highPass.normalization = 'mag'), 'outputs[1].highPass.normalization: must be one of'],
    ['edge frequency at Nyquist', (p) => (p.outputs[0].lowPass.frequency = 24000), 'outputs[0].lowPass.frequency: must be below Nyquist'],
    ['band type unknown', (p) => (p.outputs[1].bands[0].type = 'shelf'), 'outputs[1].bands[0].type: must be one of'],
    ['raw without coefficients', (p) => delete p.outputs[1].bands[1].coefficients, 'outputs[1].bands[1].coefficients: required for a raw band'],
    ['raw a0 zero', (p) => (p.outputs[1].bands[1].coefficients.a0 = 0), 'outputs[1].bands[1].coefficients.a0: must not be 0'],
    ['raw b1 NaN', (p) => (p.outputs[1].bands[1].coefficients.b1 = NaN), 'outputs[1].bands[1].coefficients.b1: must be a finite number'],
    ['raw b2 missing', (p) => delete p.outputs[1].bands[1].coefficients.b2, 'outputs[1].bands[1].coefficients.b2: is required'],
    ['band id duplicate', (p) => (p.outputs[1].bands[1].id = 'p1'), 'outputs[1].bands[1].id: "p1" is used by another band'],
    ['output id duplicate', (p) => (p.outputs[1].id = 'woofer'), 'outputs[1].id: "woofer" is used by another output'],
    ['output id pattern', (p) => (p.outputs[0].id = 'Woofer!'), 'outputs[0].id: must be 1 to 32'],
    ['no outputs', (p) => (p.outputs = []), 'outputs: must hold 1 to 16 outputs'],
    ['outputs not a list', (p) => (p.outputs = {}), 'outputs: must be a list'],
    ['band not an object', (p) => (p.input.bands[0] = 3), 'input.bands[0]: must be an object'],
    ['name missing', (p) => delete p.name, 'name: is required'],
    ['name a number', (p) => (p.name = 5), 'name: must be a string'],
    ['slope past the limit', (p) => (p.input.bands[0] = { id: 's', type: 'lowShelf', frequency: 100, gainDb: 12, slope: 10 }), 'input.bands[0].slope: must be at most'],
    ['profile order short', (p) => (p.profile.order = ['b0', 'b1', 'b2', 'a1']), 'profile.order: must name each of'],
    ['profile word too small', (p) => (p.profile.number.wordBits = 8), 'profile.number.wordBits: must be a whole number'],
    ['profile scale not power of 2', (p) => (p.profile.coefficientScale = 3), 'profile.coefficientScale: must be a power of two'],
  ];
  for (const [what, edit, message] of cases) {
    it(`${what} -> "${message}"`, () => {
      const e = errorOf(edit);
      expect(e).toBeInstanceOf(PlanError);
      expect(e.message.startsWith(message), e.message).toBe(true);
      expect(e.message.startsWith(`${e.path}: `)).toBe(true);
      expect(e.message).not.toContain('\n'); // one line, for the command line
    });
  }
});

describe('unknown format, version and fields', () => {
  it('format', () => {
    for (const f of ['biquadrant.plans', '', 1, null, undefined]) {
      const e = errorOf((p) => (p.format = f));
      expect(e.path).toBe('format');
    }
  });
  it('versions this build does not know', () => {
    for (const v of [0, 4, 99, -1]) {
      const e = errorOf((p) => (p.version = v));
      expect(e.path).toBe('version');
      expect(e.message).toMatch(/not supported/);
    }
    for (const v of [1.5, '2', null, NaN]) expect(errorOf((p) => (p.version = v)).path).toBe('version');
  });
  it('a version 1 plan with a profile is refused; without one it is migrated to the current version', () => {
    expect(errorOf((p) => (p.version = 1)).path).toBe('profile');
    const p = good();
    p.version = 1;
    delete p.profile;
    const r = readPlanValue(p);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.plan.version).toBe(PLAN_VERSION);
  });
  it('unknown fields are refused at every level, never dropped', () => {
    const where: [(p: Record<string, any>) => Record<string, any>, string][] = [
      [(p) => p, 'colour'],
      [(p) => p.input, 'input.colour'],
      [(p) => p.outputs[1], 'outputs[1].colour'],
      [(p) => p.outputs[0].lowPass, 'outputs[0].lowPass.colour'],
      [(p) => p.outputs[1].bands[0], 'outputs[1].bands[0].colour'],
      [(p) => p.outputs[1].bands[1].coefficients, 'outputs[1].bands[1].coefficients.colour'],
      [(p) => p.profile, 'profile.colour'],
      [(p) => p.profile.number, 'profile.number.colour'],
    ];
    for (const [at, path] of where) {
      const e = errorOf((p) => (at(p).colour = 'red'));
      expect(e.path).toBe(path);
      expect(e.message).toMatch(/is not a field/);
    }
  });
  it('text that is not JSON is refused with an empty path', () => {
    const r = readPlanText('{"format": "biquadrant.plan",');
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.path).toBe('');
      expect(r.error.message).toMatch(/not valid JSON/);
    }
    const nan = readPlanText(JSON.stringify(good()).replace('"sampleRate":48000', '"sampleRate":NaN'));
    expect(nan.ok).toBe(false);
  });
});

describe('property: random JSON into the reader yields a plan or a PlanError, never throws', () => {
  const verdict = (v: unknown) => {
    let r;
    try {
      r = readPlanValue(v);
    } catch (e) {
      throw new Error(`readPlanValue threw ${String(e)}`);
    }
    if (r.ok) expect(r.plan.format).toBe('biquadrant.plan');
    else {
      expect(r.error).toBeInstanceOf(PlanError);
      expect(typeof r.error.path).toBe('string');
      if (r.error.path) expect(r.error.message.startsWith(`${r.error.path}: `)).toBe(true);
    }
    return r;
  };
  it('arbitrary JSON values', () => {
    fc.assert(fc.property(fc.jsonValue(), (v) => void verdict(v)), { numRuns: 500, seed: 20261201 });
  });
  it('arbitrary JS values (NaN, -0, undefined, nested objects)', () => {
    fc.assert(fc.property(fc.anything({ withNullPrototype: true, withObjectString: true }), (v) => void verdict(v)), { numRuns: 500, seed: 7 });
  });
  it('a valid plan with one field replaced by a random value, deep inside', () => {
    // Random JSON seldom gets past "format"; this reaches every nested reader.
    const paths: (string | number)[][] = [];
    const walk = (o: unknown, at: (string | number)[]) => {
      if (o && typeof o === 'object') {
        for (const [k, v] of Object.entries(o)) {
          const key = Array.isArray(o) ? Number(k) : k;
          paths.push([...at, key]);
          walk(v, [...at, key]);
        }
      }
    };
    walk(good(), []);
    fc.assert(
      fc.property(fc.constantFrom(...paths), fc.oneof(fc.jsonValue(), fc.constantFrom(NaN, Infinity, -Infinity, undefined, -0, '1', '', [], {})), (path, value) => {
        const p = good();
        let o: any = p;
        for (const k of path.slice(0, -1)) o = o[k];
        o[path[path.length - 1]] = value;
        const r = verdict(p);
        if (!r.ok) {
          // The error names the replaced field, something inside it, or a sibling in the same
          // object (rules that span fields: a raw type needs coefficients, a family its order,
          // writeA0 the order list); a new sample rate or version can fault fields anywhere.
          const fmt = (ks: (string | number)[]) => ks.map((k, i) => (typeof k === 'number' ? `[${k}]` : i === 0 ? k : `.${k}`)).join('');
          const here = fmt(path);
          const parent = fmt(path.slice(0, -1));
          const global = ['sampleRate', 'version', 'format'].includes(here);
          const ok = global || r.error.path === here || r.error.path.startsWith(here + '.') || r.error.path.startsWith(here + '[') || r.error.path === parent || r.error.path.startsWith(parent + '.') || (parent === '' && value === undefined);
          expect(ok, `replaced ${here} with ${JSON.stringify(value)}, error at "${r.error.path}": ${r.error.message}`).toBe(true);
        }
      }),
      { numRuns: 2000, seed: 42 },
    );
  });
});

describe('property: write -> read gives the same plan; writing is stable', () => {
  it('arbitrary valid plans survive writePlanText -> readPlanText unchanged', () => {
    fc.assert(
      fc.property(planArb, (plan: Plan) => {
        const text = writePlanText(plan);
        const r = readPlanText(text);
        if (!r.ok) throw new Error(`refused: ${r.error.message}`);
        expect(r.plan).toEqual(plan);
        expect(writePlanText(r.plan)).toBe(text);
      }),
      { numRuns: 400, seed: 1201 },
    );
  });
  it('key order is the contract order and the text is 2-space JSON ending in a newline', () => {
    const r = readPlanValue(good());
    if (!r.ok) throw new Error(r.error.message);
    const text = writePlanText(r.plan);
    expect(text.endsWith('}\n')).toBe(true);
    expect(text.split('\n')[1]).toBe('  "format": "biquadrant.plan",');
    expect(Object.keys(JSON.parse(text))).toEqual(['format', 'version', 'name', 'notes', 'sampleRate', 'input', 'outputs', 'profile']);
    expect(Object.keys(JSON.parse(text).outputs[0])).toEqual(['id', 'name', 'gainDb', 'delayMs', 'invert', 'mute', 'highPass', 'lowPass', 'bands']);
    expect(Object.keys(planToJson(r.plan))).toEqual(Object.keys(JSON.parse(text)));
  });
  it('-0 is written as 0 (JSON), and the re-read plan writes the same text', () => {
    const r = readPlanValue({ ...good(), outputs: [{ id: 'a', gainDb: -0 }] });
    if (!r.ok) throw new Error(r.error.message);
    const text = writePlanText(r.plan);
    expect(text).toContain('"gainDb": 0,');
    const again = readPlanText(text);
    if (!again.ok) throw new Error(again.error.message);
    expect(writePlanText(again.plan)).toBe(text);
  });
});

/**
 * Bare NaN / Infinity in a plan file. They are not JSON (RFC 8259, section 6: "Numeric values
 * that cannot be represented ... such as Infinity and NaN are not permitted"), so JSON.parse
 * refuses the whole text; the plan contract (docs/plan-format.md, "Conventions") still wants the
 * refusal to name the field's path.
 */
const plan = (q: string, name = 'n') => `{
  "format": "biquadrant.plan", "version": 2, "name": ${JSON.stringify(name)}, "sampleRate": 48000,
  "input": { "bands": [] },
  "outputs": [ { "id": "a", "bands": [ { "id": "x", "type": "peaking", "frequency": 100, "gainDb": -3, "q": 1 },
                                      { "id": "y", "type": "peaking", "frequency": 200, "gainDb": 2, "q": ${q} } ] } ] }`;

describe('bare NaN and Infinity are refused with the field path', () => {
  for (const token of ['NaN', 'Infinity', '-Infinity']) {
    it(`${token} in outputs[0].bands[1].q`, () => {
      const r = readPlanText(plan(token));
      expect(r.ok).toBe(false);
      if (r.ok) return;
      expect(r.error.path).toBe('outputs[0].bands[1].q');
      expect(r.error.message).toContain(token);
    });
  }
  it('the words inside strings are not tokens: a name "NaN Infinity" reads, other broken JSON stays "not valid JSON"', () => {
    expect(readPlanText(plan('1', 'NaN Infinity -Infinity "quoted" \\ NaN')).ok).toBe(true);
    const r = readPlanText(plan('1', 'NaN').replace('"sampleRate": 48000,', '"sampleRate": 48000'));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.path).toBe('');
      expect(r.error.message).toMatch(/not valid JSON/);
    }
  });
});
