import { join } from 'node:path';
import { ageFunction, hasAgeUncertainty, readAgeModel, sedimentationRates, type AgeModel } from '../data/age-model.js';
import { usageError } from '../data/errors.js';
import { readTable } from '../data/read-table.js';
import type { SampleSet } from '../data/samples.js';
import { WarningLog } from '../data/warnings.js';
import { ageMonteCarlo, summariseDraws, type CandidateSpread, type RankedCandidate } from '../compare/age-uncertainty.js';
import { compareTraits, lineagesByTrait, type ComparisonRun, type TraitComparison } from '../compare/compare-sections.js';
import { candidateKey, comparisonCaution, comparisonCsv, comparisonDocument, comparisonTable, estimatesCsv, spreadsDocument } from '../compare/output.js';
import { commonTime, mergeSections, toleratingCoeval } from '../compare/stack.js';
import { fitLineage, type LineageFit } from '../fit/fit-lineage.js';
import { lineageName, type Lineage, type LineageOptions } from '../lineage.js';
import { lineageDocument, type Provenance } from '../render/fit-document.js';
import { modelsCsv } from '../render/models-csv.js';
import { alignColumns, lineageTable } from '../render/text-table.js';
import { formatNumber } from '../render/units.js';
import { resolveModels } from './fit-command.js';
import { delimiterOption, lineagesOf, loadSamplesStreamed, readInput, terminalProgress, type InputText, type SampleFileOptions, type StreamedInput } from './input.js';
import { toolVersion } from './version.js';
import { inputPaths, prepareOutputFolder, writeAtomically } from './write-output.js';

/** Options of the age model, shared by `fit` and `compare`. */
export interface AgeModelOptions {
  ageModel?: string;
  extrapolate?: boolean;
  ageDraws?: string;
  seed?: string;
}

/** Options of `stratotrend compare`. */
export interface CompareCommandOptions extends SampleFileOptions, AgeModelOptions {
  json?: boolean;
  out?: string;
  models?: string;
  intervals?: boolean;
  composite?: boolean;
  mergeCoeval?: boolean;
  figure?: boolean;
  quiet?: boolean;
}

/** Read and validate an age-model file (tie points). */
export function loadAgeModel(path: string, options: SampleFileOptions): LoadedAgeModel {
  const input = readInput(path);
  const model = readAgeModel(readTable(input.text, input.name, { delimiter: delimiterOption(options.delimiter) }), { decimalComma: options.decimalComma });
  return { input, model };
}

/** Parse `--age-draws` and `--seed`. */
export function parseDrawOptions(options: AgeModelOptions): { draws: number; seed: number } {
  const draws = options.ageDraws === undefined ? 0 : Number(options.ageDraws);
  if (!Number.isInteger(draws) || draws < 0 || draws > 100_000) throw usageError(`--age-draws must be a whole number from 0 to 100000, got "${options.ageDraws}"`);
  const seed = options.seed === undefined ? 1 : Number(options.seed);
  if (!Number.isInteger(seed) || seed < 0 || seed > 2 ** 32 - 1) throw usageError(`--seed must be a whole number from 0 to 4294967295, got "${options.seed}"`);
  if (draws > 0 && options.ageModel === undefined) throw usageError('--age-draws redraws the ages of an age model: give one with --age-model FILE');
  return { draws, seed };
}

/** The age model in words: ties and sedimentation rates per section. */
export function ageModelWords(model: AgeModel, unit: string): string {
  const lines = [`Age model ${model.file} (ages by linear interpolation between ties; rates in m per ${unit}):`];
  for (const [section, ties] of model.sections) {
    const rates = sedimentationRates(ties).map((segment) => Number(segment.rate.toPrecision(3)));
    const uncertain = ties.filter((tie) => tie.ageSd > 0).length;
    lines.push(`  ${section || 'every section'}: ${ties.length} ties, sedimentation rates ${rates.join(', ')}${uncertain > 0 ? `; ${uncertain} with age_sd` : ''}`);
  }
  return lines.join('\n');
}

/** An age-model file as read: its text record (name, checksum) and the validated ties. */
export interface LoadedAgeModel {
  readonly model: AgeModel;
  readonly input: InputText;
}

/**
 * The `ageOf` hook for `loadLineages` when `--age-model` is given (and the
 * age model itself), or nothing.
 */
