/**
 * The import graph (DEVELOPERS.md, "Layers"): no module imports itself back through others, the
 * core's folders form no loop (plan below design, analysis below ui), nothing in the core but
 * src/ui and src/node imports src/ui, and src/ui holds only modules the renderer uses. Relative
 * imports and the renderer's `$core/...` imports are read from the sources (type-only imports count: they tie the modules together just
 * as much for a reader).
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = join(__dirname, '..', '..');

function files(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...files(p));
    else if (/\.(ts|svelte)$/.test(name) && !name.endsWith('.d.ts')) out.push(p);
  }
  return out;
}

function resolveImport(from: string, spec: string): string | null {
  // `$core/...` is the renderer's alias for src/ (vite configs, renderer/tsconfig.json).
  const base = spec.startsWith('$core/') ? join(ROOT, 'src', spec.slice('$core/'.length)) : resolve(dirname(from), spec);
  for (const candidate of [base, `${base}.ts`, `${base}.svelte.ts`, join(base, 'index.ts')]) {
    if (existsSync(candidate) && statSync(candidate).isFile()) return candidate;
  }
  return null;
}

/** module -> the modules it imports (relative and `$core/` specifiers; packages are leaves). */
function graph(dirs: string[]): Map<string, string[]> {
  const g = new Map<string, string[]>();
  for (const d of dirs) {
    for (const f of files(join(ROOT, d))) {
      const text = readFileSync(f, 'utf8');
      const specs = [...text.matchAll(/(?:^|\n)\s*(?:import|export)\s[^;]*?from\s+['"](\.[^'"]+|\$core\/[^'"]+)['"]/g)].map((m) => m[1]);
      g.set(
        relative(ROOT, f),
        specs.map((s) => resolveImport(f, s)).filter((x): x is string => x !== null).map((x) => relative(ROOT, x)),
      );
    }
  }
  return g;
}

/** Strongly connected components with more than one node (Tarjan): the import loops. */
function loops(g: Map<string, string[]>): string[][] {
  let index = 0;
  const idx = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const on = new Set<string>();
  const out: string[][] = [];
  const visit = (v: string): void => {
    idx.set(v, index);
    low.set(v, index++);
    stack.push(v);
    on.add(v);
    for (const w of g.get(v) ?? []) {
      if (!idx.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (on.has(w)) low.set(v, Math.min(low.get(v)!, idx.get(w)!));
    }
    if (low.get(v) === idx.get(v)) {
      const c: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        on.delete(w);
        c.push(w);
      } while (w !== v);
      if (c.length > 1) out.push(c.sort());
    }
  };
  for (const v of g.keys()) if (!idx.has(v)) visit(v);
  return out;
}

/** src/plan/read.ts -> "plan"; src/ipc.ts -> "ipc.ts". */
function area(path: string): string {
  return path.split('/')[1];
}

const all = graph(['src', 'electron', 'renderer/src']);
const core = new Map([...all].filter(([f]) => f.startsWith('src/')));

describe('import graph', () => {
  it('has no loop between modules (src, electron, renderer)', () => {
    expect(loops(all)).toEqual([]);
  });

  it("has no loop between the core's folders (plan, design, response, analysis, export, cli, ui, ...)", () => {
    const folders = new Map<string, string[]>();
    for (const [f, deps] of core) {
      const a = area(f);
      const list = folders.get(a) ?? [];
      for (const d of deps) if (d.startsWith('src/') && area(d) !== a) list.push(area(d));
      folders.set(a, list);
    }
    expect(loops(folders)).toEqual([]);
    expect(folders.get('plan')).not.toContain('design');
  });

  it('only src/ui and src/node import src/ui within the core', () => {
    const offenders = [...core].filter(([f, deps]) => !f.startsWith('src/ui/') && !f.startsWith('src/node/') && deps.some((d) => d.startsWith('src/ui/')));
    expect(offenders.map(([f]) => f)).toEqual([]);
  });

  it('src/ui holds only what the renderer uses', () => {
    const usedByRenderer = new Set([...all].filter(([f]) => f.startsWith('renderer/')).flatMap(([, deps]) => deps));
    const unused = [...core.keys()].filter((f) => f.startsWith('src/ui/') && !usedByRenderer.has(f));
    expect(unused).toEqual([]);
  });

  it('finds the imports it checks (a loop detector that sees nothing would pass anything)', () => {
    expect(core.get('src/cli/run.ts')).toContain('src/cli/export.ts');
    expect(all.get('renderer/src/components/StatusBar.svelte')).toContain('src/analysis/check.ts');
    expect(loops(new Map([['a', ['b']], ['b', ['a']], ['c', ['a']]]))).toEqual([['a', 'b']]);
  });
});
