import { caution, runBootstrap, type BootstrapCommandOptions } from '../analyses/bootstrap-run.js';
import { stageProgress } from '../io/progress.js';
import { formatNumber } from '../render/units.js';
import type { BootstrapTestReport, NestingTest } from '../simulate/bootstrap-test.js';
import { nestedChiSquareNote, nestedSizeNote } from '../render/measured-cautions.js';

// `stratotrend bootstrap`: the tests are run by runBootstrap
// (src/analyses/bootstrap-run.ts); this file prints them as text or JSON.

/**
 * One lineage's tests as text; `horizons` (the lineage's) adds the measured
 * size notes of the `--models` tests.
 *
 * @example
 * bootstrapTable('A / length', { nested: null, non_nested: null, replicates: 9, seed: 1 }).split('\n')[0]; // 'Bootstrap tests: "A / length" (9 replicates per null model, seed 1)'
 */
export function bootstrapTable(name: string, report: BootstrapTestReport, horizons?: number): string {
  const lines = [`Bootstrap tests: "${name}" (${report.replicates} replicates per null model, seed ${report.seed})`];
  const nested = report.nested;
  if (nested) {
    lines.push('  directional walk vs random walk (nested, drift = 0 under the null):');
    lines.push(`    likelihood ratio 2 ΔlogL = ${formatNumber(nested.statistic)}; bootstrap p = ${formatNumber(nested.p_bootstrap)}; chi-square(1) p = ${formatNumber(nested.p_chi_square)}`);
    lines.push(`    bootstrap 95% critical value ${formatNumber(nested.critical_value)} (chi-square(1): 3.841)`);
  } else lines.push('  directional walk vs random walk: not tested (a model was not fitted or not compared)');
  const other = report.non_nested;
  if (other) {
    lines.push('  random walk vs stasis (not nested): AICc(stasis) - AICc(random walk)');
    lines.push(`    observed ${formatNumber(other.delta_aicc)} (positive favours the random walk)`);
    const q = (summary: { quantiles: Record<string, number> }): string => `median ${formatNumber(summary.quantiles.q50 ?? null)}, 95% range [${formatNumber(summary.quantiles.q2_5 ?? null)}, ${formatNumber(summary.quantiles.q97_5 ?? null)}]`;
    lines.push(`    under fitted stasis: ${q(other.under_stasis)}; P(at least the observed) = ${formatNumber(other.p_under_stasis)}`);
    lines.push(`    under the fitted random walk: ${q(other.under_random_walk)}; P(at most the observed) = ${formatNumber(other.p_under_random_walk)}`);
  } else lines.push('  random walk vs stasis: not tested (a model was not fitted or not compared)');
  for (const test of report.nested_models ?? []) lines.push(...nestingLines(test, horizons));
  return lines.join('\n');
}

/** The text of one `--models` test: a newer model against the classic model it nests. */
function nestingLines(test: NestingTest, horizons: number | undefined): string[] {
  const heading = `  ${test.full} vs ${test.reduced} (nested, ${test.condition} under the null)`;
  if (test.not_tested !== null) return [`${heading}: not tested (${test.not_tested})`];
  const lines = [`${heading}:`];
  const measured = nestedChiSquareNote(test.full);
  lines.push(`    likelihood ratio 2 ΔlogL = ${formatNumber(test.statistic)}; bootstrap p = ${formatNumber(test.p_bootstrap)}; chi-square(1) p = ${formatNumber(test.p_chi_square)}${measured !== null ? ' (not valid)' : test.chi_square_exact ? '' : ' (for reference only)'}`);
  lines.push(`    bootstrap 95% critical value ${formatNumber(test.critical_value)} (chi-square(1): 3.841)`);
  const size = horizons === undefined ? null : nestedSizeNote(test.full, horizons);
  if (size !== null) lines.push(`    caution: ${size}`);
  if (measured !== null) lines.push(`    chi-square(1) reference ${measured}`);
  else if (test.chi_square_note !== null) lines.push(`    chi-square(1) reference ${test.chi_square_note}`);
  if (test.generator !== test.reduced) lines.push(`    replicates drawn from ${test.generator}: the fitted ${test.reduced} sits at a limit where it equals that model`);
  return lines;
}

/**
 * `stratotrend bootstrap FILE`: parametric-bootstrap tests for every lineage.
 *
 * @example
 * // A real run prints the tests of every lineage (seconds); the file is read first:
 * await bootstrapCommand('no-such.csv', { quiet: true });
 * // throws: no-such.csv: no such file
 */
export async function bootstrapCommand(file: string, options: BootstrapCommandOptions): Promise<void> {
  const onRead = (warnings: readonly { category: string; message: string }[]): void => {
    for (const warning of warnings) process.stderr.write(`warning (${warning.category}): ${warning.message}\n`);
  };
  const reporter = stageProgress(options.quiet);
  let run: Awaited<ReturnType<typeof runBootstrap>>;
  try {
    run = await runBootstrap(file, options, { onRead, progress: reporter.progress });
  } finally {
    reporter.stop();
  }
  if (options.json) {
    process.stdout.write(JSON.stringify(run.document, null, 2) + '\n');
  } else if (!options.quiet) {
    process.stdout.write(run.results.map(({ name, report, horizons }) => bootstrapTable(name, report, horizons)).join('\n\n') + '\n\n' + caution + '\n');
  }
  // Where a simulation measured a test rejecting a true null too often: said once per run, after the tables.
  for (const warning of run.cautions) process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} lineages)` : ''}\n`);
}
