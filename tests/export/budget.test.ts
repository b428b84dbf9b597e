/**
 * The section budget on screen counts as the export does: an output whose count equals the
 * budget exports, one more section is refused, and a folded gain on an output without sections
 * costs one unity section (docs/plan-format.md, export step 4).
 */
import { diagnosticMessage } from '../../src/diagnostics';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { budgetUse, buildExportList } from '../../src/export/list';
import { BUILT_IN_PROFILES, copyProfile } from '../../src/export/profiles';
import { readPlanText } from '../../src/plan/read';
import type { Plan } from '../../src/plan/types';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));
function demo(): Plan {
  const r = readPlanText(readFileSync(ASSETS + 'three-way-hall.bqplan', 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}

describe('budgetUse', () => {
  it('is what the export refuses: at the budget it exports, one below it is refused naming the export name', () => {
    const plan = demo();
    const base = copyProfile(BUILT_IN_PROFILES[0].profile);
    for (const [i, u] of budgetUse(plan, base).entries()) {
      const fits = buildExportList(plan, { ...base, sectionBudget: u.used }, plan.outputs[i].id);
      expect(fits.ok).toBe(true);
      if (fits.ok) expect(fits.list.outputs[0].sections.length).toBe(u.used);
      if (u.used > 1) {
        const over = buildExportList(plan, { ...base, sectionBudget: u.used - 1 }, plan.outputs[i].id);
        expect(over.ok).toBe(false);
        if (!over.ok) expect(diagnosticMessage(over.problems[0])).toContain(`output "${u.exportName}" needs ${u.used} sections, 1 more than the board's ${u.used - 1}`);
      }
    }
  });

  it('a folded gain on an output without sections costs one section', () => {
    const plan = demo();
    plan.input.bands = [];
    plan.outputs[0] = { ...plan.outputs[0], highPass: null, lowPass: null, bands: [] };
    const profile = { ...copyProfile(BUILT_IN_PROFILES[0].profile), gain: 'first-section' as const };
    expect(budgetUse(plan, profile)[0].used).toBe(1);
    expect(budgetUse(plan, { ...profile, gain: 'separate' })[0].used).toBe(0);
  });
});
