import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // Child processes, not worker threads: the in-process CLI tests
    // (test/support/cli-in-process.ts) change the working folder, which a
    // worker thread cannot. (forks is vitest 4's default; stated so it stays.)
    pool: 'forks',
    // Compiles src/ when dist/ is stale, so worker and CLI tests never run old code.
    globalSetup: ['test/support/fresh-build.ts'],
    testTimeout: 300_000,
    hookTimeout: 300_000,
    reporters: ['default'],
  },
});
