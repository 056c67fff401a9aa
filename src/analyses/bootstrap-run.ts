import { WarningLog, type Warning } from '../data/warnings.js';
import { fitLineage } from '../fit/fit-lineage.js';
import { lineageName } from '../lineage.js';
import { classicModels } from '../models/registry.js';
import { bootstrapTests, type BootstrapTestReport } from '../simulate/bootstrap-test.js';
import { poolRunner } from '../simulate/run-replicates.js';
import { lineagesWithAgeModel, type AgeModelOptions } from './age-model-options.js';
import { loadSamplesStreamed, type SampleFileOptions } from './input.js';
import { seedOption, wholeOption } from './option-values.js';
import { readingProgress } from '../io/progress.js';
import type { StageProgress } from '../io/progress.js';
import { toolVersion } from '../io/version.js';

/** Options of `stratotrend bootstrap`. */
export interface BootstrapCommandOptions extends SampleFileOptions, AgeModelOptions {
  replicates?: string;
  seed?: string;
  threads?: string;
  json?: boolean;
  quiet?: boolean;
}

export const caution =
  'A bootstrap p-value is exact only for the fitted null model taken as true; model support also depends on sampling, time-averaging and the age model, and a good fit to a random walk says nothing by itself about drift versus selection. Weigh it with the specialist’s judgement.';

/** What {@link runBootstrap} computed: each lineage's tests and the JSON document. */
export interface BootstrapRun {
  readonly results: readonly { readonly name: string; readonly report: BootstrapTestReport }[];
  readonly document: Record<string, unknown>;
}

/**
 * Parametric-bootstrap tests for every lineage of FILE: read (streamed),
 * place the horizons with the age-model options, fit the classic models,
 * and run the tests on the worker pool.
 *
 * @param onRead called with the reading's time-axis and input warnings as soon as the file is read (before the options are checked and the replicates run)
 * @example
 * (await runBootstrap('sample-data/shell-length.csv', { replicates: '19', threads: '1' })).results.length; // 2
 */
export async function runBootstrap(
  file: string,
  options: BootstrapCommandOptions,
  hooks: { onRead?: (warnings: readonly Warning[]) => void; progress?: StageProgress } = {},
): Promise<BootstrapRun> {
  // Streamed: a specimen file of millions of rows is read in bounded memory.
  const warnings = new WarningLog();
  const { input, samples } = await loadSamplesStreamed(file, options, readingProgress(file, options));
  // Heights and depths become ages through the same age-model options as fit.
  const { lineages } = lineagesWithAgeModel(file, samples, options, warnings);
  hooks.onRead?.(warnings.list().filter((warning) => warning.category === 'time-axis' || warning.category === 'input'));
  const replicates = wholeOption(options.replicates, '--replicates', 200, 19, 100000);
  const seed = seedOption(options.seed);
  const threads = options.threads === undefined ? undefined : wholeOption(options.threads, '--threads', 1, 1, 256);
  const runner = poolRunner({ threads });
  const results: { name: string; report: BootstrapTestReport }[] = [];
  for (const lineage of lineages) {
    const fit = fitLineage(lineage, classicModels, { intervals: false });
    const progress = hooks.progress;
    const stage = progress ? (label: string, total: number) => progress.stage(`${lineageName(lineage)}: ${label}`.slice(0, 40), total) : undefined;
    results.push({ name: lineageName(lineage), report: await bootstrapTests(fit, replicates, seed, runner, stage) });
  }
  const document = {
    tool: 'stratotrend',
    version: toolVersion(),
    command: 'bootstrap',
    input: { file: input.name, sha256: input.sha256 },
    lineages: results.map(({ name, report }) => ({ lineage: name, ...report })),
    caution,
  };
  return { results, document };
}
