import { InputError, usageError } from '../data/errors.js';
import { WarningLog, type Warning } from '../data/warnings.js';
import { LikelihoodEvaluator } from '../fit/evaluator.js';
import { fitModel } from '../fit/fit-model.js';
import { defaultIntervalMethod, intervalMethodLabels } from '../fit/intervals.js';
import { lineageName, type Lineage } from '../lineage.js';
import { directionalWalk } from '../models/directional-walk.js';
import { formatNumber, squaredLabel, traitUnitLabel } from '../render/units.js';
import { designOf, pooledWithinSd } from '../simulate/design.js';
import { defaultDrifts, powerAnalysis, type PowerProgress, type PowerReport } from '../simulate/power.js';
import { poolRunner } from '../simulate/run-replicates.js';
import { numberList, numberOption, seedOption, wholeOption } from './option-values.js';
import { lineagesWithAgeModel, type AgeModelOptions } from './age-model-options.js';
import { loadSamplesStreamed, type SampleFileOptions, type StreamedInput } from './input.js';
import { resolveModels } from './model-selection.js';
import { readingProgress } from '../io/progress.js';
import { toolVersion } from '../io/version.js';

/** Options of `stratotrend power`. */
export interface PowerCommandOptions extends SampleFileOptions, AgeModelOptions {
  lineage?: string;
  replicates?: string;
  seed?: string;
  drifts?: string;
  driftsSd?: string;
  stepVariance?: string;
  weightThreshold?: string;
  targetDrift?: string;
  coverage?: boolean;
  threads?: string;
  json?: boolean;
  figure?: string;
  /** Models fitted to every replicate (`--models`, default classic). */
  models?: string;
  /** Joint path: true step correlations between the first two traits of a section, comma-separated. */
  correlations?: string;
  quiet?: boolean;
}

/**
 * Pick the lineage named by --lineage ("section / trait", or a section or trait alone), else the first.
 *
 * @example
 * const lineages = loadLineages(readInput('sample-data/shell-length.csv'), {}, new WarningLog());
 * chooseLineage(lineages, undefined, 'shell-length.csv').note; // 'shell-length.csv has 2 lineages; using the first, "Varnek Draw / shell length" (choose another with --lineage)'
 * chooseLineage(lineages, 'tolloway bluff', 'shell-length.csv').lineage.section; // 'Tolloway Bluff' (a section name alone, any case)
 * chooseLineage(lineages, 'nowhere', 'shell-length.csv');
 * // throws: --lineage: no lineage "nowhere" in shell-length.csv
 */
export function chooseLineage(lineages: readonly Lineage[], request: string | undefined, file: string): { lineage: Lineage; note: string | null } {
  if (request === undefined) {
    const note = lineages.length > 1 ? `${file} has ${lineages.length} lineages; using the first, "${lineageName(lineages[0])}" (choose another with --lineage)` : null;
    return { lineage: lineages[0], note };
  }
  const wanted = request.trim().toLowerCase();
  const found = lineages.find((lineage) => [lineageName(lineage), lineage.section, lineage.trait].some((name) => name.toLowerCase() === wanted));
  if (!found) throw usageError(`--lineage: no lineage "${request}" in ${file}; lineages: ${lineages.map((lineage) => `"${lineageName(lineage)}"`).join(', ')}`);
  return { lineage: found, note: null };
}


/**
 * The lineage's trait unit as power prints it ("mm"; "ln mm" with --log), or null without --trait-unit.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 2], samplingVariance: [0.1, 0.1], traitUnit: 'mm' });
 * traitUnitOf({ ...lineage, logTransformed: true }); // 'ln mm'
 * traitUnitOf({ ...lineage, traitUnit: null }); // null
 */
export function traitUnitOf(lineage: Lineage): string | null {
  return lineage.traitUnit ? traitUnitLabel(lineage.traitUnit, lineage.logTransformed, '') : null;
}

