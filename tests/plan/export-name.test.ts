/**
 * Export names (plan version 3): each output's identifier in exports defaults to a slug of its
 * name, follows renames, is unique ignoring case, and is a C identifier. The identifier rule is
 * ISO C (C11, 6.4.2.1: a letter or underscore, then letters, digits, underscores); the test also
 * compiles a header with gcc when one is present, as an outside check.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { diagnosticMessage } from '../../src/diagnostics';
import { formatExport } from '../../src/export/format';
import { buildExportList } from '../../src/export/list';
import { BUILT_IN_PROFILES, copyProfile } from '../../src/export/profiles';
import { EXPORT_NAME_PATTERN, exportNames, slugExportName } from '../../src/plan/export-name';
import { readPlanText, readPlanValue } from '../../src/plan/read';
import { PLAN_VERSION, type Plan } from '../../src/plan/types';
import { planToJson, writePlanText } from '../../src/plan/write';
import * as edits from '../../src/ui/edits';

const ASSETS = fileURLToPath(new URL('../../assets/', import.meta.url));

function demo(): Plan {
  const r = readPlanText(readFileSync(ASSETS + 'two-way-monitor.bqplan', 'utf8'));
  if (!r.ok) throw r.error;
  return r.plan;
}

describe('the default export name is a slug of the output name', () => {
  it.each([
    ['Main L', 'main_l'],
    ['  Woofer (left) ', 'woofer_left'],
    ['Sub 2', 'sub_2'],
    ['2nd sub', 'out_2nd_sub'],
    ['Médium', 'medium'],
    ['***', 'output'],
    ['', 'output'],
    ['A very long output name that goes on and on', 'a_very_long_output_name_that_goe'],
  ])('%j -> %s', (name, slug) => {
    expect(slugExportName(name)).toBe(slug);
    expect(slug).toMatch(EXPORT_NAME_PATTERN);
  });

  it('is unique ignoring case; a set name keeps its place and the default moves', () => {
    expect(exportNames([{ name: 'Main' }, { name: 'main' }, { name: 'MAIN' }])).toEqual(['main', 'main_2', 'main_3']);
    expect(exportNames([{ name: 'Main' }, { name: 'Other', exportName: 'MAIN' }])).toEqual(['main_2', 'MAIN']);
    const many = exportNames(Array.from({ length: 16 }, () => ({ name: 'x'.repeat(40) })));
    expect(new Set(many.map((n) => n.toLowerCase())).size).toBe(16);
    for (const n of many) expect(n).toMatch(EXPORT_NAME_PATTERN);
  });

  it('follows a rename until the user sets one', () => {
    let p = demo();
    const added = edits.addOutput(p);
    if (!added.ok) throw new Error(diagnosticMessage(added.diagnostic));
    p = added.plan;
    const id = p.outputs[2].id;
    const renamed = edits.updateOutput(p, id, { name: 'Main L' });
    if (!renamed.ok) throw new Error(diagnosticMessage(renamed.diagnostic));
    expect(exportNames(renamed.plan.outputs)[2]).toBe('main_l');
    expect(renamed.plan.outputs[2].id).toBe(id); // the plan id stays; only the export name follows
  });
});

describe('plan field exportName (version 3)', () => {
  const doc = (exportName: unknown, version = PLAN_VERSION) => {
    const outputs = planToJson(demo()).outputs as Record<string, unknown>[];
    return { ...planToJson(demo()), version, outputs: outputs.map((o, i) => (i === 1 ? { ...o, exportName } : o)) };
  };

  it('is read, written after the name, and round-trips', () => {
    const r = readPlanValue(doc('tw_hi'));
    if (!r.ok) throw r.error;
    expect(r.plan.outputs[1].exportName).toBe('tw_hi');
    const text = writePlanText(r.plan);
    expect(Object.keys(JSON.parse(text).outputs[1]).slice(0, 3)).toEqual(['id', 'name', 'exportName']);
    expect(Object.keys(JSON.parse(text).outputs[0])).not.toContain('exportName');
    const back = readPlanText(text);
    expect(back.ok && back.plan.outputs[1].exportName).toBe('tw_hi');
  });

  it.each([
    ['', /must not be empty/],
    ['2way', /C identifier/],
    ['main-l', /C identifier/],
    ['main l', /C identifier/],
    ['x'.repeat(33), /at most 32/],
    [7, /must be a string/],
  ])('refuses %j with its field path', (value, why) => {
    const r = readPlanValue(doc(value));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.path).toBe('outputs[1].exportName');
      expect(r.error.message).toMatch(why);
    }
  });

  it('refuses two outputs with the same export name, ignoring case', () => {
    const d = doc('Woofer');
    d.outputs[0] = { ...d.outputs[0], exportName: 'woofer' };
    const r = readPlanValue(d);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.path).toBe('outputs[1].exportName');
  });

  it('is not a field of version 2: refused there, with its path', () => {
    const r = readPlanValue(doc('tw', 2));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.path).toBe('outputs[1].exportName');
      expect(r.error.message).toMatch(/version 2/);
    }
  });

  it('a version 2 file migrates to version 3 adding nothing but the version', () => {
    const v2 = { ...planToJson(demo()), version: 2 };
    const r = readPlanValue(v2);
    if (!r.ok) throw r.error;
    expect(planToJson(r.plan)).toEqual({ ...v2, version: 3 });
  });
});

describe('exports use the export name', () => {
  function renamed(): Plan {
    const p = demo();
    p.outputs[1] = { ...p.outputs[1], id: 'output-2', name: 'Main L' };
    return p;
  }

  it('in the text, CSV, JSON and C formats', () => {
    const r = buildExportList(renamed(), BUILT_IN_PROFILES[1].profile);
    if (!r.ok) throw new Error(diagnosticMessage(r.problems[0]));
    expect(formatExport(r.list, 'text')).toMatch(/^output main_l$/m);
    expect(formatExport(r.list, 'csv')).toMatch(/^main_l,1,/m);
    expect(JSON.parse(formatExport(r.list, 'json')).outputs[1].id).toBe('main_l');
    const c = formatExport(r.list, 'c');
    expect(c).toMatch(/bq_main_l_sos\[/);
    expect(c).toMatch(/#define BQ_MAIN_L_SECTIONS /);
    expect(c).not.toMatch(/output-2|output_2/);
  });

  it('section comments give the source under the export name and its type spelled out', () => {
    const r = buildExportList(renamed(), BUILT_IN_PROFILES[0].profile);
    if (!r.ok) throw new Error(diagnosticMessage(r.problems[0]));
    const text = formatExport(r.list, 'text');
    expect(text).toMatch(/# \d+ main_l\/highPass \(high-pass edge\)$/m);
    expect(text).toMatch(/# \d+ input\/\S+ \((peaking|low shelf|high shelf|notch)\)$/m);
    expect(formatExport(r.list, 'c')).toMatch(/\/\* \d+ main_l\/highPass \(high-pass edge\) \*\//);
    // No two-letter type codes anywhere in the comments.
    expect(text).not.toMatch(/\((PK|LS|HS|LP|HP|BP|AP)\d?\)/);
  });

  it('in the section budget refusal', () => {
    const profile = { ...copyProfile(BUILT_IN_PROFILES[0].profile), sectionBudget: 1 };
    const p = renamed();
    p.outputs[1] = { ...p.outputs[1], exportName: 'HF_left' };
    const r = buildExportList(p, profile);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      const m = r.problems.map((x) => diagnosticMessage(x)).join('\n');
      expect(m).toMatch(/output "HF_left" needs \d+ sections/);
      expect(m).not.toMatch(/output-2/);
    }
  });

  it('the C header with export names compiles (gcc, when present)', () => {
    let gcc = true;
    try {
      execFileSync('gcc', ['--version']);
    } catch {
      gcc = false;
    }
    if (!gcc) return;
    const p = renamed();
    p.outputs[0] = { ...p.outputs[0], name: '1st woofer (left)' };
    const r = buildExportList(p, BUILT_IN_PROFILES[2].profile);
    if (!r.ok) throw new Error(diagnosticMessage(r.problems[0]));
    const dir = mkdtempSync(join(tmpdir(), 'bq-names-'));
    writeFileSync(join(dir, 'c.h'), formatExport(r.list, 'c'));
    writeFileSync(join(dir, 'm.c'), '#include "c.h"\nint main(void) { return (int)(bq_out_1st_woofer_left_sos[0][0] & 0) + BQ_MAIN_L_SECTIONS * 0; }\n');
    execFileSync('gcc', ['-Wall', '-Werror', '-o', join(dir, 'm'), join(dir, 'm.c')]);
  });
});
