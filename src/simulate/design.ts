import { InputError } from '../data/errors.js';
import { lineageFromArrays, timeUnit, type Lineage } from '../lineage.js';

/**
 * A sampling design as plain data (what worker threads receive): elapsed
 * times, specimens and within-horizon variances per horizon. The sampling
 * variance of a mean is withinVariance / count (MODELS.md).
 */
export interface Design {
  readonly time: readonly number[];
  readonly count: readonly number[];
  readonly withinVariance: readonly number[];
  /** Unit label of the times (e.g. "Myr"). */
  readonly timeUnit: string;
}

/**
 * The design of a lineage read from a file (its means are not used).
 *
 * @example
 * // Sampling variances 0.1 with 5 specimens are within-horizon variances 0.5 (v = e × n).
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.1, 0.2, 0.1], count: [5, 5, 5] });
 * designOf(lineage); // { time: [0, 1, 2], count: [5, 5, 5], withinVariance: [0.5, 1, 0.5], timeUnit: 'Myr' }
 */
export function designOf(lineage: Lineage): Design {
  return {
    time: Array.from(lineage.time),
    count: Array.from(lineage.count),
    withinVariance: Array.from(lineage.withinVariance),
    timeUnit: lineage.timeUnit.label,
  };
}

/**
 * A lineage carrying a design (means 0 until simulated).
 *
 * @example
 * const design = { time: [0, 1, 2], count: [5, 3, 1], withinVariance: [0.5, 1, 0.2], timeUnit: 'Myr' };
 * const lineage = designLineage(design, 'A', 'length');
 * Array.from(lineage.samplingVariance); // [0.1, 0.3333333333333333, 0.2] (v / n)
 * Array.from(lineage.mean); // [0, 0, 0] (until simulated)
 */
export function designLineage(design: Design, section = '', trait = ''): Lineage {
  return lineageFromArrays({
    time: design.time,
    mean: new Float64Array(design.time.length),
    samplingVariance: design.withinVariance.map((variance, i) => variance / design.count[i]),
    count: design.count,
    section,
    trait,
    timeUnit: timeUnit(design.timeUnit),
  });
}

/** Options of {@link designFromOptions}. */
export interface DesignOptions {
  /** Number of horizons (>= 3). */
  readonly horizons: number;
  /** Time between successive horizons (> 0). */
  readonly spacing: number;
  /** Specimens per horizon (>= 2). */
  readonly count: number;
  /** Within-horizon variance of the trait (> 0). */
  readonly withinVariance: number;
  readonly timeUnit?: string;
}

/**
 * An evenly spaced design with the same sample size and within-horizon
 * variance at every horizon.
 *
 * @throws InputError (usage) for a value out of range, naming the option.
 * @example
 * designFromOptions({ horizons: 3, spacing: 0.5, count: 10, withinVariance: 0.04 }).time; // [0, 0.5, 1]
 */
export function designFromOptions(options: DesignOptions): Design {
  const { horizons, spacing, count, withinVariance } = options;
  if (!Number.isInteger(horizons) || horizons < 3) throw new InputError(`--horizons must be a whole number of at least 3, got "${horizons}"`, { kind: 'usage' });
  if (!(spacing > 0) || !Number.isFinite(spacing)) throw new InputError(`--spacing must be a positive number, got "${spacing}"`, { kind: 'usage' });
  if (!Number.isInteger(count) || count < 2) throw new InputError(`--n must be a whole number of at least 2, got "${count}"`, { kind: 'usage' });
  if (!(withinVariance > 0) || !Number.isFinite(withinVariance)) throw new InputError(`--within-variance must be a positive number, got "${withinVariance}"`, { kind: 'usage' });
  return {
    time: Array.from({ length: horizons }, (_, i) => i * spacing),
    count: new Array<number>(horizons).fill(count),
    withinVariance: new Array<number>(horizons).fill(withinVariance),
    timeUnit: options.timeUnit ?? 'Myr',
  };
}

/**
 * The design continued to `horizons` horizons "at the same spacing and
 * sample sizes": new horizons follow the last one, cycling through the
 * file's own intervals, sample sizes and within-horizon variances in order.
 * A shorter request truncates the design.
 *
 * @example
 * extendDesign({ time: [0, 1, 3], count: [5, 6, 7], withinVariance: [1, 1, 2], timeUnit: 'Myr' }, 5).time; // [0, 1, 3, 4, 6]
 */
export function extendDesign(design: Design, horizons: number): Design {
  const size = design.time.length;
  if (horizons <= size) {
    return { ...design, time: design.time.slice(0, horizons), count: design.count.slice(0, horizons), withinVariance: design.withinVariance.slice(0, horizons) };
  }
  const time = [...design.time];
  const count = [...design.count];
  const withinVariance = [...design.withinVariance];
  for (let i = size; i < horizons; i++) {
    const cycle = (i - size) % (size - 1);
    time.push(time[i - 1] + (design.time[cycle + 1] - design.time[cycle]));
    count.push(design.count[(i - size) % size]);
    withinVariance.push(design.withinVariance[(i - size) % size]);
  }
  return { ...design, time, count, withinVariance };
}

/**
 * Pooled within-horizon standard deviation of a design: sqrt(sum((n - 1) v) / sum(n - 1)).
 *
 * @example
 * // (4 × 0.5 + 2 × 1 + 0 × 0.2) / (4 + 2 + 0) = 2/3.
 * pooledWithinSd({ time: [0, 1, 2], count: [5, 3, 1], withinVariance: [0.5, 1, 0.2], timeUnit: 'Myr' }); // 0.816496580927726 (to 1e-15; sqrt(2/3))
 */
export function pooledWithinSd(design: Design): number {
  let weighted = 0;
  let degrees = 0;
  for (let i = 0; i < design.time.length; i++) {
    weighted += (design.count[i] - 1) * design.withinVariance[i];
    degrees += design.count[i] - 1;
  }
  return degrees > 0 ? Math.sqrt(weighted / degrees) : Math.sqrt(design.withinVariance.reduce((sum, v) => sum + v, 0) / design.time.length);
}
