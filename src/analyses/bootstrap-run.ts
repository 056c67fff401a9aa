import { WarningLog, type Warning } from '../data/warnings.js';
import { fitLineage } from '../fit/fit-lineage.js';
import { lineageName } from '../lineage.js';
import { usageError } from '../data/errors.js';
import { extensionSettings } from './fit-extensions.js';
import type { EvolutionModel } from '../models/model.js';
import { allModels, classicModels, findModel } from '../models/registry.js';
import { bootstrapTests, type BootstrapTestReport } from '../simulate/bootstrap-test.js';
import { poolRunner } from '../simulate/run-replicates.js';
import { lineagesWithAgeModel, type AgeModelOptions } from './age-model-options.js';
import { loadSamplesStreamed, type SampleFileOptions } from './input.js';
import { seedOption, wholeOption } from './option-values.js';
import { readingProgress } from '../io/progress.js';
import type { StageProgress } from '../io/progress.js';
import { toolVersion } from '../io/version.js';
import { nestedChiSquareNote, nestedSizeNote } from '../render/measured-cautions.js';

/** Options of `stratotrend bootstrap`. */
export interface BootstrapCommandOptions extends SampleFileOptions, AgeModelOptions {
  replicates?: string;
  seed?: string;
  threads?: string;
  /** Comma-separated ids of newer models, each tested against the classic model it nests. */
  models?: string;
  /** Fewest horizons per segment of a shift model among `models` (as `fit --min-segment`). */
  minSegment?: string;
  json?: boolean;
  quiet?: boolean;
}

export const caution =
  'A bootstrap p-value is exact only for the fitted null model taken as true; model support also depends on sampling, time-averaging and the age model, and a good fit to a random walk says nothing by itself about drift versus selection. Weigh it with the specialist’s judgement.';

/**
 * The models of `--models`: ids, comma-separated, each of a model that
 * declares the classic model it nests (`EvolutionModel.nests`); repeated
 * ids count once. Undefined gives none (the default two tests only).
 *
 * @throws InputError (usage) for an empty list, an unknown id or a model that nests none
 * @example
 * nestingModels('optimum-shift,accelerating-walk').map((model) => model.id); // ['optimum-shift', 'accelerating-walk']
 */
export function nestingModels(text: string | undefined): EvolutionModel[] {
  if (text === undefined) return [];
  const testable = allModels().filter((model) => model.nests !== undefined).map((model) => model.id).join(', ');
  const ids = [...new Set(text.split(',').map((id) => id.trim()).filter((id) => id !== ''))];
  if (ids.length === 0) throw usageError(`--models: expected model ids separated by commas (${testable}), got "${text}"`);
  return ids.map((id) => {
    const model = findModel(id);
    if (!model) throw usageError(`--models: unknown model "${id}"; bootstrap tests these against the model they nest: ${testable}`);
    if (!model.nests) throw usageError(`--models: model "${id}" declares no classic model it nests, so bootstrap has no likelihood-ratio test for it; give one or more of ${testable} (directional-walk vs random-walk is always tested)`);
    return model;
  });
}

/** What {@link runBootstrap} computed: each lineage's tests and the JSON document. */
export interface BootstrapRun {
  readonly results: readonly { readonly name: string; readonly report: BootstrapTestReport; readonly horizons: number }[];
  readonly document: Record<string, unknown>;
  /** Where a seeded simulation measured a `--models` test rejecting a true null too often (category `test-size`), folded. */
  readonly cautions: readonly Warning[];
}

/**
 * Parametric-bootstrap tests for every lineage of FILE: read (streamed),
 * place the horizons with the age-model options, fit the classic models
 * (and the `--models` ones), and run the tests on the worker pool: the two
 * fixed tests, then each `--models` model against the model it nests.
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
  const nesting = nestingModels(options.models);
  // Validated as fit validates it, so the observed statistic is the one `fit --min-segment` gives.
  const minimumSegment = extensionSettings({ minSegment: options.minSegment }).minimumSegment;
  const replicates = wholeOption(options.replicates, '--replicates', 200, 19, 100000);
  const seed = seedOption(options.seed);
  const threads = options.threads === undefined ? undefined : wholeOption(options.threads, '--threads', 1, 1, 256);
  const runner = poolRunner({ threads });
  const results: { name: string; report: BootstrapTestReport; horizons: number }[] = [];
  for (const lineage of lineages) {
    // The newer models join the classic fit; each model's logL and AICc do not depend on the set, so the default tests are unchanged.
    const fit = fitLineage(lineage, nesting.length > 0 ? [...classicModels, ...nesting] : classicModels, { intervals: false, minimumSegment });
    const progress = hooks.progress;
    const stage = progress ? (label: string, total: number) => progress.stage(`${lineageName(lineage)}: ${label}`.slice(0, 40), total) : undefined;
    results.push({ name: lineageName(lineage), horizons: lineage.time.length, report: await bootstrapTests(fit, replicates, seed, runner, stage, { nesting: nesting.map((model) => model.id), minimumSegment }) });
  }
  for (const { report, horizons } of results) {
    for (const test of report.nested_models ?? []) {
      const notes = measuredNotes(test, horizons);
      if (notes.size_note !== null) warnings.add('test-size', notes.size_note);
      if (notes.chi_square_measured !== null) warnings.add('test-size', `optimum-shift vs ou, chi-square(1) p ${notes.chi_square_measured}`);
    }
  }
  const document = {
    tool: 'stratotrend',
    version: toolVersion(),
    command: 'bootstrap',
    input: { file: input.name, sha256: input.sha256 },
    lineages: results.map(({ name, report, horizons }) => ({
      lineage: name,
      ...report,
      // The measured notes sit beside the p-values they qualify (nested_models keeps its place).
      ...(report.nested_models ? { nested_models: report.nested_models.map((test) => ({ ...test, ...measuredNotes(test, horizons) })) } : {}),
    })),
    caution,
    // Every warning of the run (reading, time axis, and the measured test sizes), as fit --json lists them.
    warnings: warnings.list(),
  };
  return { results, document, cautions: warnings.list().filter((warning) => warning.category === 'test-size') };
}

/**
 * The measured notes of one `--models` test on a lineage of `horizons`
 * horizons: `size_note` beside the bootstrap p (moving-optimum under 50
 * horizons, optimum-shift on any length) and `chi_square_measured` beside the
 * chi-square(1) p (optimum-shift); null where nothing was measured amiss or
 * the test did not run.
 *
 * @example
 * measuredNotes({ full: 'accelerating-walk', not_tested: null }, 15); // { size_note: null, chi_square_measured: null }
 * measuredNotes({ full: 'moving-optimum', not_tested: null }, 15).size_note?.includes('12.5% of lineages of 15 horizons'); // true
 */
export function measuredNotes(test: { readonly full: string; readonly not_tested: string | null }, horizons: number): { size_note: string | null; chi_square_measured: string | null } {
  if (test.not_tested !== null) return { size_note: null, chi_square_measured: null };
  return { size_note: nestedSizeNote(test.full, horizons), chi_square_measured: nestedChiSquareNote(test.full) };
}
