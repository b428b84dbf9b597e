/**
 * One wording of the feedback sign: every line of an export that lists a section's numbers (the
 * text list's header, the convention comment, the C header's row comment) names them the same
 * way, with the sign written ("-a1" when the board gets -a1), and the board equation agrees with
 * them. The equation is the direct form I difference equation of a biquad with a0 = 1 (Audio EQ
 * Cookbook, eq. 4); a board that adds its feedback terms needs A1 = -a1, A2 = -a2.
 */
import { diagnosticMessage } from '../../src/diagnostics';
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { formatExport } from '../../src/export/format';
import { buildExportList } from '../../src/export/list';
import { BUILT_IN_PROFILES, describeProfile, FEEDBACK_SIGN_WORDS, writtenNames } from '../../src/export/profiles';
import { readPlanText } from '../../src/plan/read';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
const r = readPlanText(readFileSync(ASSETS + 'two-way-monitor.bqplan', 'utf8'));
if (!r.ok) throw r.error;
const plan = r.plan;

describe.each(BUILT_IN_PROFILES.map((b) => [b.profile.name, b.profile] as const))('%s', (_name, profile) => {
  const l = buildExportList(plan, profile);
  if (!l.ok) throw new Error(diagnosticMessage(l.problems[0]));
  const names = writtenNames(profile);
  const negated = profile.feedbackSign === 'negated';

  it('names the numbers with their sign, the same in every list of them', () => {
    expect(names.includes('-a1')).toBe(negated);
    const text = formatExport(l.list, 'text');
    expect(text).toContain(`# One line per section: ${names.join(' ')}\n`);
    expect(text).toContain(`# Numbers per section: ${names.join(' ')}`);
    const c = formatExport(l.list, 'c');
    expect(c).toContain(` * Each row is {${names.join(', ')}}.`);
    expect(c).toContain(` * Numbers per section: ${names.join(' ')}`);
    // No line lists the unsigned names beside the signed ones.
    if (negated) {
      expect(text).not.toMatch(/b0 b1 b2 a1 a2/);
      expect(c).not.toMatch(/\{b0, b1, b2, a1, a2\}/);
    }
  });

  it('states the board equation and the profile in the one wording', () => {
    const words = FEEDBACK_SIGN_WORDS[profile.feedbackSign];
    expect(formatExport(l.list, 'text')).toContain(`# Board equation: ${words.equation}`);
    expect(describeProfile(profile, plan.sampleRate)).toContain(words.written);
    expect(words.equation.includes('A1 = -a1')).toBe(negated);
  });
});
