import { defineConfig } from 'vitest/config';

// Unit and component tests. End-to-end browser tests are separate (`npm run test:e2e`).
export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    exclude: ['tests/e2e/**', 'node_modules/**'],
    environment: 'node',
    testTimeout: 30000,
  },
});
