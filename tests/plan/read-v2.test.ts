/**
 * Plan version 2 (the board profile): version 1 files still open, migrate with nothing lost, and
 * the profile is validated with field paths and written in a stable order. The contract is
 * docs/plan-format.md.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { BUILT_IN_PROFILES } from '../../src/export/profiles';
import { readPlanText, readPlanValue } from '../../src/plan/read';
import { PLAN_VERSION, type BoardProfile } from '../../src/plan/types';
import { planToJson, profileToJson, writePlanText } from '../../src/plan/write';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
const DEMOS = ['two-way-monitor.bqplan', 'three-way-hall.bqplan'];

function v1(name: string): Record<string, unknown> {
  return JSON.parse(readFileSync(ASSETS + name, 'utf8')) as Record<string, unknown>;
}

/** A version 1 document with every optional field present, so the migration must carry each one. */
const FULL_V1 = {
  format: 'biquadrant.plan',
  version: 1,
  name: 'Every field',
  notes: 'notes survive',
  sampleRate: 96000,
  input: {
    bands: [
      { id: 'i1', type: 'lowShelf', frequency: 120, gainDb: 3, slope: 0.8, enabled: false },
      { id: 'i2', type: 'raw', frequency: 1000, enabled: true, coefficients: { b0: 0.5, b1: 0.1, b2: 0.01, a0: 2, a1: -0.2, a2: 0.05 } },
    ],
  },
  outputs: [
    {
      id: 'sub',
      name: 'Sub',
      gainDb: -3.5,
      delayMs: 2.25,
      invert: true,
      mute: true,
      highPass: { family: 'bessel', order: 3, frequency: 25, normalization: 'delay' },
      lowPass: { family: 'linkwitz-riley', order: 8, frequency: 90 },
      bands: [{ id: 'p', type: 'peaking', frequency: 45, gainDb: -6, q: 5, enabled: true }],
    },
  ],
};

const CUSTOM: BoardProfile = {
  name: 'custom board',
  sampleRate: 96000,
  order: ['a1', 'a2', 'b0', 'b1', 'b2'],
  feedbackSign: 'negated',
  writeA0: true,
  number: { kind: 'fixed', integerBits: 4, fractionBits: 20, wordBits: 24, notation: 'hex' },
  coefficientScale: 0.25,
  gain: 'first-section',
  delayUnit: 'ms',
  maxDelaySamples: 4800,
  sectionBudget: 12,
};

describe('version 1 plans still open', () => {
  it.each(DEMOS)('%s reads, with no profile, as version %s', (name) => {
    const r = readPlanValue(v1(name));
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.plan.version).toBe(PLAN_VERSION);
    expect(PLAN_VERSION).toBe(3);
    expect(r.plan.profile).toBeUndefined();
  });

  it.each(DEMOS)('%s migrates with nothing lost (only the version changes)', (name) => {
    const doc = v1(name);
    const r = readPlanValue(doc);
    if (!r.ok) throw r.error;
    expect(planToJson(r.plan)).toEqual({ ...doc, version: PLAN_VERSION });
  });

  it('keeps every optional field of a full version 1 document', () => {
    const r = readPlanValue(FULL_V1);
    if (!r.ok) throw r.error;
    expect(planToJson(r.plan)).toEqual({ ...FULL_V1, version: PLAN_VERSION });
  });

  it('refuses a profile in a version 1 file (it is not a version 1 field)', () => {
    const r = readPlanValue({ ...FULL_V1, profile: profileToJson(CUSTOM) });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.path).toBe('profile');
  });

  it('refuses a version above this build\'s with a clear message', () => {
    const r = readPlanValue({ ...FULL_V1, version: PLAN_VERSION + 1 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toMatch(new RegExp(`version: ${PLAN_VERSION + 1} is not supported.*1 to ${PLAN_VERSION}`));
  });
});

