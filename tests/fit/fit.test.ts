/**
 * The band fitter (src/fit/) against references from outside the project:
 * - bands found back: a response made by inverting known Audio EQ Cookbook peaking bands, computed
 *   by scipy.signal.sosfreqz in tests/reference/make_fit_fixtures.py, is fitted flat again with the
 *   same number of bands;
 * - a room: the modal sum of a rectangular room (H. Kuttruff, "Room Acoustics", the Green's
 *   function as a sum over normal modes; invented dimensions, same script) is corrected toward a
 *   flat target from 30 to 300 Hz with at most 10 bands and no boost above 6 dB.
 * Each result is checked by evaluating the fitted plan with the response kernel and smoothing it
 * with the measurement smoothing of src/measure/smooth.ts (exact integrals, itself checked against
 * scipy.integrate.quad), not with the fitter's own discrete operator.
 */
import { describe, expect, it } from 'vitest';
import { designPlan } from '../../src/design/chain';
import { FitAborted } from '../../src/fit/fitter';
import { fitPlan, sectionsLeft } from '../../src/fit/plan-fit';
import { flatTarget } from '../../src/fit/target';
import { predictAcoustic } from '../../src/measure/acoustic';
import { smoothColumns } from '../../src/measure/smooth';
import { budgetUse } from '../../src/export/list';
import { findBuiltInProfile } from '../../src/export/profiles';
import { readPlanValue } from '../../src/plan/read';
import { planToJson, writePlanText } from '../../src/plan/write';
import type { Plan } from '../../src/plan/types';
import { designedResponse } from '../../src/response/chain-response';
import { driverPlan, inverseCase, perOctave, roomCase, systemPlan } from './helpers';

const SIXTH = { kind: 'octave', n: 6 } as const;

describe('bands found back (cookbook peaking bands inverted, scipy.signal.sosfreqz)', () => {
  const truth = inverseCase.bands ?? [];
  const plan = driverPlan(inverseCase);
  const target = { ...flatTarget('output', 'main'), toleranceDb: 0.1 };
  const fit = fitPlan(plan, { kind: 'output', outputId: 'main' }, target, { bands: truth.length, maxBoostDb: 6, maxCutDb: 15 });

  it(`uses at most the ${truth.length} bands it was given`, () => {
    expect(fit.result.bands.length).toBeLessThanOrEqual(truth.length);
    expect(fit.plan.outputs[0].bands.every((b) => b.fitted === true && b.type === 'peaking')).toBe(true);
  });

  it('meets a flat target within 0.1 dB RMS per octave, 20 Hz to 20 kHz, 1/6-octave smoothed (the goal of the fit)', () => {
    const f = inverseCase.frequencyHz;
    const p = predictAcoustic(fit.plan, f).outputs[0].response.magnitudeDb;
    const smoothed = smoothColumns(f, Array.from(p), null, SIXTH).magnitudeDb;
    const { rms } = perOctave(f, smoothed, 20, 20000);
    expect(rms).toBeLessThan(0.1);
    // Before the fit the same figure is large: the check can fail.
    expect(perOctave(f, smoothColumns(f, inverseCase.magnitudeDb, null, SIXTH).magnitudeDb, 20, 20000).rms).toBeGreaterThan(1);
  });

  it('finds the bands themselves (the inverse of the inverse; frequency 1 %, gain 0.05 dB, Q 2 %)', () => {
    const found = [...fit.result.bands].sort((a, b) => a.frequency - b.frequency);
    expect(found.length).toBe(truth.length);
    found.forEach((b, i) => {
      expect(Math.abs(b.frequency / truth[i].frequency - 1)).toBeLessThan(0.01);
      expect(Math.abs(b.gainDb - truth[i].gainDb)).toBeLessThan(0.05);
      expect(Math.abs(b.q / truth[i].q - 1)).toBeLessThan(0.02);
    });
  });
});

