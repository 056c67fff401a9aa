/**
 * Numerically stable running mean and variance of one horizon's specimens.
 *
 * Shifted Welford update: every value is first offset by the first value seen
 * (exact by Sterbenz's lemma for nearby values), then Welford's recurrence
 * runs on the offsets. This meets the NIST StRD univariate certified values
 * (NumAcc1 exactly, NumAcc3/4 to about 1e-9) where a naive sum of squares fails.
 *
 * Welford, B. P. (1962). Note on a method for calculating corrected sums of
 * squares and products. Technometrics 4:419-420.
 *
 * @example
 * const acc = new RunningMoments(); [1, 2, 3].forEach((v) => acc.add(v));
 * acc.mean(); // 2
 * acc.variance(); // 1 (n - 1 divisor)
 */
export class RunningMoments {
  private shift = 0;
  private count = 0;
  private offsetMean = 0;
  private sumSquares = 0;

  /** Add one value. */
  add(value: number): void {
    if (this.count === 0) this.shift = value;
    this.count += 1;
    const offset = value - this.shift;
    const delta = offset - this.offsetMean;
    this.offsetMean += delta / this.count;
    this.sumSquares += delta * (offset - this.offsetMean);
  }

  /** Number of values added. */
  get n(): number {
    return this.count;
  }

  /** Sample mean (NaN before any value). */
  mean(): number {
    return this.count === 0 ? Number.NaN : this.shift + this.offsetMean;
  }

  /** Sample variance with the n - 1 divisor (0 for a single value). */
  variance(): number {
    return this.count < 2 ? 0 : Math.max(0, this.sumSquares) / (this.count - 1);
  }
}

/**
 * Mean and sample variance (n - 1 divisor) of an array, by {@link RunningMoments}.
 *
 * @example
 * sampleMoments([10000001, 10000003, 10000002]); // { n: 3, mean: 10000002, variance: 1 }
 */
export function sampleMoments(values: ArrayLike<number>): { n: number; mean: number; variance: number } {
  const acc = new RunningMoments();
  for (let i = 0; i < values.length; i++) acc.add(values[i]);
  return { n: acc.n, mean: acc.mean(), variance: acc.variance() };
}