/** Everything `power` computed, before printing. */
export interface PowerRun {
  readonly lineage: Lineage;
  /** The primary analysis: the largest assumed step variance (the top level of the JSON). */
  readonly report: PowerReport;
  /** One analysis per assumed step variance, in increasing order of step variance. */
  readonly assumptions: readonly PowerAssumption[];
  readonly document: Record<string, unknown>;
  readonly notes: string[];
  /** Warnings of reading the samples and placing them in time (printed on stderr, and in the document). */
  readonly warnings: readonly Warning[];
}

/** One assumed step variance, why it was assumed, and the power analysis under it. */
export interface PowerAssumption {
  readonly stepVariance: number;
  /** "fitted estimate", "upper end of its 95% interval" or "given". */
  readonly source: string;
  /** Standard error of the drift estimate on this design under this step variance. */
  readonly driftStandardError: number;
  readonly report: PowerReport;
}

/**
 * The fitted step variance is poorly determined when the upper end of its
 * 95% interval is at least this many times the estimate (or the estimate is 0):
 * the data then allow much larger step variances, and power simulated at the
 * estimate alone is too optimistic. Our rule, not a published one.
 */
export const poorlyDeterminedRatio = 4;

/**
 * The step variances to simulate with: the given list; else the fitted
 * estimate, plus the upper end of its 95% interval (the project's default
 * interval method) when the estimate is 0 or poorly determined.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.1, 0.1, 0.1] });
 * assumedStepVariances(lineage, 0.1, [0.2, 0.05, 0.2], []); // [{ stepVariance: 0.05, source: 'given' }, { stepVariance: 0.2, source: 'given' }] (given: sorted, repeats dropped)
 */
export function assumedStepVariances(lineage: Lineage, estimate: number, given: readonly number[] | undefined, notes: string[]): { stepVariance: number; source: string }[] {
  if (given) return [...new Set(given)].sort((a, b) => a - b).map((stepVariance) => ({ stepVariance, source: 'given' }));
  const withInterval = fitModel(directionalWalk, lineage, { intervals: true, intervalMethod: defaultIntervalMethod });
  const upper = withInterval.converged ? withInterval.parameters.step_variance?.upper ?? null : null;
  const poorly = estimate === 0 || (upper !== null && upper >= poorlyDeterminedRatio * estimate);
  if (!poorly) return [{ stepVariance: estimate, source: 'fitted estimate' }];
  if (upper === null || !(upper > estimate)) {
    notes.push(`the fitted step variance ${formatNumber(estimate)} is poorly determined and the upper end of its 95% interval is open: power is simulated at the estimate only and may be too optimistic; give --step-variance to assume larger values`);
    return [{ stepVariance: estimate, source: 'fitted estimate' }];
  }
  return [
    { stepVariance: estimate, source: 'fitted estimate' },
    { stepVariance: upper, source: `upper end of its 95% interval (${intervalMethodLabels[defaultIntervalMethod]})` },
  ];
}

/**
 * Short words for an assumption's source: "fitted estimate", "upper end of its 95% interval" or "given".
 *
 * @example
 * sourceWords('upper end of its 95% interval (restricted profile likelihood)'); // 'upper end of its 95% interval'
 * sourceWords('given'); // 'given'
 */
export function sourceWords(source: string): string {
  return source.startsWith('upper end') ? 'upper end of its 95% interval' : source;
}

/**
 * Read the file, fit the directional walk, and run the power analysis on the
 * chosen lineage's design, once per assumed step variance (see
 * {@link assumedStepVariances}); the JSON's top level is the analysis at the
 * largest one (the cautious reading) and `assumptions` lists them all.
 *
 * @param read the samples file already read (the report's fit read it), so it is not read again
 *
 * @example
 * // A real run is in powerTable's example; the replicates are checked before the file is read.
 * await runPower('sample-data/shell-length.csv', { replicates: '9' });
 * // throws: --replicates must be a whole number from 20 to 100000, got "9"
 */
