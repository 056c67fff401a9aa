import { availableParallelism } from 'node:os';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import config from '../../vitest.config.js';

// Issue 22: the suite's own settings that keep `npm test` within 3 minutes on 2 cores.
describe('test-suite settings (issue 22)', () => {
  it('runs one fork per core, at least two', () => {
    // Without the setting vitest runs cores - 1 forks in `vitest run` (its resolveMaxWorkers,
    // node_modules/vitest/dist/chunks/cli-api.*.js): one fork on a 2-core machine.
    const test = (config as { test?: { maxWorkers?: number; pool?: string } }).test;
    expect(test?.pool).toBe('forks');
    expect(test?.maxWorkers).toBe(Math.max(2, availableParallelism()));
  });

  it('npm test compiles incrementally, keeping the build record inside dist/ (deleting dist/ forces a full build)', () => {
    const scripts = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { scripts: Record<string, string> }).scripts;
    expect(scripts.pretest).toMatch(/^tsc -p tsconfig\.json --incremental --tsBuildInfoFile dist\//);
  });
});