export function ageModelHook(file: string, options: AgeModelOptions & SampleFileOptions): { age: LoadedAgeModel | null; extra: Pick<LineageOptions, 'ageOf'> } {
  if (!options.ageModel) {
    if (options.extrapolate) throw usageError('--extrapolate extends an age model: give one with --age-model FILE');
    return { age: null, extra: {} };
  }
  const age = loadAgeModel(options.ageModel, options);
  return { age, extra: { ageOf: ageFunction(age.model, { extrapolate: options.extrapolate, samplesFile: file === '-' ? 'stdin' : file }) } };
}

/** An age model only places heights and depths: say so when the samples already give ages or times. */
export function warnUnusedAgeModel(lineages: readonly Lineage[], model: AgeModel, warnings: { add(category: 'input', message: string): void }): void {
  const kind = lineages[0]?.positionKind;
  if (kind === 'age' || kind === 'time') warnings.add('input', `the samples give "${kind}", so the age model ${model.file} is not used (it places heights and depths only)`);
}

/** Extrapolated horizons of fitted lineages in words (empty when none). */
export function extrapolatedLineageWords(lineages: readonly Lineage[]): string {
  const parts = lineages
    .map((lineage) => ({ name: lineageName(lineage), lines: lineage.lines.filter((_, i) => lineage.extrapolated[i]) }))
    .filter((entry) => entry.lines.length > 0)
    .map((entry) => `${entry.name}: ${entry.lines.length} (input line${entry.lines.length === 1 ? '' : 's'} ${entry.lines.join(', ')})`);
  return parts.length === 0 ? '' : `EXTRAPOLATED AGES (beyond the outermost ties) — ${parts.join('; ')}`;
}

/**
 * `fit --age-draws N`: redraw the tie-point ages N times, refit every lineage
 * (without intervals), and summarise per lineage how the Akaike weights and
 * point estimates move. Adds `age_model` and `age_uncertainty` to the fit
 * document and returns the text block for the terminal (empty without draws).
 */
export function fitAgeDraws(
  file: string,
  options: AgeModelOptions & SampleFileOptions & { models?: string },
  fits: readonly LineageFit[],
  document: Record<string, unknown>,
  samples: SampleSet,
  age: LoadedAgeModel | null,
): string {
  const { draws, seed } = parseDrawOptions(options);
  if (!age) return '';
  const { model: ageModel, input: ageInput } = age;
  const provenance = document.provenance as { inputs?: { file: string; sha256: string }[]; options?: Record<string, unknown> } | undefined;
  provenance?.inputs?.push({ file: ageInput.name, sha256: ageInput.sha256 });
  if (provenance?.options) Object.assign(provenance.options, { age_model: options.ageModel, extrapolate: options.extrapolate === true, age_draws: draws, seed: draws > 0 ? seed : null });
  document.age_model = ageModelDocument(ageModel);
  const lines: string[] = [];
  const kind = fits[0]?.lineage.positionKind;
  if (kind === 'age' || kind === 'time') {
    lines.push(`warning: the samples give "${kind}", so the age model ${ageModel.file} is not used (it places heights and depths only)`);
    return lines.join('\n');
  }
  const extrapolated = extrapolatedLineageWords(fits.map((fit) => fit.lineage));
  if (extrapolated) lines.push(extrapolated);
  if (draws === 0) return lines.join('\n');
  // The horizons were read once (streamed); each draw only places them again.
  const samplesFile = file === '-' ? 'stdin' : file;
  const { models } = resolveModels(options.models);
  const perDraw = ageMonteCarlo(ageModel, draws, seed, (drawn) =>
    lineagesOf(samples, options, new WarningLog(), { ageOf: ageFunction(drawn, { extrapolate: options.extrapolate, samplesFile }) })
      .map((lineage) => fitLineage(lineage, models, { intervals: false })));
  const summaries = fits.map((fit) => {
    const name = lineageName(fit.lineage);
    const spreads = summariseDraws(perDraw.map((drawFits) => {
      const match = drawFits.find((entry) => lineageName(entry.lineage) === name);
      return (match?.models ?? []).map((model) => ({ key: model.id, weight: model.weight, best: match?.best === model.id, estimates: model.estimates }));
    }));
    return { fit, name, spreads };
  });
  document.age_uncertainty = {
    draws,
    seed,
    method: 'tie ages redrawn from N(age, age_sd^2), kept in stratigraphic order; every lineage refitted without intervals',
    lineages: summaries.map(({ fit, spreads }) => ({ section: fit.lineage.section, trait: fit.lineage.trait, models: spreadsDocument(spreads) })),
  };
  if (!hasAgeUncertainty(ageModel)) lines.push(`warning: every age_sd in ${ageModel.file} is 0, so every draw repeats the plain fit`);
  for (const { fit, name, spreads } of summaries) {
    lines.push(`Age uncertainty for "${name}": ${draws} redraws of the tie-point ages (seed ${seed}); Akaike weight median [2.5%, 97.5%] and how often best:`);
    const rows = [['model', 'weight', 'best in']];
    for (const spread of spreads) rows.push([spread.key, spreadWords(spread.weight, 3), `${(100 * spread.bestFraction).toFixed(1)}%`]);
    lines.push(...alignColumns(rows));
    const keyModels = [fit.best, 'directional-walk'].filter((id, index, list): id is string => id !== null && list.indexOf(id) === index);
    for (const id of keyModels) {
      const spread = spreads.find((entry) => entry.key === id);
      if (!spread) continue;
      const parts = Object.entries(spread.estimates).filter(([, value]) => value.median !== null).map(([parameter, value]) => `${parameter} ${spreadWords(value, 4)}`);
      if (parts.length > 0) lines.push(`  ${id} estimates over the redraws (median [2.5%, 97.5%]; age uncertainty only, not a confidence interval): ${parts.join('; ')}`);
    }
  }
  lines.push('Caution: these spreads show how the conclusion moves with the dating alone; they do not include sampling error, and the age model itself (choice of ties, constant rates between them) is assumed.');
  return lines.join('\n');
}

