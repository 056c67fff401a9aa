import type { UnitPowers } from '../models/model.js';

/**
 * Words for a parameter's unit, e.g. trait^2 per Myr: "trait² per Myr"; a
 * trait on the natural-log scale is "ln units".
 *
 * @example
 * unitLabel({ trait: 1, time: -1 }, 'Myr', 'mm'); // "mm per Myr"
 */
export function unitLabel(unit: UnitPowers, timeLabel: string, traitLabel = 'trait units'): string {
  const trait = unit.trait === 0 ? '' : unit.trait === 1 ? traitLabel : `(${traitLabel})²`;
  if (unit.time === 0) return trait;
  const time = unit.time === -1 ? `per ${timeLabel}` : `${timeLabel}`;
  return trait === '' ? time : `${trait} ${time}`;
}

/** A number in a table: 4 significant digits, exponent form for very large or small values. */
export function formatNumber(value: number | null, digits = 4): string {
  if (value === null || !Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e6 || magnitude < 1e-3) return value.toExponential(digits - 1);
  return Number(value.toPrecision(digits)).toString();
}

/** A number with fixed decimals (logL, AICc), or "—". */
export function formatFixed(value: number | null, decimals: number): string {
  if (value === null || !Number.isFinite(value)) return '—';
  return value.toFixed(decimals);
}
