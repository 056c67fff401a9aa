import { WarningLog } from '../data/warnings.js';
import { fitLineage } from '../fit/fit-lineage.js';
import { lineageName } from '../lineage.js';
import { classicModels } from '../models/registry.js';
import { formatNumber } from '../render/units.js';
import { bootstrapTests, type BootstrapTestReport } from '../simulate/bootstrap-test.js';
import { poolRunner } from '../simulate/run-replicates.js';
import { lineagesWithAgeModel, type AgeModelOptions } from '../analyses/age-model-options.js';
import { loadSamplesStreamed, type SampleFileOptions } from '../analyses/input.js';
import { seedOption, wholeOption } from './power-command.js';
import { readingProgress, stageProgress } from '../io/progress.js';
import { toolVersion } from '../io/version.js';

/** Options of `stratotrend bootstrap`. */
export interface BootstrapCommandOptions extends SampleFileOptions, AgeModelOptions {
  replicates?: string;
  seed?: string;
  threads?: string;
  json?: boolean;
  quiet?: boolean;
}

const caution =
  'A bootstrap p-value is exact only for the fitted null model taken as true; model support also depends on sampling, time-averaging and the age model, and a good fit to a random walk says nothing by itself about drift versus selection. Weigh it with the specialist’s judgement.';

/** One lineage's tests as text. */
export function bootstrapTable(name: string, report: BootstrapTestReport): string {
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
  return lines.join('\n');
}

/** `stratotrend bootstrap FILE`: parametric-bootstrap tests for every lineage. */
export async function bootstrapCommand(file: string, options: BootstrapCommandOptions): Promise<void> {
  // Streamed: a specimen file of millions of rows is read in bounded memory.
  const warnings = new WarningLog();
  const { input, samples } = await loadSamplesStreamed(file, options, readingProgress(file, options));
  // Heights and depths become ages through the same age-model options as fit.
  const { lineages } = lineagesWithAgeModel(file, samples, options, warnings);
  for (const warning of warnings.list()) if (warning.category === 'time-axis' || warning.category === 'input') process.stderr.write(`warning (${warning.category}): ${warning.message}\n`);
  const replicates = wholeOption(options.replicates, '--replicates', 200, 19, 100000);
  const seed = seedOption(options.seed);
  const threads = options.threads === undefined ? undefined : wholeOption(options.threads, '--threads', 1, 1, 256);
  const runner = poolRunner({ threads });
  const reporter = stageProgress(options.quiet);
  const results: { name: string; report: BootstrapTestReport }[] = [];
  try {
    for (const lineage of lineages) {
      const fit = fitLineage(lineage, classicModels, { intervals: false });
      const stage = reporter.progress ? (label: string, total: number) => reporter.progress!.stage(`${lineageName(lineage)}: ${label}`.slice(0, 40), total) : undefined;
      results.push({ name: lineageName(lineage), report: await bootstrapTests(fit, replicates, seed, runner, stage) });
    }
  } finally {
    reporter.stop();
  }
  if (options.json) {
    const document = {
      tool: 'stratotrend',
      version: toolVersion(),
      command: 'bootstrap',
      input: { file: input.name, sha256: input.sha256 },
      lineages: results.map(({ name, report }) => ({ lineage: name, ...report })),
      caution,
    };
    process.stdout.write(JSON.stringify(document, null, 2) + '\n');
  } else if (!options.quiet) {
    process.stdout.write(results.map(({ name, report }) => bootstrapTable(name, report)).join('\n\n') + '\n\n' + caution + '\n');
  }
}