export async function runPower(file: string, options: PowerCommandOptions, progress?: PowerProgress, read?: StreamedInput): Promise<PowerRun> {
  const warnings = new WarningLog();
  // Streamed: a specimen file of millions of rows is read in bounded memory (or already read, by the report's fit).
  const { input, samples } = read ?? (await loadSamplesStreamed(file, options, readingProgress(file, options)));
  // Heights and depths become ages through the same age-model options as fit (--age-model, --extrapolate).
  const { lineages } = lineagesWithAgeModel(file, samples, options, warnings);
  const { lineage, note } = chooseLineage(lineages, options.lineage, input.name);
  const notes: string[] = note ? [note] : [];
  const replicates = wholeOption(options.replicates, '--replicates', 200, 20, 100000);
  const seed = seedOption(options.seed);
  const threads = options.threads === undefined ? undefined : wholeOption(options.threads, '--threads', 1, 1, 256);
  const threshold = numberOption(options.weightThreshold, '--weight-threshold') ?? 0.5;
  const models = options.models === undefined ? undefined : resolveModels(options.models).models.map((model) => model.id);
  if (models && !(models.includes('random-walk') && models.includes('directional-walk'))) {
    throw usageError(`--models must include random-walk and directional-walk (the trend is judged between them), got "${options.models}"`);
  }
  if (!(threshold > 0 && threshold < 1)) throw usageError(`--weight-threshold must lie between 0 and 1, got "${options.weightThreshold}"`);
  const given = numberList(options.stepVariance, '--step-variance');
  if (given?.some((value) => !(value >= 0))) throw usageError(`--step-variance values must be 0 or more, got "${options.stepVariance}"`);
  const fit = fitModel(directionalWalk, lineage, { intervals: false });
  // The data, not the options, are at fault here: a data error (exit 1).
  if (!fit.converged) throw new InputError(`the directional walk could not be fitted to "${lineageName(lineage)}": ${fit.message}`, { file: input.name });
  const chosen = assumedStepVariances(lineage, fit.estimates.step_variance, given, notes);
  if (given === undefined && chosen.length > 1) {
    notes.push(`the fitted step variance ${formatNumber(chosen[0].stepVariance)} is ${chosen[0].stepVariance === 0 ? 'at its bound 0' : 'poorly determined'}: power is shown under it and under ${formatNumber(chosen[1].stepVariance)}, the upper end of its 95% interval, which the data also allow; the larger gives the cautious reading`);
  }
  const design = designOf(lineage);
  const withinSd = pooledWithinSd(design);
  const evaluator = new LikelihoodEvaluator(directionalWalk, lineage);
  const driftErrorAt = (stepVariance: number): number => Math.sqrt(evaluator.details(directionalWalk.processFrom({ step_variance: stepVariance }, lineage)).coefficientCovariance[3]);
  const perUnit = numberList(options.drifts, '--drifts');
  const perSd = numberList(options.driftsSd, '--drifts-sd');
  if (perUnit && perSd) throw usageError('give --drifts or --drifts-sd, not both');
  // One drift grid for every assumption (so the curves share an axis): 0 to 5 standard errors at the largest step variance.
  const largest = chosen[chosen.length - 1].stepVariance;
  const drifts = perUnit ?? perSd?.map((value) => value * withinSd) ?? defaultDrifts(driftErrorAt(largest));
  const targetDrift = numberOption(options.targetDrift, '--target-drift') ?? null;
  const runner = poolRunner({ threads });
  const assumptions: PowerAssumption[] = [];
  for (const assumption of chosen) {
    const report = await powerAnalysis(
      {
        design,
        stepVariance: assumption.stepVariance,
        ancestralMean: fit.estimates.ancestral_mean,
        drifts,
        replicates,
        seed,
        weightThreshold: threshold,
        targetDrift,
        coverage: options.coverage !== false,
        fittedDrift: fit.estimates.drift,
        ...(models ? { models } : {}),
      },
      runner,
      progress,
    );
    assumptions.push({ ...assumption, driftStandardError: driftErrorAt(assumption.stepVariance), report });
  }
  const primary = assumptions[assumptions.length - 1];
  // (Not again when the open upper end was the reason: that note already says so.)
  if (given === undefined && primary.stepVariance === 0 && !notes.some((text) => text.includes('95% interval is open'))) {
    notes.push('the fitted step variance is 0 (at its bound) and no larger value could be assumed from its interval: replicates have no random-walk component, only sampling error; give --step-variance to assume one');
  }
  for (const other of assumptions.slice(0, -1)) {
    notes.push(
      `under step variance ${formatNumber(other.stepVariance)} (${sourceWords(other.source)}) the false-trend rate is ${other.report.false_trend.p_best.toFixed(3)} (AICc best) and ${other.report.false_trend.p_lrt.toFixed(3)} (test), ` +
        `and 80% test power is reached at drift ${other.report.smallest_drift.p_lrt === null ? 'beyond the grid' : formatNumber(other.report.smallest_drift.p_lrt)}; under ${formatNumber(primary.stepVariance)} (${sourceWords(primary.source)}) at ${primary.report.smallest_drift.p_lrt === null ? 'beyond the grid' : formatNumber(primary.report.smallest_drift.p_lrt)}`,
    );
  }
  const document = {
    tool: 'stratotrend',
    version: toolVersion(),
    command: 'power',
    // trait_unit and transform as in fit.json: the --trait-unit label as given (null when none), 'ln' with --log (values in ln mm).
    input: { file: input.name, sha256: input.sha256, lineage: lineageName(lineage), trait_unit: lineage.traitUnit ?? null, transform: lineage.logTransformed ? 'ln' : 'none' },
    generator: {
      model: 'directional-walk',
      step_variance: primary.stepVariance,
      step_variance_source: given === undefined ? (primary.source === 'fitted estimate' ? 'fitted' : 'upper end of the 95% interval') : 'given',
      fitted_step_variance: fit.estimates.step_variance,
      ancestral_mean: fit.estimates.ancestral_mean,
      fitted_drift: fit.estimates.drift,
      drift_standard_error: primary.driftStandardError,
    },
    ...primary.report,
    // Every assumed step variance with its own analysis (the top level repeats the last, the largest).
    assumptions: assumptions.map((entry) => ({ step_variance: entry.stepVariance, source: entry.source, drift_standard_error: entry.driftStandardError, ...entry.report })),
    notes,
    // Warnings of reading and placing the samples (e.g. time-axis plausibility), as in fit.json.
    warnings: warnings.list().map((warning) => ({ category: warning.category, message: warning.message, count: warning.count })),
    caution: caution,
  };
  return { lineage, report: primary.report, assumptions, document, notes, warnings: warnings.list() };
}

