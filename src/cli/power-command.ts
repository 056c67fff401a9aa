import { InputError, usageError } from '../data/errors.js';
import { WarningLog, type Warning } from '../data/warnings.js';
import { LikelihoodEvaluator } from '../fit/evaluator.js';
import { fitModel } from '../fit/fit-model.js';
import { intervalMethodLabels } from '../fit/intervals.js';
import { lineageName, type Lineage } from '../lineage.js';
import { directionalWalk } from '../models/directional-walk.js';
import { formatNumber, squaredLabel, traitUnitLabel } from '../render/units.js';
import { designOf, pooledWithinSd } from '../simulate/design.js';
import { defaultDrifts, powerAnalysis, type PowerProgress, type PowerReport } from '../simulate/power.js';
import { poolRunner } from '../simulate/run-replicates.js';
import { parseSeed } from '../simulate/seeds.js';
import { lineagesWithAgeModel, type AgeModelOptions } from './age-model-options.js';
import { loadSamplesStreamed, terminalProgress, type SampleFileOptions, type StreamedInput } from './input.js';
import { toolVersion } from './version.js';
import { refuseInputPath, writeAtomically } from './write-output.js';

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
  quiet?: boolean;
}

/** A whole number option within a range, or a usage error naming the option. */
export function wholeOption(text: string | undefined, name: string, fallback: number, minimum: number, maximum: number): number {
  if (text === undefined) return fallback;
  const value = Number(text);
  if (!/^\d+$/.test(text.trim()) || !Number.isSafeInteger(value) || value < minimum || value > maximum) {
    throw usageError(`${name} must be a whole number from ${minimum} to ${maximum}, got "${text}"`);
  }
  return value;
}

/** A number option (finite; positive when asked), or a usage error naming the option. */
export function numberOption(text: string | undefined, name: string, positive = false): number | undefined {
  if (text === undefined) return undefined;
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value) || (positive && !(value > 0))) {
    throw usageError(`${name} must be a ${positive ? 'positive ' : ''}number, got "${text}"`);
  }
  return value;
}

/** A comma-separated list of numbers, or a usage error naming the option and the bad entry. */
export function numberList(text: string | undefined, name: string): number[] | undefined {
  if (text === undefined) return undefined;
  const parts = text.split(',').map((part) => part.trim()).filter((part) => part !== '');
  if (parts.length === 0) throw usageError(`${name}: give at least one number`);
  return parts.map((part) => {
    const value = Number(part);
    if (!Number.isFinite(value)) throw usageError(`${name}: "${part}" is not a number`);
    return value;
  });
}

/** The seed option (default 1). */
export function seedOption(text: string | undefined): number {
  if (text === undefined) return 1;
  const seed = parseSeed(text);
  if (seed === null) throw usageError(`--seed must be a whole number from 0 to 4294967295, got "${text}"`);
  return seed;
}

/** Pick the lineage named by --lineage ("section / trait", or a section or trait alone), else the first. */
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
 * A progress bar on stderr (cli-progress), one line per stage, shown only
 * when stderr is a terminal and --quiet is not given; otherwise silent.
 */
export async function progressReporter(quiet: boolean | undefined): Promise<{ progress: PowerProgress | undefined; stop(): void }> {
  if (quiet || !process.stderr.isTTY) return { progress: undefined, stop: () => {} };
  const { default: cliProgress } = await import('cli-progress');
  let bar: InstanceType<typeof cliProgress.SingleBar> | null = null;
  const stop = (): void => {
    bar?.stop();
    bar = null;
  };
  const progress: PowerProgress = {
    stage(label, total) {
      stop();
      bar = new cliProgress.SingleBar(
        { stream: process.stderr, format: `  ${label.padEnd(40)} [{bar}] {value}/{total}`, barsize: 24, hideCursor: true, clearOnComplete: false },
        cliProgress.Presets.shades_classic,
      );
      bar.start(total, 0);
      return (done) => bar?.update(done);
    },
  };
  return { progress, stop };
}

/** The lineage's trait unit as power prints it ("mm"; "ln mm" with --log), or null without --trait-unit. */
export function traitUnitOf(lineage: Lineage): string | null {
  return lineage.traitUnit ? traitUnitLabel(lineage.traitUnit, lineage.logTransformed, '') : null;
}

/** Everything `power` computed, before printing. */
export interface PowerRun {
  readonly lineage: Lineage;
  readonly report: PowerReport;
  readonly document: Record<string, unknown>;
  readonly notes: string[];
  /** Warnings of reading the samples and placing them in time (printed on stderr, and in the document). */
  readonly warnings: readonly Warning[];
}

