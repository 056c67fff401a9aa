import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';

// A parent started as `node --input-type=module -e SCRIPT` (how bench/run.ts runs the CLI) passed those
// options on to every worker, and Node refused to start the workers ("--input-type can only be used with
// string input"); the pool now leaves them out (workerExecArgv in src/parallel/pool.ts).
describe('worker pool under node -e', () => {
  it('starts its workers and returns the results in task order', () => {
    const pool = new URL('../../dist/src/parallel/pool.js', import.meta.url).href;
    const fixture = new URL('./fixtures/arithmetic.mjs', import.meta.url).href;
    const script = `import(${JSON.stringify(pool)}).then(async ({ runTasks }) => {
      const results = await runTasks(${JSON.stringify(fixture)}, 'square', [1, 2, 3, 4], { threads: 2, chunkSize: 1 });
      process.stdout.write(JSON.stringify(results));
    });`;
    const result = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8' });
    expect(result.stderr).toBe('');
    // Squares of 1..4 (closed form).
    expect(JSON.parse(result.stdout)).toEqual([1, 4, 9, 16]);
  });
});
