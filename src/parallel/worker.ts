import { parentPort, workerData } from 'node:worker_threads';

/** A chunk of tasks sent to a worker: tasks[j] is task number start + j. */
export interface WorkerRequest {
  readonly start: number;
  readonly tasks: readonly unknown[];
}

/** A worker's answer: the chunk's results, or the first task that threw. */
export type WorkerReply =
  | { readonly kind: 'done'; readonly start: number; readonly results: unknown[] }
  | { readonly kind: 'error'; readonly index: number; readonly name: string; readonly message: string; readonly stack?: string };

/** Body of a pool worker: load the task function once, then run chunks as they arrive. */
async function serve(): Promise<void> {
  const { module, exportName } = workerData as { module: string; exportName: string };
  const loaded = (await import(module)) as Record<string, unknown>;
  const run = loaded[exportName];
  const port = parentPort;
  if (port === null) return;
  port.on('message', async (request: WorkerRequest) => {
    const results: unknown[] = new Array(request.tasks.length);
    for (let j = 0; j < request.tasks.length; j++) {
      try {
        if (typeof run !== 'function') throw new Error(`${module} does not export a function named "${exportName}"`);
        results[j] = await run(request.tasks[j]);
      } catch (error) {
        const cause = error as Error;
        const reply: WorkerReply = { kind: 'error', index: request.start + j, name: cause?.name ?? 'Error', message: cause?.message ?? String(error), stack: cause?.stack };
        port.postMessage(reply);
        return;
      }
    }
    const reply: WorkerReply = { kind: 'done', start: request.start, results };
    port.postMessage(reply);
  });
}

if (parentPort !== null) void serve();