describe('a rectangular room by its modal sum (Kuttruff, Room Acoustics), 30 to 300 Hz', () => {
  const plan = systemPlan(roomCase);
  const fit = fitPlan(plan, { kind: 'system' }, { ...flatTarget('system'), fromHz: 30, toHz: 300 }, { bands: 10, maxBoostDb: 6 });
  const f = roomCase.frequencyHz;
  // The measured response times the input chain the fit filled (every output has only that).
  const chainDb = designedResponse(designPlan(fit.plan), f, fit.plan.sampleRate).outputs[0].response.magnitudeDb;
  const corrected = f.map((_, i) => roomCase.magnitudeDb[i] + chainDb[i]);
  const smoothed = smoothColumns(f, corrected, null, SIXTH).magnitudeDb;
  // A declined null is left out within half a smoothing width (1/12 octave) of its stretch.
  const inNull = (x: number) => fit.result.nulls.some((n) => x >= n.fromHz / 2 ** (1 / 12) && x <= n.toHz * 2 ** (1 / 12));

  it('uses at most 10 bands, none boosting above 6 dB, and adds at most 6 dB anywhere', () => {
    expect(fit.plan.input.bands.length).toBeLessThanOrEqual(10);
    expect(fit.plan.input.bands.length).toBeGreaterThan(3);
    for (const b of fit.plan.input.bands) expect(b.gainDb ?? 0).toBeLessThanOrEqual(6);
    const dense = Array.from({ length: 2000 }, (_, i) => 20 * Math.pow(1000, i / 1999));
    const added = designedResponse(designPlan(fit.plan), dense, fit.plan.sampleRate).outputs[0].response.magnitudeDb;
    expect(Math.max(...added)).toBeLessThanOrEqual(6 + 1e-6);
  });

  it('is within +/-1 dB of the flat target (at the reported level) after 1/6-octave smoothing, outside the declined nulls', () => {
    let worst = 0;
    let checked = 0;
    f.forEach((x, i) => {
      if (x < 30 || x > 300 || inNull(x)) return;
      checked++;
      worst = Math.max(worst, Math.abs(smoothed[i] - fit.result.levelDb));
    });
    // At least half of the 30..300 Hz points (48 per octave, about 160) are outside the nulls.
    expect(checked).toBeGreaterThan(80);
    expect(worst).toBeLessThanOrEqual(1);
    // The nulls left out are real: somewhere in them the level is far below the target.
    expect(fit.result.nulls.length).toBeGreaterThan(0);
    expect(fit.result.nulls.every((n) => n.depthDb >= 6)).toBe(true);
  });

  it('before the fit the same check fails by far (the room is not already flat)', () => {
    const before = smoothColumns(f, roomCase.magnitudeDb, null, SIXTH).magnitudeDb;
    let worst = 0;
    f.forEach((x, i) => {
      if (x >= 30 && x <= 300 && !inNull(x)) worst = Math.max(worst, Math.abs(before[i] - fit.result.levelDb));
    });
    expect(worst).toBeGreaterThan(4);
  });

  it('reports RMS and largest error before and after, the after smaller', () => {
    expect(fit.result.after.rmsDb).toBeLessThan(fit.result.before.rmsDb / 2);
    expect(fit.result.after.maxDb).toBeLessThan(fit.result.before.maxDb);
    expect(fit.result.shortfalls.filter((s) => s.reason !== 'null')).toEqual([]);
  });

  it('is deterministic: the same input gives the same plan, byte for byte', () => {
    const again = fitPlan(systemPlan(roomCase), { kind: 'system' }, { ...flatTarget('system'), fromHz: 30, toHz: 300 }, { bands: 10, maxBoostDb: 6 });
    expect(writePlanText(again.plan)).toBe(writePlanText(fit.plan));
  });

  it('writes a valid plan: fitted bands marked, the target stored', () => {
    const read = readPlanValue(planToJson(fit.plan));
    expect(read.ok).toBe(true);
    expect(fit.plan.targets).toEqual([{ scope: 'system', parts: [{ kind: 'flat' }], alignment: 'mean', fromHz: 30, toHz: 300, toleranceDb: 1 }]);
  });
});

