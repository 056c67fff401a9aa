import { describe, expect, it } from 'vitest';
import { guidedChunk, runTasks, TaskError } from '../../src/parallel/pool.js';

const fixture = new URL('./fixtures/arithmetic.mjs', import.meta.url);
const numbers = Array.from({ length: 57 }, (_, i) => i);

describe('runTasks (worker pool)', () => {
  it('returns results in task order with worker threads and the calling thread, equal to inline running', async () => {
    // Expected values are the closed form i^2 (common practice: arithmetic).
    const threaded = await runTasks<number, { value: number; square: number; thread: number }>(fixture, 'slowSquare', numbers, { threads: 2, chunkSize: 3 });
    expect(threaded.map((r) => r.value)).toEqual(numbers);
    expect(threaded.map((r) => r.square)).toEqual(numbers.map((i) => i * i));
    // Two threads are the calling thread (thread id 0) and one worker (issue 14): both took part.
    const threads = new Set(threaded.map((r) => r.thread));
    expect(threads.size).toBe(2);
    expect(threads.has(0)).toBe(true);
    const inline = await runTasks<number, { thread: number; square: number }>(fixture, 'slowSquare', numbers, { threads: 1 });
    expect(inline.map((r) => r.square)).toEqual(threaded.map((r) => r.square));
    expect(inline.every((r) => r.thread === 0)).toBe(true);
  });

  it('starts threads − 1 workers, and none when one chunk is all there is', async () => {
    const three = await runTasks<number, { value: number; thread: number }>(fixture, 'slowSquare', numbers, { threads: 3, chunkSize: 2 });
    expect(three.map((r) => r.value)).toEqual(numbers);
    expect(new Set(three.map((r) => r.thread)).size).toBe(3);
    // One task, or one fixed chunk: the calling thread runs it (no worker is started for nothing).
    const single = await runTasks<number, { value: number; thread: number }>(fixture, 'threadOf', [5], { threads: 2 });
    expect(single).toEqual([{ value: 5, thread: 0 }]);
    const oneChunk = await runTasks<number, { value: number; thread: number }>(fixture, 'threadOf', [1, 2, 3], { threads: 4, chunkSize: 3 });
    expect(oneChunk.map((r) => r.thread)).toEqual([0, 0, 0]);
  });

  it('reports progress up to the total and handles no tasks', async () => {
    const seen: number[] = [];
    await runTasks(fixture, 'square', numbers, { threads: 2, chunkSize: 10, onProgress: (done, total) => { expect(total).toBe(57); seen.push(done); } });
    expect(seen[seen.length - 1]).toBe(57);
    expect([...seen].sort((a, b) => a - b)).toEqual(seen);
    expect(await runTasks(fixture, 'square', [], { threads: 2 })).toEqual([]);
  });

  it('sends shrinking chunks by default, single tasks at the end (issue 14)', async () => {
    // Guided self-scheduling (Polychronopoulos & Kuck 1987): each chunk a quarter of a thread's share of the tasks
    // left, so no thread holds a long chunk while the other is idle. The sizes a run sends, if every task went to
    // workers: ceil(left / 8) for two threads (closed form of the rule): 25, 22 (of 175), 20 (of 153), ..., then single
    // tasks once 7 are left (ceil(9 / 8) = 2, ceil(7 / 8) = 1).
    const sizes: number[] = [];
    for (let left = 200; left > 0; left -= sizes[sizes.length - 1]) sizes.push(guidedChunk(left, 2));
    expect(sizes.slice(0, 3)).toEqual([25, 22, 20]);
    expect(sizes.filter((size) => size === 1).length).toBe(7);
    const tasks = Array.from({ length: 200 }, (_, i) => i);
    const seen: number[] = [];
    const squares = await runTasks<number, number>(fixture, 'square', tasks, { threads: 2, onProgress: (done) => seen.push(done) });
    expect(squares).toEqual(tasks.map((i) => i * i));
    // The worker's first chunk (25 tasks) and the calling thread's single tasks arrive in some order; none is larger.
    const steps = seen.map((done, k) => done - (k === 0 ? 0 : seen[k - 1]));
    expect(Math.max(...steps)).toBeLessThanOrEqual(25 + 2);
    expect([...seen].sort((a, b) => a - b)).toEqual(seen);
    expect(seen[seen.length - 1]).toBe(200);
  });

  it('passes typed arrays through and names the failing task', async () => {
    const sums = await runTasks<Float64Array, number>(fixture, 'sumTyped', [Float64Array.of(1, 2, 3), Float64Array.of(0.5)], { threads: 2 });
    expect(sums).toEqual([6, 0.5]);
    for (const threads of [1, 2, 3]) {
      const failure = await runTasks(fixture, 'failOn', numbers, { threads }).catch((error: unknown) => error);
      expect(failure).toBeInstanceOf(TaskError);
      expect((failure as TaskError).taskIndex).toBe(13);
      expect((failure as TaskError).originalName).toBe('RangeError');
      expect((failure as TaskError).message).toBe('unlucky 13');
    }
  });

  it('reports a task that threw in the calling thread or in a worker the same way', async () => {
    // 57 tasks on two threads: the worker's first chunk is tasks 0-7 (guidedChunk(57, 2) = 8), so the calling
    // thread's first task is number 8.
    const onMain = await runTasks(fixture, 'failOnMainThread', numbers, { threads: 2 }).catch((error: unknown) => error);
    expect(onMain).toBeInstanceOf(TaskError);
    expect((onMain as TaskError).taskIndex).toBe(8);
    expect((onMain as TaskError).originalName).toBe('RangeError');
    expect((onMain as TaskError).message).toBe('task 8 failed in the calling thread');
    // The worker fails at its first task while the calling thread is still busy with its own (no unhandled rejection).
    const onWorker = await runTasks(fixture, 'failOnWorker', numbers, { threads: 2 }).catch((error: unknown) => error);
    expect(onWorker).toBeInstanceOf(TaskError);
    expect((onWorker as TaskError).taskIndex).toBe(0);
    expect((onWorker as TaskError).originalName).toBe('TypeError');
  });

  it('rejects a missing export', async () => {
    await expect(runTasks(fixture, 'nothing', [1], { threads: 1 })).rejects.toThrow(/does not export/);
    await expect(runTasks(fixture, 'nothing', [1, 2], { threads: 2 })).rejects.toThrow(/does not export/);
  });
});
