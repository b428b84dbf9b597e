/**
 * A unity gain in Q1.31 saturates (Q1.31 holds -1 .. 1 - 2^-31, a fact of two's-complement
 * fixed point), even when the coefficients are halved, because the separate gain is not a
 * coefficient and is never pre-scaled. The export then says plainly what the board must do: the
 * value to write and the power of two to multiply by after the cascade; the written value times
 * that factor gives the gain back within one LSB of the format.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { diagnosticMessage } from '../../src/diagnostics';
import { buildExportList } from '../../src/export/list';
import { BUILT_IN_PROFILES, copyProfile } from '../../src/export/profiles';
import { readPlanText } from '../../src/plan/read';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
const r = readPlanText(readFileSync(ASSETS + 'two-way-monitor.bqplan', 'utf8'));
if (!r.ok) throw r.error;
const plan = r.plan;
const q131 = BUILT_IN_PROFILES.find((b) => b.key === 'q1.31-negated')!.profile;

describe('a gain the number format cannot hold', () => {
  it.each([
    ['as built in', q131],
    ['with halved coefficients', { ...copyProfile(q131), coefficientScale: 0.5 }],
  ])('Q1.31 %s: unity gain is flagged and the note says write 0.5, multiply by 2 after the cascade', (_n, profile) => {
    const l = buildExportList(plan, profile);
    if (!l.ok) throw new Error(diagnosticMessage(l.problems[0]));
    expect(l.list.outputs[0].gain.written?.saturation).toBe('high');
    const note = l.list.notes.map(diagnosticMessage).find((n) => n.startsWith('output "woofer": its gain 1 does not fit Q1.31'));
    expect(note).toBeDefined();
    expect(note).toMatch(/write 0\.5 \(1073741824\) and have the board multiply by 2 \(shift left by 1 bit\) after the cascade/);
    // 0.5 in Q1.31 is 2^30 = 1073741824; times 2 is unity exactly.
    expect((1073741824 / 2 ** 31) * 2).toBe(1);
  });

  it('+6 dB (gain 1.995) needs a factor of 2 as well; a gain inside the range gets no note', () => {
    const p = structuredClone(plan);
    p.outputs[0].gainDb = 6;
    p.outputs[1].gainDb = -6;
    const l = buildExportList(p, q131);
    if (!l.ok) throw new Error(diagnosticMessage(l.problems[0]));
    expect(l.list.notes.map(diagnosticMessage).some((n) => /"woofer": its gain 1\.99\d+ does not fit Q1\.31; write 0\.99\d+ .* multiply by 2 /.test(n))).toBe(true);
    expect(l.list.notes.map(diagnosticMessage).some((n) => n.includes('"tweeter": its gain'))).toBe(false);
  });
});