describe('version 2 profile', () => {
  const withProfile = (p: unknown) => ({ ...FULL_V1, version: 2, profile: p });

  it.each([...BUILT_IN_PROFILES.map((b) => b.profile), CUSTOM].map((p) => [p.name, p] as const))('round-trips "%s" through the file', (_n, profile) => {
    const r = readPlanValue(withProfile(profileToJson(profile)));
    if (!r.ok) throw r.error;
    expect(r.plan.profile).toEqual(profile);
    const again = readPlanText(writePlanText(r.plan));
    if (!again.ok) throw again.error;
    expect(again.plan).toEqual(r.plan);
  });

  it('writes the profile last, in the contract key order', () => {
    const r = readPlanValue(withProfile(profileToJson(CUSTOM)));
    if (!r.ok) throw r.error;
    const json = planToJson(r.plan);
    expect(Object.keys(json)).toEqual(['format', 'version', 'name', 'notes', 'sampleRate', 'input', 'outputs', 'profile']);
    expect(Object.keys(json.profile as object)).toEqual([
      'name',
      'sampleRate',
      'order',
      'feedbackSign',
      'writeA0',
      'number',
      'coefficientScale',
      'gain',
      'delayUnit',
      'maxDelaySamples',
      'sectionBudget',
    ]);
  });

  it('fills defaults (the file convention) for every field but the section budget', () => {
    const r = readPlanValue(withProfile({ sectionBudget: 8 }));
    if (!r.ok) throw r.error;
    expect(r.plan.profile).toEqual({
      name: 'custom profile',
      sampleRate: null,
      order: ['b0', 'b1', 'b2', 'a1', 'a2'],
      feedbackSign: 'as-computed',
      writeA0: false,
      number: { kind: 'decimal', significantDigits: null },
      coefficientScale: 1,
      gain: 'separate',
      delayUnit: 'samples',
      maxDelaySamples: null,
      sectionBudget: 8,
    });
  });

  it('requires the section budget', () => {
    const r = readPlanValue(withProfile({ name: 'x' }));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toBe('profile.sectionBudget: is required');
  });

  const base = profileToJson(CUSTOM);
  it.each([
    [{ ...base, sectionBudget: 0 }, 'profile.sectionBudget'],
    [{ ...base, sectionBudget: 2.5 }, 'profile.sectionBudget'],
    [{ ...base, coefficientScale: 0.3 }, 'profile.coefficientScale'],
    [{ ...base, coefficientScale: -0.5 }, 'profile.coefficientScale'],
    [{ ...base, order: ['b0', 'b1', 'b2', 'a1'] }, 'profile.order'],
    [{ ...base, order: ['b0', 'b1', 'b2', 'a1', 'a1'] }, 'profile.order[4]'],
    [{ ...base, order: ['b0', 'b1', 'b2', 'a1', 'c3'] }, 'profile.order[4]'],
    [{ ...base, writeA0: false, order: ['a0', 'a1', 'a2', 'b0', 'b1', 'b2'] }, 'profile.order'],
    [{ ...base, feedbackSign: 'minus' }, 'profile.feedbackSign'],
    [{ ...base, number: { kind: 'fixed', integerBits: 2, fractionBits: 30, wordBits: 40 } }, 'profile.number.wordBits'],
    [{ ...base, number: { kind: 'fixed', integerBits: 2, fractionBits: 30, wordBits: 24 } }, 'profile.number.fractionBits'],
    [{ ...base, number: { kind: 'fixed', integerBits: 5, fractionBits: 15, wordBits: 16 } }, 'profile.number'],
    [{ ...base, number: { kind: 'fixed', integerBits: 0, fractionBits: 15, wordBits: 16 } }, 'profile.number.integerBits'],
    [{ ...base, number: { kind: 'decimal', significantDigits: 18 } }, 'profile.number.significantDigits'],
    [{ ...base, number: { kind: 'float' } }, 'profile.number.kind'],
    [{ ...base, sampleRate: 1000 }, 'profile.sampleRate'],
    [{ ...base, sampleRate: '48000' }, 'profile.sampleRate'],
    [{ ...base, gain: 'folded' }, 'profile.gain'],
    [{ ...base, maxDelaySamples: -1 }, 'profile.maxDelaySamples'],
    [{ ...base, vendor: 'x' }, 'profile.vendor'],
  ])('refuses a bad profile with its field path (%#)', (profile, path) => {
    const r = readPlanValue(withProfile(profile));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.path).toBe(path);
  });
});
