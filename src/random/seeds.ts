/**
 * Seed of one replicate, derived from the run's seed and the replicate's
 * coordinates (e.g. grid point and replicate index) only, so results never
 * depend on how replicates are spread over threads or in what order they run.
 * Each part is folded in with the 32-bit finaliser of MurmurHash3 (Appleby
 * 2011, public domain), which spreads neighbouring indices over the whole
 * 32-bit range.
 *
 * @param seed the user's seed (any integer; taken modulo 2^32)
 * @param parts replicate coordinates (non-negative integers)
 * @returns a 32-bit unsigned seed for {@link createRandom}
 *
 * @example
 * replicateSeed(1, 0, 5) === replicateSeed(1, 0, 5); // true
 * replicateSeed(1, 0, 5) === replicateSeed(1, 0, 6); // false
 */
export function replicateSeed(seed: number, ...parts: number[]): number {
  let hash = finalise((seed >>> 0) ^ 0x5bd1e995);
  for (const part of parts) hash = finalise((hash ^ Math.imul((part >>> 0) + 0x9e3779b9, 0x85ebca6b)) >>> 0);
  return hash >>> 0;
}

function finalise(value: number): number {
  let h = value >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b) >>> 0;
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35) >>> 0;
  h ^= h >>> 16;
  return h >>> 0;
}

/**
 * Check a user's seed: an integer from 0 to 2^32 - 1. Returns null when it is not one.
 *
 * @example
 * parseSeed(' 42 '); // 42
 * parseSeed('4294967296'); // null (2^32 is one too many)
 * parseSeed('-1'); // null
 */
export function parseSeed(text: string): number | null {
  if (!/^\d+$/.test(text.trim())) return null;
  const value = Number(text);
  return Number.isSafeInteger(value) && value <= 0xffffffff ? value : null;
}
