import type { UnitPowers } from '../models/model.js';

/**
 * Words for a parameter's unit, e.g. trait^2 per Myr: "(trait units)² per
 * Myr", or with a trait unit "mm² per Myr"; a trait on the natural-log scale
 * is "ln units" (or "ln mm", see {@link traitUnitLabel}).
 *
 * @example
 * unitLabel({ trait: 1, time: -1 }, 'Myr', 'mm'); // "mm per Myr"
 */
export function unitLabel(unit: UnitPowers, timeLabel: string, traitLabel = 'trait units'): string {
  const trait = unit.trait === 0 ? '' : unit.trait === 1 ? traitLabel : squaredLabel(traitLabel);
  if (unit.time === 0) return trait;
  // A rate of a rate (the acceleration of a trend, time^-2) is per time squared.
  const time = unit.time === -1 ? `per ${timeLabel}` : unit.time === -2 ? `per ${squaredLabel(timeLabel)}` : `${timeLabel}`;
  return trait === '' ? time : `${trait} ${time}`;
}

/**
 * A unit label squared: a plain word gets a superscript ("mm" → "mm²"), any
 * other label is bracketed first so the square covers all of it ("ln mm" →
 * "(ln mm)²", "µm²" → "(µm²)²", "trait units" → "(trait units)²").
 *
 * @example
 * squaredLabel('mm'); // "mm²"
 */
export function squaredLabel(label: string): string {
  return /^\p{L}+$/u.test(label) ? `${label}²` : `(${label})²`;
}

/**
 * The label of trait quantities of a lineage: the `--trait-unit` label as
 * given, prefixed "ln " when the trait was log-transformed (a mean of ln
 * values measured in mm is in "ln mm"); `fallback` when no unit was given,
 * so output without the option keeps its wording. The unit is a label only:
 * nothing is converted.
 *
 * @param traitUnit - the unit given with `--trait-unit`, or null/undefined when none was
 * @param logTransformed - true with `--log`
 * @param fallback - the wording used when no unit was given (e.g. "trait units")
 * @example
 * traitUnitLabel('mm', true, 'ln units'); // "ln mm"
 * traitUnitLabel(null, true, 'ln units'); // "ln units"
 */
export function traitUnitLabel(traitUnit: string | null | undefined, logTransformed: boolean, fallback: string): string {
  if (traitUnit === null || traitUnit === undefined) return fallback;
  return logTransformed ? `ln ${traitUnit}` : traitUnit;
}

/**
 * A number in a table: 4 significant digits, exponent form for very large or small values.
 *
 * @example
 * formatNumber(0.0123456); // '0.01235'
 * formatNumber(2.5e-4); // '2.500e-4'
 * formatNumber(null); // '—'
 */
export function formatNumber(value: number | null, digits = 4): string {
  if (value === null || !Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e6 || magnitude < 1e-3) return value.toExponential(digits - 1);
  return Number(value.toPrecision(digits)).toString();
}

/**
 * A number with fixed decimals (logL, AICc), or "—".
 *
 * @example
 * formatFixed(-3.75681, 3); // '-3.757'
 * formatFixed(Number.NaN, 3); // '—'
 */
export function formatFixed(value: number | null, decimals: number): string {
  if (value === null || !Number.isFinite(value)) return '—';
  return value.toFixed(decimals);
}
