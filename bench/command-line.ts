import { isMainThread } from 'node:worker_threads';

/**
 * Whether the bench module at `moduleUrl` (its `import.meta.url`) was started
 * as the command (`node dist/bench/NAME.js ...`), not imported by another
 * script or loaded by a worker thread of the pool.
 */
export function runsAsCommand(moduleUrl: string): boolean {
  const script = process.argv[1];
  return isMainThread && script !== undefined && script !== '' && moduleUrl.endsWith(script.replace(/\\/g, '/'));
}

/** Remove `name` and the value after it from `args`, returning the value (undefined when `name` is absent). */
export function takeOption(args: string[], name: string): string | undefined {
  const at = args.indexOf(name);
  return at >= 0 ? args.splice(at, 2)[1] : undefined;
}
