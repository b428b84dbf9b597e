/**
 * The layer rules of eslint.config.mjs (DEVELOPERS.md, "Layers") hold for components too: a probe
 * component that imports electron/ or a Node built-in fails lint; one that imports the core passes.
 * The renderer reaches the core through the `$core` alias only: a relative path to src/ fails, in a
 * component and in the renderer's TypeScript.
 * The probes are linted as text under a component's path, so nothing is written into the tree.
 */
import { ESLint } from 'eslint';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = join(__dirname, '..', '..');
const eslint = new ESLint({ cwd: ROOT });

async function lintComponent(script: string, path = 'renderer/src/components/LayerProbe.svelte'): Promise<string[]> {
  const text = `<script lang="ts">\n${script}\n</script>\n\n<p>probe</p>\n`;
  const [result] = await eslint.lintText(text, { filePath: join(ROOT, path) });
  return result.messages.map((m) => `${m.ruleId}: ${m.message}`);
}

describe('layer rules in .svelte files', () => {
  it('an import of electron/ from a component fails lint', async () => {
    const messages = await lintComponent(`  import { isPlanPath } from '../../../electron/files';\n  const x: boolean = isPlanPath('a.bqplan');`);
    expect(messages).toHaveLength(1);
    expect(messages[0]).toMatch(/^no-restricted-imports: .*renderer reaches the host only through renderer\/src\/host/);
  });

  it('Electron itself and Node built-ins fail lint in a component, in a nested view too', async () => {
    expect(await lintComponent(`  import { ipcRenderer } from 'electron';\n  void ipcRenderer;`)).toHaveLength(1);
    expect(await lintComponent(`  import { readFileSync } from 'node:fs';\n  void readFileSync;`, 'renderer/src/views/export/LayerProbe.svelte')).toHaveLength(1);
  });

  it('a component that imports the core and the host adapter passes', async () => {
    const messages = await lintComponent(`  import { LIMITS } from '$core/plan/types';\n  import { planFileName } from '../host/host';\n  void LIMITS;\n  void planFileName;`);
    expect(messages).toEqual([]);
  });
});

describe('the renderer imports the core as $core/...', () => {
  const RELATIVE = /^no-restricted-imports: .*imports the core as '\$core\/\.\.\.', not by a relative path to src\/ \(see DEVELOPERS\.md, "Layers"\)/;

  it('a relative import of src/ from a component fails lint, at any depth, type-only too', async () => {
    const top = await lintComponent(`  import { LIMITS } from '../../src/plan/types';\n  void LIMITS;`, 'renderer/src/LayerProbe.svelte');
    expect(top).toHaveLength(1);
    expect(top[0]).toMatch(RELATIVE);
    const nested = await lintComponent(`  import type { Plan } from '../../../../src/plan/types';\n  const p: Plan | null = null;\n  void p;`, 'renderer/src/views/export/LayerProbe.svelte');
    expect(nested).toHaveLength(1);
    expect(nested[0]).toMatch(RELATIVE);
  });

  it('a relative import of src/ from the renderer\'s TypeScript fails lint; the same through $core passes', async () => {
    const lintTs = async (text: string) => {
      const [result] = await eslint.lintText(text, { filePath: join(ROOT, 'renderer/src/lib/layer-probe.ts') });
      return result.messages.map((m) => `${m.ruleId}: ${m.message}`);
    };
    const relative = await lintTs(`import { LIMITS } from '../../../src/plan/types';\nexport const x = LIMITS;\n`);
    expect(relative).toHaveLength(1);
    expect(relative[0]).toMatch(RELATIVE);
    expect(await lintTs(`import { LIMITS } from '$core/plan/types';\nexport const x = LIMITS;\n`)).toEqual([]);
    // The renderer's own modules are still imported by relative paths.
    expect(await lintTs(`import { TEST_HOOK } from './test-hook';\nexport const x = TEST_HOOK;\n`)).toEqual([]);
  });
});