function spreadWords(spread: { median: number | null; lower: number | null; upper: number | null }, digits: number): string {
  if (spread.median === null) return '—';
  const show = (value: number | null): string => (value === null ? '—' : digits === 3 ? value.toFixed(3) : formatNumber(value, digits));
  return `${show(spread.median)} [${show(spread.lower)}, ${show(spread.upper)}]`;
}

/** The age model as JSON: ties and sedimentation rates per section. */
export function ageModelDocument(model: AgeModel): Record<string, unknown> {
  return {
    file: model.file,
    position_kind: model.positionKind,
    sections: [...model.sections].map(([section, ties]) => ({
      section,
      ties: ties.map((tie) => ({ height: tie.height, age: tie.age, age_sd: tie.ageSd, line: tie.line })),
      sedimentation_rates: sedimentationRates(ties).map((segment) => ({ from_height: segment.fromHeight, to_height: segment.toHeight, rate: segment.rate })),
    })),
  };
}

/** Everything `compare` computed, before printing. */
export interface CompareRun {
  readonly run: ComparisonRun;
  readonly composites: readonly LineageFit[];
  readonly spreads: ReadonlyMap<string, readonly CandidateSpread[]>;
  readonly draws: { draws: number; seed: number } | null;
  readonly ageModel: AgeModel | null;
  readonly document: Record<string, unknown>;
  readonly warnings: WarningLog;
}

function candidates(comparison: TraitComparison): RankedCandidate[] {
  return comparison.hypotheses.map((hypothesis) => ({
    key: candidateKey(hypothesis),
    weight: hypothesis.weight,
    best: comparison.best !== null && comparison.best.id === hypothesis.id && comparison.best.model === hypothesis.model,
    estimates: hypothesis.estimates,
  }));
}

/**
 * Read the files, compare the sections of every trait, and build the
 * document (no output). The samples file is read once, as a stream (bounded
 * memory for specimen files of millions of rows; "-" reads stdin); the
 * lineages are assembled from its horizons again for every age-model draw.
 *
 * @param read the samples file already read (the report's fit read it), so it is not read again
 */
