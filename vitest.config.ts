import { fileURLToPath } from 'node:url';
import { svelte } from '@sveltejs/vite-plugin-svelte';
import { defineConfig } from 'vitest/config';

// Unit and component tests. End-to-end browser tests are separate (`npm run test:e2e`).
// Component tests (tests/renderer) opt into jsdom per file with `// @vitest-environment jsdom`;
// the Svelte plugin compiles the renderer's components for them.
export default defineConfig({
  plugins: [svelte({ configFile: fileURLToPath(new URL('./renderer/svelte.config.js', import.meta.url)) })],
  resolve: {
    // The renderer reaches the core as `$core/...` (DEVELOPERS.md, "Layers").
    alias: { $core: fileURLToPath(new URL('./src', import.meta.url)) },
    // Svelte's client runtime (mount, effects) rather than its server build, for the component tests.
    ...(process.env.VITEST ? { conditions: ['browser'] } : {}),
  },
  test: {
    include: ['tests/**/*.test.ts'],
    exclude: ['tests/e2e/**', 'node_modules/**'],
    environment: 'node',
    testTimeout: 30000,
  },
});