const caution =
  'Power and false-trend rates hold for the assumed step variance and for this design taken at face value. Model support also depends on sampling, time-averaging and the age model, and a good fit to a random walk says nothing by itself about drift versus selection: weigh these numbers with the specialist’s judgement.';

/**
 * The power report as a terminal table: one block per assumed step variance, each naming it.
 *
 * @example
 * const run = await runPower('sample-data/shell-length.csv', { replicates: '20', drifts: '0', stepVariance: '0.05', threads: '1', models: 'random-walk,directional-walk', coverage: false });
 * const lines = powerTable(run).split('\n');
 * lines[0]; // 'Power to detect a directional trend: "Varnek Draw / shell length", 24 horizons over 4.3 Myr'
 * lines[2]; // '  Assumed step variance 0.05 (trait units)² per Myr (given):'
 * run.report.grid[0].replicates; // 20
 */
export function powerTable(run: PowerRun): string {
  const { lineage } = run;
  const unit = lineage.timeUnit.label;
  // Without --trait-unit the wording is as before the option: "(trait units)²", "per Myr".
  const traitUnit = traitUnitOf(lineage);
  const perUnit = traitUnit ? `${traitUnit} per ${unit}` : `per ${unit}`;
  const varianceUnit = `${squaredLabel(traitUnit ?? 'trait units')} per ${unit}`;
  const settings = run.report.settings;
  const lines: string[] = [];
  lines.push(`Power to detect a directional trend: "${lineageName(lineage)}", ${settings.horizons} horizons over ${formatNumber(settings.span)} ${unit}`);
  if (run.assumptions.length > 1) {
    lines.push(`  Assumed step variances: ${run.assumptions.map((entry) => `${formatNumber(entry.stepVariance)} (${sourceWords(entry.source)})`).join(' and ')} ${varianceUnit}; each has its own table below.`);
  }
  for (const assumption of run.assumptions) {
    const { report } = assumption;
    lines.push('');
    lines.push(`  Assumed step variance ${formatNumber(report.settings.step_variance)} ${varianceUnit} (${sourceWords(assumption.source)}):`);
    lines.push(`  ${report.settings.replicates} replicates per drift from the directional walk, step variance ${formatNumber(report.settings.step_variance)} ${varianceUnit}, seed ${report.settings.seed}`);
    lines.push(`  likelihood-ratio test (directional vs random walk) at ${report.lrt.level}: bootstrap critical value ${formatNumber(report.lrt.critical_value)} (chi-square(1): ${formatNumber(report.lrt.chi_square_critical_value)})`);
    lines.push('');
    const header = [traitUnit ? `drift (${perUnit})` : 'drift', `sd per ${unit}`, 'step variance', 'P(best)', `P(weight > ${report.settings.weight_threshold})`, 'P(LRT)'];
    const rows = report.grid.map((point) => [formatNumber(point.drift), formatNumber(point.drift_sd), formatNumber(report.settings.step_variance), point.p_best.toFixed(3), point.p_weight.toFixed(3), point.p_lrt.toFixed(3)]);
    const widths = header.map((title, c) => Math.max(title.length, ...rows.map((row) => row[c].length)));
    lines.push('  ' + header.map((title, c) => title.padStart(widths[c])).join('  '));
    for (const row of rows) lines.push('  ' + row.map((cell, c) => cell.padStart(widths[c])).join('  '));
    lines.push('');
    const f = report.false_trend;
    lines.push(`  False-trend rate (true drift 0): best ${f.p_best.toFixed(3)}, weight ${f.p_weight.toFixed(3)}, LRT ${f.p_lrt.toFixed(3)}`);
    const smallest = report.smallest_drift;
    const at = (value: number | null): string => (value === null ? 'not reached on the grid' : `${formatNumber(value)} ${perUnit}`);
    lines.push(`  Smallest drift with ${smallest.power * 100}% power: LRT ${at(smallest.p_lrt)}; best ${at(smallest.p_best)}; weight ${at(smallest.p_weight)}`);
    const needed = report.horizons_needed;
    if (needed) {
      lines.push(
        needed.horizons === null
          ? `  Drift ${formatNumber(needed.drift)} ${perUnit}: LRT power ${needed.power_now.toFixed(3)} now; ${needed.power * 100}% not reached within ${needed.searched_up_to} horizons`
          : `  Drift ${formatNumber(needed.drift)} ${perUnit}: LRT power ${needed.power_now.toFixed(3)} now; about ${needed.horizons} horizons at the same spacing and sample sizes reach ${needed.power * 100}% (power ${needed.power_at_answer?.toFixed(3)})`,
      );
    }
    if (report.coverage) {
      const coverage = report.coverage;
      lines.push('');
      lines.push(`  Coverage of nominal 95% intervals on this design (${coverage.converged} lineages from the fitted directional walk with step variance ${formatNumber(report.settings.step_variance)}):`);
      const shown = (value: number | null): string => (value === null ? '—' : value.toFixed(3));
      for (const [method, values] of Object.entries(coverage.coverage)) {
        lines.push(`    ${method.padEnd(10)} drift ${shown(values.drift)}, step_variance ${shown(values.step_variance)}  (${intervalMethodLabels[method as keyof typeof intervalMethodLabels]})`);
      }
      for (const [name, reason] of Object.entries(coverage.vacuous)) lines.push(`    ${name}: not checked (—): ${reason}`);
    }
  }
  lines.push('');
  lines.push(...wrap(caution, 78).map((line) => `  ${line}`));
  return lines.join('\n');
}

function wrap(text: string, width: number): string[] {
  const words = text.split(' ');
  const lines: string[] = [];
  let line = '';
  for (const word of words) {
    if (line.length + word.length + 1 > width && line !== '') {
      lines.push(line);
      line = word;
    } else line = line === '' ? word : `${line} ${word}`;
  }
  if (line !== '') lines.push(line);
  return lines;
}
