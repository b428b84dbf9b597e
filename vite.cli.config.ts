import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';

// The installed `biquadrant` command as built JavaScript: `npm run build:cli` bundles the Node
// adapter (src/node/cli.ts) and the core into out/cli/biquadrant.mjs, which bin/biquadrant.mjs
// runs. Nothing is compiled at run time. `npm run cli` keeps running the TypeScript through tsx.
export default defineConfig({
  build: {
    ssr: fileURLToPath(new URL('./src/node/cli.ts', import.meta.url)),
    outDir: fileURLToPath(new URL('./out/cli', import.meta.url)),
    emptyOutDir: true,
    target: 'node20',
    minify: false,
    sourcemap: false,
    rollupOptions: { output: { format: 'es', entryFileNames: 'biquadrant.mjs' } },
  },
  // Bundle the core's dependencies too: the built command needs only Node.
  ssr: { noExternal: true, target: 'node' },
});