/**
 * Read the file, fit the directional walk, and run the power analysis on the chosen lineage's design.
 *
 * @param read the samples file already read (the report's fit read it), so it is not read again
 */
export async function runPower(file: string, options: PowerCommandOptions, progress?: PowerProgress, read?: StreamedInput): Promise<PowerRun> {
  const warnings = new WarningLog();
  // Streamed: a specimen file of millions of rows is read in bounded memory (or already read, by the report's fit).
  const { input, samples } = read ?? (await loadSamplesStreamed(file, options, terminalProgress(file)));
  // Heights and depths become ages through the same age-model options as fit (--age-model, --extrapolate).
  const { lineages } = lineagesWithAgeModel(file, samples, options, warnings);
  const { lineage, note } = chooseLineage(lineages, options.lineage, input.name);
  const notes: string[] = note ? [note] : [];
  const replicates = wholeOption(options.replicates, '--replicates', 200, 20, 100000);
  const seed = seedOption(options.seed);
  const threads = options.threads === undefined ? undefined : wholeOption(options.threads, '--threads', 1, 1, 256);
  const threshold = numberOption(options.weightThreshold, '--weight-threshold') ?? 0.5;
  if (!(threshold > 0 && threshold < 1)) throw usageError(`--weight-threshold must lie between 0 and 1, got "${options.weightThreshold}"`);
  const fit = fitModel(directionalWalk, lineage, { intervals: false });
  // The data, not the options, are at fault here: a data error (exit 1).
  if (!fit.converged) throw new InputError(`the directional walk could not be fitted to "${lineageName(lineage)}": ${fit.message}`, { file: input.name });
  const given = numberOption(options.stepVariance, '--step-variance');
  if (given !== undefined && !(given >= 0)) throw usageError(`--step-variance must be 0 or more, got "${options.stepVariance}"`);
  const stepVariance = given ?? fit.estimates.step_variance;
  if (given === undefined && stepVariance === 0) {
    notes.push('the fitted step variance is 0 (at its bound): replicates have no random-walk component, only sampling error; give --step-variance to assume one');
  }
  const design = designOf(lineage);
  const withinSd = pooledWithinSd(design);
  const details = new LikelihoodEvaluator(directionalWalk, lineage).details(directionalWalk.processFrom({ step_variance: stepVariance }, lineage));
  const driftError = Math.sqrt(details.coefficientCovariance[3]);
  const perUnit = numberList(options.drifts, '--drifts');
  const perSd = numberList(options.driftsSd, '--drifts-sd');
  if (perUnit && perSd) throw usageError('give --drifts or --drifts-sd, not both');
  const drifts = perUnit ?? perSd?.map((value) => value * withinSd) ?? defaultDrifts(driftError);
  const targetDrift = numberOption(options.targetDrift, '--target-drift') ?? null;
  const report = await powerAnalysis(
    {
      design,
      stepVariance,
      ancestralMean: fit.estimates.ancestral_mean,
      drifts,
      replicates,
      seed,
      weightThreshold: threshold,
      targetDrift,
      coverage: options.coverage !== false,
      fittedDrift: fit.estimates.drift,
    },
    poolRunner({ threads }),
    progress,
  );
  const document = {
    tool: 'stratotrend',
    version: toolVersion(),
    command: 'power',
    // trait_unit and transform as in fit.json: the --trait-unit label as given (null when none), 'ln' with --log (values in ln mm).
    input: { file: input.name, sha256: input.sha256, lineage: lineageName(lineage), trait_unit: lineage.traitUnit ?? null, transform: lineage.logTransformed ? 'ln' : 'none' },
    generator: {
      model: 'directional-walk',
      step_variance: stepVariance,
      step_variance_source: given === undefined ? 'fitted' : 'given',
      ancestral_mean: fit.estimates.ancestral_mean,
      fitted_drift: fit.estimates.drift,
      drift_standard_error: driftError,
    },
    ...report,
    notes,
    // Warnings of reading and placing the samples (e.g. time-axis plausibility), as in fit.json.
    warnings: warnings.list().map((warning) => ({ category: warning.category, message: warning.message, count: warning.count })),
    caution: caution,
  };
  return { lineage, report, document, notes, warnings: warnings.list() };
}

const caution =
  'Power and false-trend rates hold for the assumed step variance and for this design taken at face value. Model support also depends on sampling, time-averaging and the age model, and a good fit to a random walk says nothing by itself about drift versus selection: weigh these numbers with the specialist’s judgement.';

