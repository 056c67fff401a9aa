import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // Compiles src/ when dist/ is stale, so worker and CLI tests never run old code.
    globalSetup: ['test/support/fresh-build.ts'],
    testTimeout: 300_000,
    hookTimeout: 300_000,
    reporters: ['default'],
  },
});
