// Where a seeded simulation measured a promise not kept, the words the
// output prints beside the numbers. The figures are copied from README.md
// ("Measured coverage of the joint intervals", bench/joint-coverage.ts;
// "Measured size and power of the `--models` tests",
// bench/nested-test-calibration.ts); test/render/measured-cautions.test.ts
// checks them against those tables, so a new bench run updates both.

/** Measured coverage of nominal 95% joint profile intervals, per correlated walk model. */
const jointCoverage: Readonly<Record<string, { readonly others: string; readonly what: string; readonly correlation: string }>> = {
  'correlated-random-walk': { others: '85–92%', what: 'ancestral means, step variances', correlation: '81–84%' },
  'correlated-directional-walk': { others: '79–91%', what: 'ancestral means, drifts, step variances', correlation: '60–71%' },
};

/** README section a joint coverage note points to. */
export const jointCoverageSection = 'README.md, "Measured coverage of the joint intervals"';

/** README section a bootstrap size note points to. */
export const nestedSizeSection = 'README.md, "Measured size and power of the `--models` tests"';

/**
 * The note beside the 95% profile intervals of a joint model whose measured
 * coverage falls short (the correlated random and directional walks), or
 * null for a model that keeps it or was not measured. `atBoundary`: the
 * fitted step covariance sits on the boundary of positive semi-definite
 * matrices (the fit's "Cholesky diagonal … at 0" flag), where the measured
 * shortfall was worst.
 *
 * @example
 * jointCoverageNote('correlated-stasis', false); // null
 * jointCoverageNote('correlated-random-walk', false)?.startsWith('correlated-random-walk: nominal 95% intervals covered the truth in 85–92%'); // true
 */
export function jointCoverageNote(modelId: string, atBoundary: boolean): string | null {
  const measured = jointCoverage[modelId];
  if (!measured) return null;
  const base = `${modelId}: nominal 95% intervals covered the truth in ${measured.others} (${measured.what}) and those of the evolutionary correlation in only ${measured.correlation}, in seeded simulations of 2-trait groups on 20 and 30 horizons (${jointCoverageSection})`;
  return atBoundary
    ? `${base}; this fit's step covariance is at the boundary (singular: for two traits a correlation of ±1; the flag "Cholesky diagonal … at 0"), where the measured shortfall was worst: its correlation interval is too short and may well leave out the true value — do not read it as 95%`
    : `${base}: read them as narrower than 95%`;
}

/**
 * Whether a joint model's flags say its step covariance is at the boundary
 * of positive semi-definite matrices (the flag src/joint/fit-joint.ts writes).
 *
 * @example
 * stepCovarianceAtBoundary(['step_covariance: at the boundary of positive semi-definite matrices (Cholesky diagonal 2 at 0): a combination of the traits does not change beyond what earlier traits explain']); // true
 * stepCovarianceAtBoundary(['stasis_covariance: at the boundary of positive semi-definite matrices (Cholesky diagonal 2 at 0): …', 'step_covariance[1][1] at the bound 0']); // false
 */
export function stepCovarianceAtBoundary(flags: readonly string[]): boolean {
  return flags.some((flag) => flag.startsWith('step_covariance: at the boundary'));
}

/** Measured rejection rates at 5% of the `bootstrap --models` tests that do not keep their size on short lineages. */
const nestedSize: Readonly<Record<string, { readonly size: string; readonly below: number }>> = {
  'moving-optimum': { size: '12.5% of lineages of 15 horizons and 10.5% of 25 (5.0% of 50)', below: 50 },
  // Worse with more horizons (more shift positions searched) and not measured beyond 25: said on every lineage.
  'optimum-shift': { size: '10.5% of lineages of 15 horizons and 19.0% of 25 (not measured on more)', below: Number.POSITIVE_INFINITY },
};

/**
 * The note beside the bootstrap p of a `--models` test whose measured size
 * exceeds 5% on a lineage of `horizons` horizons (moving-optimum below 50
 * horizons; optimum-shift on any length, since its size grew from 15 to 25
 * horizons and was not measured beyond), or null.
 *
 * @example
 * nestedSizeNote('accelerating-walk', 15); // null
 * nestedSizeNote('moving-optimum', 50); // null
 * nestedSizeNote('optimum-shift', 80)?.startsWith('optimum-shift vs ou, any lineage: in seeded simulations under a true ou the bootstrap p rejected at 5% in 10.5%'); // true
 * nestedSizeNote('moving-optimum', 24)?.startsWith('moving-optimum vs ou, lineages of fewer than 50 horizons: in seeded simulations under a true ou the bootstrap p rejected at 5% in 12.5% of lineages of 15 horizons'); // true
 */
export function nestedSizeNote(modelId: string, horizons: number): string | null {
  const measured = nestedSize[modelId];
  if (!measured || horizons >= measured.below) return null;
  const which = Number.isFinite(measured.below) ? `lineages of fewer than ${measured.below} horizons` : 'any lineage';
  return `${modelId} vs ou, ${which}: in seeded simulations under a true ou the bootstrap p rejected at 5% in ${measured.size}, not 5%; a p just below 0.05 is weaker evidence than it looks (${nestedSizeSection})`;
}

/**
 * What was measured of the chi-square(1) p of a `--models` test that must
 * not be read (optimum-shift: 51% false rejections at 5%), or null.
 *
 * @example
 * nestedChiSquareNote('moving-optimum'); // null
 * nestedChiSquareNote('optimum-shift')?.startsWith('not valid: under a true ou on 15 horizons it rejected at 5% in 51%'); // true
 */
export function nestedChiSquareNote(modelId: string): string | null {
  if (modelId !== 'optimum-shift') return null;
  return `not valid: under a true ou on 15 horizons it rejected at 5% in 51% of seeded simulated lineages, on 25 in 77% (the shift position is searched, Davies 1987); do not read the chi-square(1) p of optimum-shift (${nestedSizeSection})`;
}
