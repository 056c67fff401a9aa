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

// `node --max-old-space-size=N bin/stratotrend ... --threads 2` stopped with an internal error: Node refuses V8 options in
// a worker's execArgv ("Initiated Worker with invalid execArgv flags"). The pool now leaves out the options Node names
// and gives the worker the heap size as its own resource limit (startWorker in src/parallel/pool.ts).
describe('worker pool under node --max-old-space-size', () => {
  it('starts its workers, and each worker gets the heap size asked for', () => {
    const pool = new URL('../../dist/src/parallel/pool.js', import.meta.url).href;
    const fixture = new URL('./fixtures/arithmetic.mjs', import.meta.url).href;
    const script = `import(${JSON.stringify(pool)}).then(async ({ runTasks }) => {
      const squares = await runTasks(${JSON.stringify(fixture)}, 'square', [1, 2, 3, 4], { threads: 2, chunkSize: 1 });
      const limits = await runTasks(${JSON.stringify(fixture)}, 'heapLimit', [0, 1, 2, 3, 4, 5, 6, 7], { threads: 2, chunkSize: 1 });
      process.stdout.write(JSON.stringify({ squares, limits }));
    });`;
    const result = spawnSync(process.execPath, ['--max-old-space-size=300', '--input-type=module', '-e', script], { encoding: 'utf8' });
    expect(result.stderr).toBe('');
    const { squares, limits } = JSON.parse(result.stdout) as { squares: number[]; limits: Array<{ thread: number; megabytes: number }> };
    // Squares of 1..4 (closed form).
    expect(squares).toEqual([1, 4, 9, 16]);
    const worker = limits.filter((limit) => limit.thread !== 0);
    expect(worker.length).toBeGreaterThan(0);
    // V8's heap limit is the old generation asked for plus the young generation's share: within 300 MiB + 64 MiB here.
    for (const limit of worker) expect(limit.megabytes).toBeGreaterThanOrEqual(300);
    for (const limit of worker) expect(limit.megabytes).toBeLessThan(364);
  });
});