describe('limits', () => {
  it('never passes the bounds it is given (boost, cut, Q, range)', () => {
    for (const limits of [
      { maxBoostDb: 2, maxCutDb: 3, qMin: 1, qMax: 4 },
      { maxBoostDb: 0, maxCutDb: 20, qMin: 0.7, qMax: 10 },
      { maxBoostDb: 6, maxCutDb: 6, qMin: 2, qMax: 2.5 },
    ]) {
      const fit = fitPlan(systemPlan(roomCase), { kind: 'system' }, { ...flatTarget('system'), fromHz: 40, toHz: 250 }, { bands: 8, ...limits });
      for (const b of fit.plan.input.bands) {
        expect(b.gainDb ?? 0).toBeLessThanOrEqual(limits.maxBoostDb);
        expect(b.gainDb ?? 0).toBeGreaterThanOrEqual(-limits.maxCutDb);
        expect(b.q ?? 0).toBeGreaterThanOrEqual(limits.qMin);
        expect(b.q ?? 0).toBeLessThanOrEqual(limits.qMax);
        expect(b.frequency).toBeGreaterThanOrEqual(40 * (1 - 1e-9));
        expect(b.frequency).toBeLessThanOrEqual(250 * (1 + 1e-9));
      }
    }
  });

  it("never exceeds the board's section budget: input bands and edges count for every output", () => {
    const plan: Plan = systemPlan(roomCase);
    plan.profile = findBuiltInProfile('q5.23') ?? undefined; // 16 sections per output
    plan.input.bands = [{ id: 'hand', type: 'peaking', frequency: 1000, gainDb: -2, q: 1, enabled: true }];
    plan.outputs[1].lowPass = { family: 'linkwitz-riley', order: 8, frequency: 120 }; // 4 sections
    plan.outputs[1].highPass = { family: 'butterworth', order: 3, frequency: 25 }; // 2 sections
    // 16 - (1 input band + 6 edge sections) on the fullest output: 9 left.
    expect(sectionsLeft(plan, { kind: 'system' }).left).toBe(9);
    const fit = fitPlan(plan, { kind: 'system' }, { ...flatTarget('system'), fromHz: 30, toHz: 300 }, { bands: 30, maxBoostDb: 6 });
    expect(fit.askedBeyondBudget).toBe(true);
    expect(fit.result.bands.length).toBeLessThanOrEqual(9);
    expect(fit.result.bound).toContain('budget');
    for (const u of budgetUse(fit.plan, fit.plan.profile ?? (findBuiltInProfile('float') as NonNullable<Plan['profile']>))) expect(u.used).toBeLessThanOrEqual(u.allowed);
  });

  it('a chain with no budget left gets no bands, and the plan is otherwise unchanged', () => {
    const plan: Plan = systemPlan(roomCase);
    plan.profile = { ...(findBuiltInProfile('q5.23') as NonNullable<Plan['profile']>), sectionBudget: 1 };
    plan.input.bands = [{ id: 'hand', type: 'peaking', frequency: 100, gainDb: -2, q: 1, enabled: true }];
    const fit = fitPlan(plan, { kind: 'system' }, flatTarget('system'));
    expect(fit.result.bands).toEqual([]);
    expect(fit.plan.input.bands).toEqual(plan.input.bands);
  });

  it('a new fit replaces the earlier fitted bands, keeps locked ones and every hand-placed band', () => {
    const plan: Plan = systemPlan(roomCase);
    plan.input.bands = [
      { id: 'hand', type: 'peaking', frequency: 1000, gainDb: -2, q: 1, enabled: true },
      { id: 'old', type: 'peaking', frequency: 64, gainDb: -3, q: 5, enabled: true, fitted: true },
      { id: 'kept', type: 'peaking', frequency: 200, gainDb: -3, q: 5, enabled: true, fitted: true, locked: true },
    ];
    const fit = fitPlan(plan, { kind: 'system' }, { ...flatTarget('system'), fromHz: 30, toHz: 300 }, { bands: 4 });
    const ids = fit.plan.input.bands.map((b) => b.id);
    expect(ids.slice(0, 2)).toEqual(['hand', 'kept']);
    expect(ids).not.toContain('old');
    expect(fit.plan.input.bands.find((b) => b.id === 'kept')).toEqual(plan.input.bands[2]);
    expect(fit.setup.replaced.map((b) => b.id)).toEqual(['old']);
  });

  it('cancelling stops the fit between iterations and leaves the plan untouched', () => {
    const plan = systemPlan(roomCase);
    const before = writePlanText(plan);
    let calls = 0;
    const progress: number[] = [];
    expect(() =>
      fitPlan(plan, { kind: 'system' }, flatTarget('system'), { bands: 10 }, { aborted: () => ++calls > 3, progress: (x) => progress.push(x) }),
    ).toThrow(FitAborted);
    expect(calls).toBe(4);
    expect(progress.length).toBe(3);
    expect(writePlanText(plan)).toBe(before);
  });

  it('reports progress from 0 to 1, never decreasing', () => {
    const seen: number[] = [];
    fitPlan(systemPlan(roomCase), { kind: 'system' }, { ...flatTarget('system'), fromHz: 30, toHz: 300 }, { bands: 4 }, { progress: (x) => seen.push(x) });
    expect(seen.length).toBeGreaterThan(3);
    expect(seen[seen.length - 1]).toBe(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
  });

  it('an output without a driver measurement, or a plan without a system measurement, is refused with the field path', () => {
    const plan = systemPlan(roomCase);
    expect(() => fitPlan(plan, { kind: 'output', outputId: 'right' }, flatTarget('output', 'right'))).toThrow(/outputs\[1\]\.driverMeasurementId/);
    const bare = driverPlan(inverseCase);
    expect(() => fitPlan(bare, { kind: 'system' }, flatTarget('system'))).toThrow(/systemMeasurementIds/);
  });
});

describe('limits under random settings (fast-check, seeded)', () => {
  it('every fit stays within its bounds, its budget and its added-gain limit, and is a valid plan', async () => {
    const fc = await import('fast-check');
    fc.assert(
      fc.property(
        fc.record({
          bands: fc.integer({ min: 0, max: 12 }),
          maxBoostDb: fc.double({ min: 0, max: 9, noNaN: true }),
          maxCutDb: fc.double({ min: 0.5, max: 20, noNaN: true }),
          qMin: fc.double({ min: 0.3, max: 3, noNaN: true }),
          qSpan: fc.double({ min: 1, max: 10, noNaN: true }),
          fromHz: fc.double({ min: 20, max: 100, noNaN: true }),
          octaves: fc.double({ min: 1, max: 4, noNaN: true }),
          maxAddedGainDb: fc.double({ min: 0, max: 6, noNaN: true }),
        }),
        (s) => {
          const qMax = s.qMin * s.qSpan;
          const toHz = s.fromHz * 2 ** s.octaves;
          const fit = fitPlan(systemPlan(roomCase), { kind: 'system' }, { ...flatTarget('system'), fromHz: s.fromHz, toHz }, { ...s, qMax });
          expect(fit.plan.input.bands.length).toBeLessThanOrEqual(s.bands);
          for (const b of fit.plan.input.bands) {
            expect(b.gainDb ?? 0).toBeLessThanOrEqual(s.maxBoostDb);
            expect(b.gainDb ?? 0).toBeGreaterThanOrEqual(-s.maxCutDb);
            expect(b.q ?? 0).toBeGreaterThanOrEqual(s.qMin);
            expect(b.q ?? 0).toBeLessThanOrEqual(qMax);
            expect(b.frequency).toBeGreaterThanOrEqual(s.fromHz * (1 - 1e-9));
            expect(b.frequency).toBeLessThanOrEqual(toHz * (1 + 1e-9));
          }
          expect(fit.result.addedGainDb).toBeLessThanOrEqual(s.maxAddedGainDb + 1e-9);
          expect(fit.result.after.rmsDb).toBeLessThanOrEqual(fit.result.before.rmsDb + 1e-9);
          expect(readPlanValue(planToJson(fit.plan)).ok).toBe(true);
        },
      ),
      { numRuns: 12, seed: 20261202 },
    );
  });
});
