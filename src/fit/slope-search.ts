import { findRoot } from './optimise.js';

/** A function's value and slope at one abscissa. */
export interface ValueSlope {
  readonly value: number;
  readonly slope: number;
}

/** A maximum located by {@link slopeMaximize} or {@link warmSlopeSearch}. */
export interface SlopeMaximum {
  readonly at: number;
  readonly value: number;
}

/** Remember every evaluation of one search (Brent's root finder asks for its bracket ends again). */
function remembered(f: (x: number) => ValueSlope): (x: number) => ValueSlope {
  const seen = new Map<number, ValueSlope>();
  return (x) => {
    let found = seen.get(x);
    if (found === undefined) {
      found = f(x);
      seen.set(x, found);
    }
    return found;
  };
}

/**
 * Maximise a smooth function of one variable within the cell [left, right]
 * around `centre` (a local maximum of a grid whose neighbours are `left` and
 * `right`) from its slope: the slope at `centre` says on which side the
 * maximum lies, and Brent's root finder locates the zero of the slope
 * between `centre` and that side's end, to relative tolerance `tolerance`
 * in x. A smooth function rising from one end of a bracket and falling at
 * the other has its maximum where the slope changes sign, so this finds
 * what a value-only search (Brent's minimiser) finds in the same cell with
 * fewer evaluations: superlinear convergence on the slope instead of
 * golden sections and parabolas on values (Brent 1973, ch. 4 and 5; from
 * memory).
 *
 * Returns null when the slope is not finite at a point asked, or does not
 * change sign between `centre` and the uphill end while that end is inside
 * the range (a shape the grid did not resolve): the caller then falls back
 * to its value-only search. When the slope at `centre` points out of the
 * range at a range end (`left` or `right` equal to `centre`), that end is
 * the maximum.
 *
 * Brent, R. P. (1973). Algorithms for Minimization without Derivatives. Prentice-Hall.
 *
 * @param f value and slope at x
 * @example
 * slopeMaximize((x) => ({ value: -((x - 2) ** 2), slope: -2 * (x - 2) }), 1.5, 1, 3, 1e-12)?.at; // 2 (to 1e-12)
 */
export function slopeMaximize(f: (x: number) => ValueSlope, centre: number, left: number, right: number, tolerance: number): SlopeMaximum | null {
  const at = remembered(f);
  const middle = at(centre);
  if (!Number.isFinite(middle.slope) || !Number.isFinite(middle.value)) return null;
  if (middle.slope === 0) return { at: centre, value: middle.value };
  const end = middle.slope > 0 ? right : left;
  if (end === centre) return { at: centre, value: middle.value };
  const far = at(end);
  if (!Number.isFinite(far.slope) || !Number.isFinite(far.value)) return null;
  if (far.slope === 0) return { at: end, value: far.value };
  if (Math.sign(far.slope) === Math.sign(middle.slope)) return null;
  const root = findRoot((x) => at(x).slope, Math.min(centre, end), Math.max(centre, end), tolerance);
  if (!Number.isFinite(root)) return null;
  const found = at(root);
  if (!Number.isFinite(found.value)) return null;
  return { at: root, value: found.value };
}

/**
 * Maximise from a warm start (e.g. the maximum at a neighbouring value of an
 * outer axis) by the slope: steps uphill from `start` by `firstStep`, doubling
 * each time, until the slope changes sign or the range ends, then Brent's root
 * finder on the slope in the last step. Returns null where
 * {@link slopeMaximize} would (the caller falls back to a value-only search).
 *
 * @example
 * warmSlopeSearch((x) => ({ value: -((x - 5) ** 2), slope: -2 * (x - 5) }), 0, -10, 10, 1.5, 1e-12)?.at; // 5 (to 1e-12)
 */
export function warmSlopeSearch(f: (x: number) => ValueSlope, start: number, lower: number, upper: number, firstStep: number, tolerance: number): SlopeMaximum | null {
  const at = remembered(f);
  let from = start;
  let here = at(from);
  if (!Number.isFinite(here.slope) || !Number.isFinite(here.value)) return null;
  let step = firstStep;
  for (let attempt = 0; attempt < 40; attempt++) {
    if (here.slope === 0) return { at: from, value: here.value };
    const direction = here.slope > 0 ? 1 : -1;
    const end = Math.min(upper, Math.max(lower, from + direction * step));
    if (end === from) return { at: from, value: here.value };
    const far = at(end);
    if (!Number.isFinite(far.slope) || !Number.isFinite(far.value)) return null;
    if (far.slope === 0) return { at: end, value: far.value };
    if (Math.sign(far.slope) !== Math.sign(here.slope)) {
      const root = findRoot((x) => at(x).slope, Math.min(from, end), Math.max(from, end), tolerance);
      if (!Number.isFinite(root)) return null;
      const found = at(root);
      return Number.isFinite(found.value) ? { at: root, value: found.value } : null;
    }
    // Still rising: the maximum is further on (or at the range end, reached next time round).
    if (far.value < here.value) return null;
    from = end;
    here = far;
    step *= 2;
  }
  return null;
}
