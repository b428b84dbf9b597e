// The lint rules are the architecture's documentation: each layer may import only what
// DEVELOPERS.md ("Layers") allows. Type-level checks (the per-layer tsconfigs) back them up.
import tseslint from 'typescript-eslint';
import svelteParser from 'svelte-eslint-parser';

const NODE_BUILTINS = ['node:*', 'fs', 'fs/*', 'path', 'os', 'child_process', 'crypto', 'url', 'util', 'stream', 'events', 'worker_threads'];
const why = 'see DEVELOPERS.md, "Layers"';

export default tseslint.config(
  { ignores: ['node_modules/**', 'out/**', 'dist/**', 'dist-web/**', 'test-results/**', 'src/response/kernel-wasm-bytes.ts'] },
  {
    files: ['**/*.ts', '**/*.mjs'],
    languageOptions: { parser: tseslint.parser },
    plugins: { '@typescript-eslint': tseslint.plugin },
    rules: {},
  },
  {
    // Components are held to the same layer rules as the renderer's TypeScript: their <script>
    // blocks are parsed as TypeScript inside svelte-eslint-parser.
    files: ['**/*.svelte'],
    languageOptions: { parser: svelteParser, parserOptions: { parser: tseslint.parser, extraFileExtensions: ['.svelte'] } },
    plugins: { '@typescript-eslint': tseslint.plugin },
    rules: {},
  },
  {
    files: ['src/**/*.ts'],
    ignores: ['src/node/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: NODE_BUILTINS, message: `src/ is the common layer: no Node APIs (put adapters in src/node/; ${why})` },
            { group: ['electron', 'electron/*'], message: `src/ is the common layer: no Electron (${why})` },
            { group: ['**/electron/**', '**/renderer/**'], message: `src/ imports nothing from electron/ or renderer/ (${why})` },
          ],
        },
      ],
      'no-restricted-globals': ['error', { name: 'window', message: `no DOM in src/ (${why})` }, { name: 'document', message: `no DOM in src/ (${why})` }, { name: 'process', message: `no Node globals in src/ (${why})` }],
    },
  },
  {
    files: ['renderer/**/*.ts', 'renderer/**/*.svelte'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['electron', 'electron/*', '**/electron/**'], message: `the renderer reaches the host only through renderer/src/host (${why})` },
            { group: NODE_BUILTINS, message: `the renderer runs in a sandbox: no Node APIs (${why})` },
            { regex: '^(\\.\\.?/)+src(/|$)', message: `the renderer imports the core as '$core/...', not by a relative path to src/ (see DEVELOPERS.md, "Layers")` },
          ],
        },
      ],
    },
  },
  {
    files: ['electron/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', { patterns: [{ group: ['**/renderer/**'], message: `main and preload never import the renderer (${why})` }] }],
    },
  },
);
