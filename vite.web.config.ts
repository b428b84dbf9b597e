import { fileURLToPath } from 'node:url';
import { svelte } from '@sveltejs/vite-plugin-svelte';
import { defineConfig } from 'vite';

// The renderer as a plain web app (no Electron): `npm run web` builds it into dist-web/ and
// serves it on 127.0.0.1. The host adapter falls back to browser file pickers and local storage.
const root = fileURLToPath(new URL('./renderer', import.meta.url));

export default defineConfig({
  root,
  base: './',
  // The renderer reaches the core as `$core/...` (DEVELOPERS.md, "Layers").
  resolve: { alias: { $core: fileURLToPath(new URL('./src', import.meta.url)) } },
  plugins: [svelte({ configFile: fileURLToPath(new URL('./renderer/svelte.config.js', import.meta.url)) })],
  server: { host: '127.0.0.1', fs: { allow: [fileURLToPath(new URL('.', import.meta.url))] } },
  preview: { host: '127.0.0.1', port: 5178, strictPort: true },
  build: {
    outDir: fileURLToPath(new URL('./dist-web', import.meta.url)),
    emptyOutDir: true,
    target: 'es2022',
    chunkSizeWarningLimit: 1200,
  },
});
