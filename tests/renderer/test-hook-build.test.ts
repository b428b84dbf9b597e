/**
 * The test hook (renderer/src/lib/test-hook.ts) does not ship: a release build of the web app has
 * no `window.__biquadrant` and none of the code that feeds it; a build made for the browser tests
 * (VITE_TEST_HOOK=1, as tests/e2e/serve.mjs makes it) has it.
 */
import { mkdtemp, readdir, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'vite';
import { describe, expect, it } from 'vitest';

const ROOT = join(__dirname, '..', '..');

async function bundleText(testHook: boolean): Promise<string> {
  const outDir = await mkdtemp(join(tmpdir(), 'bq-hook-'));
  const before = { hook: process.env.VITE_TEST_HOOK, nodeEnv: process.env.NODE_ENV };
  try {
    if (testHook) process.env.VITE_TEST_HOOK = '1';
    else delete process.env.VITE_TEST_HOOK;
    // vitest runs with NODE_ENV=test, which would make Vite build for development.
    process.env.NODE_ENV = 'production';
    await build({ configFile: join(ROOT, 'vite.web.config.ts'), mode: 'production', logLevel: 'silent', build: { outDir, emptyOutDir: true } });
    const assets = join(outDir, 'assets');
    const js = (await readdir(assets)).filter((f) => f.endsWith('.js'));
    return (await Promise.all(js.map((f) => readFile(join(assets, f), 'utf8')))).join('\n');
  } finally {
    if (before.hook === undefined) delete process.env.VITE_TEST_HOOK;
    else process.env.VITE_TEST_HOOK = before.hook;
    process.env.NODE_ENV = before.nodeEnv;
    await rm(outDir, { recursive: true, force: true });
  }
}

describe('test hook in built bundles', () => {
  it('a release build has no window.__biquadrant and no frame-time recording; a test build has both', async () => {
    const release = await bundleText(false);
    expect(release.length).toBeGreaterThan(10_000);
    expect(release).not.toContain('[svelte] await_reactivity_loss'); // a release build, not a development one
    expect(release).not.toContain('__biquadrant');
    expect(release).not.toContain('plotUpdates');
    expect(release).not.toContain('magnitudePoint');
    const forTests = await bundleText(true);
    expect(forTests).toContain('__biquadrant');
    expect(forTests).toContain('plotUpdates');
  }, 180_000);
});
