/**
 * One warning channel with categories. Repeated warnings of the same category
 * and text are folded into one entry with a count, so a thousand lineages with
 * the same problem print one line.
 */
export type WarningCategory =
  | 'at-bound'
  | 'at-limit'
  | 'interval-fallback'
  | 'weak-identifiability'
  | 'extrapolated-age'
  | 'zero-sampling-variance'
  | 'not-compared'
  | 'not-converged'
  | 'duplicate-time'
  | 'time-axis'
  | 'long-run'
  /** AICc's first place (directional walk, or ou with a long half-life or open optimum) is not backed by the trend test. */
  | 'trend-check'
  /** A seeded simulation measured these intervals covering less than their nominal level (joint correlated walks). */
  | 'interval-coverage'
  /** A seeded simulation measured this test rejecting a true null more often than its nominal level (bootstrap --models). */
  | 'test-size'
  | 'input';

/** A folded warning: what, about which lineage, and how often it was raised. */
export interface Warning {
  readonly category: WarningCategory;
  readonly message: string;
  readonly count: number;
}

/**
 * Collects warnings, folding repeats; order of first occurrence is kept.
 *
 * @example
 * const log = new WarningLog();
 * log.add('duplicate-time', 'A / x: 2 rows at age 3'); log.add('duplicate-time', 'A / x: 2 rows at age 3');
 * log.list(); // [{ category: 'duplicate-time', message: 'A / x: 2 rows at age 3', count: 2 }]
 * log.has('at-bound'); // false
 */
export class WarningLog {
  private readonly entries = new Map<string, { category: WarningCategory; message: string; count: number }>();

  /** Record one warning. */
  add(category: WarningCategory, message: string): void {
    const key = `${category}\u0000${message}`;
    const entry = this.entries.get(key);
    if (entry) entry.count += 1;
    else this.entries.set(key, { category, message, count: 1 });
  }

  /** Everything recorded so far, repeats folded. */
  list(): Warning[] {
    return [...this.entries.values()].map((entry) => ({ ...entry }));
  }

  /** Whether a warning of this category was raised. */
  has(category: WarningCategory): boolean {
    return [...this.entries.values()].some((entry) => entry.category === category);
  }
}
