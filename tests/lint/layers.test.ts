/**
 * The layer rules of eslint.config.mjs (DEVELOPERS.md, "Layers") hold for components too: a probe
 * component that imports electron/ or a Node built-in fails lint; one that imports the core passes.
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
    const messages = await lintComponent(`  import { LIMITS } from '../../../src/plan/types';\n  import { planFileName } from '../host/host';\n  void LIMITS;\n  void planFileName;`);
    expect(messages).toEqual([]);
  });
});
