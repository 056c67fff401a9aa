import { availableParallelism } from 'node:os';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // Child processes, not worker threads: the in-process CLI tests
    // (test/support/cli-in-process.ts) change the working folder, which a
    // worker thread cannot. (forks is vitest 4's default; stated so it stays.)
    pool: 'forks',
    // One test file per core (issue 22). Vitest's own default for `vitest run`
    // is cores − 1, which on a 2-core machine is ONE fork: the whole suite ran
    // file after file and used 135% of 2 cores. Most files wait on child
    // processes, worker threads or Chromium part of the time, so a fork per
    // core keeps both cores busy without oversubscribing much.
    maxWorkers: Math.max(2, availableParallelism()),
    // Compiles src/ when dist/ is stale, so worker and CLI tests never run old code.
    globalSetup: ['test/support/fresh-build.ts'],
    testTimeout: 300_000,
    hookTimeout: 300_000,
    reporters: ['default'],
  },
});
