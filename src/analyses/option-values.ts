import { usageError } from '../data/errors.js';
import { parseSeed } from '../random/seeds.js';

// Numeric option values as commander hands them over (text), checked once for
// every analysis that takes them (power, bootstrap, simulate, the report's
// --power); moved here from the power command so commands need not import
// each other.

/**
 * A whole number option within a range, or a usage error naming the option.
 *
 * @example
 * wholeOption('12', '--replicates', 99, 1, 1000); // 12
 * wholeOption(undefined, '--replicates', 99, 1, 1000); // 99 (the default)
 * wholeOption('1.5', '--replicates', 99, 1, 1000);
 * // throws: --replicates must be a whole number from 1 to 1000, got "1.5"
 */
export function wholeOption(text: string | undefined, name: string, fallback: number, minimum: number, maximum: number): number {
  if (text === undefined) return fallback;
  const value = Number(text);
  if (!/^\d+$/.test(text.trim()) || !Number.isSafeInteger(value) || value < minimum || value > maximum) {
    throw usageError(`${name} must be a whole number from ${minimum} to ${maximum}, got "${text}"`);
  }
  return value;
}

/**
 * A number option (finite; positive when asked), or a usage error naming the option.
 *
 * @example
 * numberOption('0.5', '--level', true); // 0.5
 * numberOption(undefined, '--level'); // undefined
 * numberOption('-1', '--level', true);
 * // throws: --level must be a positive number, got "-1"
 */
export function numberOption(text: string | undefined, name: string, positive = false): number | undefined {
  if (text === undefined) return undefined;
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value) || (positive && !(value > 0))) {
    throw usageError(`${name} must be a ${positive ? 'positive ' : ''}number, got "${text}"`);
  }
  return value;
}

/**
 * A comma-separated list of numbers, or a usage error naming the option and the bad entry.
 *
 * @example
 * numberList('0, 0.1,0.2', '--drifts'); // [0, 0.1, 0.2]
 * numberList('1,x', '--drifts');
 * // throws: --drifts: "x" is not a number
 */
export function numberList(text: string | undefined, name: string): number[] | undefined {
  if (text === undefined) return undefined;
  const parts = text.split(',').map((part) => part.trim()).filter((part) => part !== '');
  if (parts.length === 0) throw usageError(`${name}: give at least one number`);
  return parts.map((part) => {
    const value = Number(part);
    if (!Number.isFinite(value)) throw usageError(`${name}: "${part}" is not a number`);
    return value;
  });
}

/**
 * The seed option (default 1).
 *
 * @example
 * seedOption('7'); // 7
 * seedOption(undefined); // 1 (the default seed)
 * seedOption('-3');
 * // throws: --seed must be a whole number from 0 to 4294967295, got "-3"
 */
export function seedOption(text: string | undefined): number {
  if (text === undefined) return 1;
  const seed = parseSeed(text);
  if (seed === null) throw usageError(`--seed must be a whole number from 0 to 4294967295, got "${text}"`);
  return seed;
}
