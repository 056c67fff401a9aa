/**
 * Exhaustive sweeps in the tests (issue 22): `npm test` runs a fixed seeded
 * sample of each, `npm run bench` (bench/run.ts, `sweepFiles`) runs them whole
 * by setting STRATOTREND_SWEEP=full. Same assertions either way; only how
 * many seeds or property runs.
 */
export const fullSweep = process.env.STRATOTREND_SWEEP === 'full';

/**
 * `full` under STRATOTREND_SWEEP=full, `sample` otherwise.
 *
 * @example
 * const numRuns = sweepSize(2000, 500); // 500 in npm test, 2000 in the bench
 */
export function sweepSize<T>(full: T, sample: T): T {
  return fullSweep ? full : sample;
}