/** The power report as a terminal table. */
export function powerTable(run: PowerRun): string {
  const { report, lineage } = run;
  const unit = lineage.timeUnit.label;
  // Without --trait-unit the wording is as before the option: "(trait units)²", "per Myr".
  const traitUnit = traitUnitOf(lineage);
  const perUnit = traitUnit ? `${traitUnit} per ${unit}` : `per ${unit}`;
  const settings = report.settings;
  const lines: string[] = [];
  lines.push(`Power to detect a directional trend: "${lineageName(lineage)}", ${settings.horizons} horizons over ${formatNumber(settings.span)} ${unit}`);
  lines.push(`  ${settings.replicates} replicates per drift from the directional walk, step variance ${formatNumber(settings.step_variance)} ${squaredLabel(traitUnit ?? 'trait units')} per ${unit}, seed ${settings.seed}`);
  lines.push(`  likelihood-ratio test (directional vs random walk) at ${report.lrt.level}: bootstrap critical value ${formatNumber(report.lrt.critical_value)} (chi-square(1): ${formatNumber(report.lrt.chi_square_critical_value)})`);
  lines.push('');
  const header = [traitUnit ? `drift (${perUnit})` : 'drift', `sd per ${unit}`, 'P(best)', `P(weight > ${settings.weight_threshold})`, 'P(LRT)'];
  const rows = report.grid.map((point) => [formatNumber(point.drift), formatNumber(point.drift_sd), point.p_best.toFixed(3), point.p_weight.toFixed(3), point.p_lrt.toFixed(3)]);
  const widths = header.map((title, c) => Math.max(title.length, ...rows.map((row) => row[c].length)));
  lines.push('  ' + header.map((title, c) => title.padStart(widths[c])).join('  '));
  for (const row of rows) lines.push('  ' + row.map((cell, c) => cell.padStart(widths[c])).join('  '));
  lines.push('');
  const f = report.false_trend;
  lines.push(`  False-trend rate (true drift 0): best ${f.p_best.toFixed(3)}, weight ${f.p_weight.toFixed(3)}, LRT ${f.p_lrt.toFixed(3)}`);
  const s = report.smallest_drift;
  const at = (value: number | null): string => (value === null ? 'not reached on the grid' : `${formatNumber(value)} ${perUnit}`);
  lines.push(`  Smallest drift with ${s.power * 100}% power: LRT ${at(s.p_lrt)}; best ${at(s.p_best)}; weight ${at(s.p_weight)}`);
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
    lines.push(`  Coverage of nominal 95% intervals on this design (${coverage.converged} lineages from the fitted directional walk):`);
    for (const [method, values] of Object.entries(coverage.coverage)) {
      lines.push(`    ${method.padEnd(10)} drift ${values.drift.toFixed(3)}, step_variance ${values.step_variance.toFixed(3)}  (${intervalMethodLabels[method as keyof typeof intervalMethodLabels]})`);
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

/** `stratotrend power FILE`. */
export async function powerCommand(file: string, options: PowerCommandOptions): Promise<void> {
  if (options.figure) refuseInputPath(options.figure, [file]);
  const reporter = await progressReporter(options.quiet);
  let run: PowerRun;
  try {
    run = await runPower(file, options, reporter.progress);
  } finally {
    reporter.stop();
  }
  if (options.figure) {
    const { renderPowerCurve } = await import('../render/figures/power-curve.js');
    const figure = renderPowerCurve({
      grid: run.report.grid,
      lineage: lineageName(run.lineage),
      horizons: run.report.settings.horizons,
      replicates: run.report.settings.replicates,
      timeUnit: run.lineage.timeUnit.label,
      traitUnit: traitUnitOf(run.lineage),
      weightThreshold: run.report.settings.weight_threshold,
      targetPower: run.report.smallest_drift.power,
      level: run.report.lrt.level,
      withinSd: run.report.settings.pooled_within_sd,
    }, { format: options.figure.toLowerCase().endsWith('.svg') ? 'svg' : options.figure.toLowerCase().endsWith('.pdf') ? 'pdf' : 'png' });
    writeAtomically(options.figure, figure.bytes);
  }
  if (options.json) process.stdout.write(JSON.stringify(run.document, null, 2) + '\n');
  else if (!options.quiet) process.stdout.write(powerTable(run) + '\n' + (options.figure ? `\nWrote the power curve to ${options.figure}\n` : ''));
  for (const note of run.notes) process.stderr.write(`note: ${note}\n`);
  for (const warning of run.warnings) process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
}
