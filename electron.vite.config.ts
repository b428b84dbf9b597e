import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { svelte } from '@sveltejs/vite-plugin-svelte';
import { defineConfig } from 'electron-vite';

// The desktop build: `electron-vite build` writes out/main/index.js (ESM, the package's "main"),
// out/preload/index.cjs and out/renderer/. It needs no Electron binary.
const here = (p: string): string => fileURLToPath(new URL(p, import.meta.url));
const svelteConfig = here('./renderer/svelte.config.js');

export default defineConfig({
  main: {
    build: {
      // The core is bundled in: the packaged app needs no node_modules at run time.
      externalizeDeps: false,
      rolldownOptions: {
        input: { index: here('./electron/main.ts') },
      },
    },
  },
  preload: {
    build: {
      // A sandboxed preload is a classic script: one CommonJS file, no imports of other files
      // (only `require('electron')`), so no chunks and nothing left external but electron.
      externalizeDeps: false,
      isolatedEntries: true,
      rolldownOptions: {
        input: { index: here('./electron/preload.ts') },
        output: { format: 'cjs', entryFileNames: '[name].cjs' },
      },
    },
  },
  renderer: {
    root: here('./renderer'),
    // The renderer reaches the core as `$core/...` (DEVELOPERS.md, "Layers"), never `../../src`.
    resolve: { alias: { $core: here('./src') } },
    plugins: [svelte(existsSync(svelteConfig) ? { configFile: svelteConfig } : {})],
    server: { fs: { allow: [here('.')] } },
    build: {
      outDir: here('./out/renderer'),
      target: 'es2022',
      chunkSizeWarningLimit: 1200,
      rolldownOptions: {
        input: { index: here('./renderer/index.html') },
      },
    },
  },
});
