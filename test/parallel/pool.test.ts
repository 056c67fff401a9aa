import { describe, expect, it } from 'vitest';
import { runTasks, TaskError } from '../../src/parallel/pool.js';

const fixture = new URL('./fixtures/arithmetic.mjs', import.meta.url);
const numbers = Array.from({ length: 57 }, (_, i) => i);

describe('runTasks (worker pool)', () => {
  it('returns results in task order with worker threads, equal to inline running', async () => {
    // Expected values are the closed form i^2 (common practice: arithmetic).
    const threaded = await runTasks<number, { value: number; square: number; thread: number }>(fixture, 'slowSquare', numbers, { threads: 2, chunkSize: 3 });
    expect(threaded.map((r) => r.value)).toEqual(numbers);
    expect(threaded.map((r) => r.square)).toEqual(numbers.map((i) => i * i));
    // Both workers took part (the thread id 0 is the main thread).
    expect(new Set(threaded.map((r) => r.thread)).size).toBe(2);
    expect(threaded.every((r) => r.thread !== 0)).toBe(true);
    const inline = await runTasks<number, { thread: number; square: number }>(fixture, 'slowSquare', numbers, { threads: 1 });
    expect(inline.map((r) => r.square)).toEqual(threaded.map((r) => r.square));
    expect(inline.every((r) => r.thread === 0)).toBe(true);
  });

  it('reports progress up to the total and handles no tasks', async () => {
    const seen: number[] = [];
    await runTasks(fixture, 'square', numbers, { threads: 2, chunkSize: 10, onProgress: (done, total) => { expect(total).toBe(57); seen.push(done); } });
    expect(seen[seen.length - 1]).toBe(57);
    expect([...seen].sort((a, b) => a - b)).toEqual(seen);
    expect(await runTasks(fixture, 'square', [], { threads: 2 })).toEqual([]);
  });

  it('sends shrinking chunks by default, single tasks at the end (issue 14)', async () => {
    // Guided self-scheduling (Polychronopoulos & Kuck 1987): each chunk a quarter of a worker's share of the tasks
    // left, so no worker holds a long chunk while the other is idle. With fixed chunks of 200 / 16 the last
    // chunks would all be 13 tasks.
    const tasks = Array.from({ length: 200 }, (_, i) => i);
    const seen: number[] = [];
    const squares = await runTasks<number, number>(fixture, 'square', tasks, { threads: 2, onProgress: (done) => seen.push(done) });
    expect(squares).toEqual(tasks.map((i) => i * i));
    const steps = seen.map((done, k) => done - (k === 0 ? 0 : seen[k - 1]));
    // Chunk sizes follow from the tasks left when each is sent, so they do not depend on timing (only their order does).
    expect(Math.max(...steps)).toBe(25);
    expect(steps.filter((step) => step === 1).length).toBeGreaterThanOrEqual(5);
    expect(seen[seen.length - 1]).toBe(200);
  });

  it('passes typed arrays through and names the failing task', async () => {
    const sums = await runTasks<Float64Array, number>(fixture, 'sumTyped', [Float64Array.of(1, 2, 3), Float64Array.of(0.5)], { threads: 2 });
    expect(sums).toEqual([6, 0.5]);
    for (const threads of [1, 2]) {
      const failure = await runTasks(fixture, 'failOn', numbers, { threads }).catch((error: unknown) => error);
      expect(failure).toBeInstanceOf(TaskError);
      expect((failure as TaskError).taskIndex).toBe(13);
      expect((failure as TaskError).originalName).toBe('RangeError');
      expect((failure as TaskError).message).toBe('unlucky 13');
    }
  });

  it('rejects a missing export', async () => {
    await expect(runTasks(fixture, 'nothing', [1], { threads: 1 })).rejects.toThrow(/does not export/);
    await expect(runTasks(fixture, 'nothing', [1, 2], { threads: 2 })).rejects.toThrow(/does not export/);
  });
});
