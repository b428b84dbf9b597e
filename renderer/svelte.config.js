// Svelte compiler options for the renderer (read by the Vite plugin and svelte-check).
// TypeScript in <script lang="ts"> is handled by Svelte 5 itself; no preprocessor needed.
export default {
  compilerOptions: {
    runes: true,
  },
};