export async function runCompare(file: string, options: CompareCommandOptions, read?: StreamedInput): Promise<CompareRun> {
  const warnings = new WarningLog();
  // Usage first (no point reading a large file for a mistyped option), then the samples, then the age model.
  const { draws, seed } = parseDrawOptions(options);
  const { name: modelSet, models } = resolveModels(options.models);
  const { input, samples } = read ?? (await loadSamplesStreamed(file, options, terminalProgress(file)));
  const { age } = ageModelHook(file, options);
  const lineagesUnder = (model: AgeModel | null, log: WarningLog): Lineage[] =>
    lineagesOf(samples, options, log, model ? { ageOf: ageFunction(model, { extrapolate: options.extrapolate, samplesFile: input.name }) } : {});
  const lineages = lineagesUnder(age?.model ?? null, warnings);
  if (age) warnUnusedAgeModel(lineages, age.model, warnings);
  const run = compareTraits(lineages, models, { intervals: options.intervals !== false });
  for (const skipped of run.skipped) warnings.add('input', `trait "${skipped.trait}": ${skipped.reason}`);
  const composites: LineageFit[] = [];
  if (options.composite) {
    const tolerant = models.map(toleratingCoeval);
    for (const [, sections] of lineagesByTrait(lineages)) {
      if (sections.length < 2) continue;
      composites.push(fitLineage(mergeSections(sections, { mergeCoeval: options.mergeCoeval }).lineage, tolerant, { intervals: options.intervals !== false }));
    }
  }
  const spreads = new Map<string, readonly CandidateSpread[]>();
  if (draws > 0 && age) {
    if (!hasAgeUncertainty(age.model)) warnings.add('input', `--age-draws: every age_sd in ${age.model.file} is 0, so every draw repeats the plain fit`);
    const perDraw = ageMonteCarlo(age.model, draws, seed, (drawn) => compareTraits(lineagesUnder(drawn, new WarningLog()), models, { intervals: false }));
    for (const comparison of run.comparisons) {
      spreads.set(comparison.trait, summariseDraws(perDraw.map((result) => {
        const match = result.comparisons.find((entry) => entry.trait === comparison.trait);
        return match ? candidates(match) : [];
      })));
    }
  }
  const provenance: Provenance = {
    tool: 'stratotrend',
    version: toolVersion(),
    inputs: [{ file: input.name, sha256: input.sha256 }, ...(age ? [{ file: age.input.name, sha256: age.input.sha256 }] : [])],
    options: {
      command: 'compare',
      log: options.log === true,
      pool: options.pool === true,
      time_unit: options.timeUnit ?? 'Myr',
      models: modelSet,
      intervals: options.intervals === false ? 'none' : 'profile',
      age_model: options.ageModel ?? null,
      extrapolate: options.extrapolate === true,
      age_draws: draws,
      seed: draws > 0 ? seed : null,
      composite: options.composite === true,
      merge_coeval: options.mergeCoeval === true,
      criterion: 'AICc, N = all horizons of all sections of the trait',
    },
  };
  const document = {
    provenance,
    traits: run.comparisons.map((comparison) => comparisonDocument(comparison, spreads.get(comparison.trait) ?? null)),
    skipped: run.skipped,
    age_model: age ? ageModelDocument(age.model) : null,
    composite: composites.map(lineageDocument),
    caution: comparisonCaution,
    warnings: warnings.list().map((warning) => ({ category: warning.category, message: warning.message, count: warning.count })),
  };
  return { run, composites, spreads, draws: draws > 0 ? { draws, seed } : null, ageModel: age?.model ?? null, document, warnings };
}

/**
 * Per-section lineage documents for the sections-together figure: each
 * section's own fit, with positions replaced by ages (age_i = firstAge - t_i)
 * so the sections line up on the common timescale.
 */
export function sectionDocuments(comparison: TraitComparison, models: ReturnType<typeof resolveModels>['models']): Record<string, unknown>[] {
  const winner = comparison.best === null ? undefined : comparison.hypotheses.find((hypothesis) => hypothesis.id === comparison.best!.id && hypothesis.model === comparison.best!.model);
  const joint = winner?.joint ?? null;
  const { starts } = commonTime(comparison.sections);
  return comparison.sections.map((section, s) => {
    const document = lineageDocument(fitLineage(section, models, { intervals: false }));
    const data = document.data as Record<string, unknown>;
    const firstAge = section.firstAge ?? 0;
    const placed = { ...document, position_kind: 'age', data: { ...data, position: Array.from(section.time, (t) => firstAge - t) } };
    if (!winner || !joint) return placed;
    // A shared hypothesis won: the winning model's row carries the section's parameters under that hypothesis, not its separate fit.
    const parameters = joint.sectionParameters({ ...winner.estimates }, s);
    const rows = (document.models as Record<string, unknown>[]).map((row) => {
      if (row.id !== winner.model) return row;
      const params = Object.fromEntries(Object.entries(parameters).map(([name, value]) => [name, { estimate: Number.isFinite(value) ? value : null, lower: null, upper: null, at_bound: null, lower_at_bound: false, upper_at_bound: false }]));
      return { ...row, params, derived: {} };
    });
    // Under shared-offset one process runs from the oldest horizon of all sections: this section joins it starts[s] time units later.
    return { ...placed, models: rows, smoothed: null, curve_origin: joint.hypothesis === 'shared-offset' ? starts[s] : 0 };
  });
}

/** The sections figure's words for its lines: the winning hypothesis and model. */
export function hypothesisCaption(comparison: TraitComparison, label: string): string {
  const best = comparison.best;
  if (!best || best.id === 'separate') return `the ${label} model fitted to each section separately (the best-supported hypothesis)`;
  if (best.id === 'shared') return `the ${label} model with one process shared by all sections, each from its own start (the best-supported hypothesis)`;
  return `the ${label} model as one lineage on the common timescale, each section shifted by its own offset (the best-supported hypothesis)`;
}

/** `stratotrend compare FILE`: print the comparison tables (or JSON) and write outputs with --out. */
export async function compareCommand(file: string, options: CompareCommandOptions): Promise<void> {
  const result = await runCompare(file, options);
  const written: string[] = [];
  if (options.out) {
    const inputs = inputPaths(file, options);
    const drawFigures = options.figure !== false && result.run.comparisons.length > 0;
    const { models } = resolveModels(options.models);
    const documents = drawFigures ? result.run.comparisons.map((comparison) => sectionDocuments(comparison, models)) : [];
    // The file names of fit and redraw (`figureJobs`: <trait>.sections, numbered when traits coincide after cleaning).
    const { figureJobs } = await import('../render/figures/figure-set.js');
    const jobs = figureJobs(documents.flat(), ['sections']);
    const figureNames = jobs.map((job) => `${job.stem}.png`);
    const names = ['compare.csv', 'compare-estimates.csv', 'compare.json', ...(result.composites.length > 0 ? ['composite-models.csv'] : []), ...figureNames];
    const folder = prepareOutputFolder(options.out, inputs, names);
    writeAtomically(join(folder, 'compare.csv'), comparisonCsv(result.run.comparisons, result.spreads));
    writeAtomically(join(folder, 'compare-estimates.csv'), estimatesCsv(result.run.comparisons));
    writeAtomically(join(folder, 'compare.json'), JSON.stringify(result.document, null, 2) + '\n');
    written.push('compare.csv', 'compare-estimates.csv', 'compare.json');
    if (result.composites.length > 0) {
      writeAtomically(join(folder, 'composite-models.csv'), modelsCsv(result.composites));
      written.push('composite-models.csv');
    }
    if (drawFigures) {
      const { renderSectionsTogether } = await import('../render/figures/index.js');
      for (const [index, comparison] of result.run.comparisons.entries()) {
        const label = resolveModels(options.models).models.find((model) => model.id === comparison.best?.model)?.label ?? comparison.best?.model ?? '';
        const short = label.includes(' (') ? label.slice(0, label.indexOf(' (')) : label;
        const figure = renderSectionsTogether(documents[index], { model: comparison.best?.model, linesCaption: comparison.best ? hypothesisCaption(comparison, short) : undefined });
        writeAtomically(join(folder, figureNames[index]), figure.bytes);
        written.push(figureNames[index]);
      }
    }
  }
  if (options.json) {
    process.stdout.write(JSON.stringify(result.document, null, 2) + '\n');
  } else if (!options.quiet) {
    const unit = result.run.comparisons[0]?.sections[0].timeUnit.label ?? 'Myr';
    const parts: string[] = [];
    if (result.ageModel) parts.push(ageModelWords(result.ageModel, unit));
    for (const comparison of result.run.comparisons) {
      parts.push(comparisonTable(comparison, result.draws ? { ...result.draws, spreads: result.spreads.get(comparison.trait) ?? [] } : null));
    }
    for (const composite of result.composites) parts.push(lineageTable(composite));
    if (result.run.comparisons.length === 0) parts.push('No trait is measured in two or more sections: nothing to compare.');
    process.stdout.write(parts.join('\n\n') + '\n');
    if (written.length > 0) process.stdout.write(`\nWrote ${written.join(', ')} to ${options.out}\n`);
  }
  for (const warning of result.warnings.list()) {
    process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
  }
}
