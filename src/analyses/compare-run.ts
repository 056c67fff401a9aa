import { ageFunction, hasAgeUncertainty, sedimentationRates, type AgeModel } from '../data/age-model.js';
import type { SampleSet } from '../data/samples.js';
import { WarningLog } from '../data/warnings.js';
import { ageMonteCarlo, summariseDraws, type CandidateSpread, type RankedCandidate } from '../compare/age-uncertainty.js';
import { candidateKey, compareTraits, type ComparisonRun, type TraitComparison } from '../compare/compare-sections.js';
import { perSectionName } from '../compare/joint-models.js';
import { intervalOptions } from '../fit/intervals.js';
import { modelsForLineage } from './fit-extensions.js';
import { comparisonCaution, comparisonDocument, spreadsDocument } from '../render/comparison-output.js';
import { commonTime, mergeSections, toleratingCoeval } from '../compare/stack.js';
import { fitLineage, type LineageFit } from '../fit/fit-lineage.js';
import { lineageName, type Lineage } from '../lineage.js';
import { lineageDocument, type AgeModelDocument, type AgeUncertaintyDocument, type Provenance } from '../render/fit-document.js';
import { alignColumns } from '../render/text-table.js';
import type { FigureLineageDocument } from '../render/figures/figure-input.js';
import { formatNumber } from '../render/units.js';
import { resolveModels, type ModelSelection, type ModelsOption } from './model-selection.js';
import { ageModelHook, parseDrawOptions, warnUnusedAgeModel, type AgeModelOptions } from './age-model-options.js';
import { lineagesOf, loadSamplesStreamed, type SampleFileOptions, type StreamedInput } from './input.js';
import { readingProgress } from '../io/progress.js';
import { toolVersion } from '../io/version.js';
import type { PowerProgress } from '../simulate/power.js';

// The age-model options moved to age-model-options.ts (shared by every samples-reading command); re-exported for callers of this module.
export { ageModelHook, loadAgeModel, parseDrawOptions, warnUnusedAgeModel, type AgeModelOptions, type LoadedAgeModel } from './age-model-options.js';
import type { LoadedAgeModel } from './age-model-options.js';

/** Options of `stratotrend compare`. */
export interface CompareCommandOptions extends SampleFileOptions, AgeModelOptions {
  json?: boolean;
  out?: string;
  models?: ModelsOption;
  /** false for --no-intervals, a method name for --intervals METHOD (default: the calibrated default, as in `fit`). */
  intervals?: boolean | string;
  composite?: boolean;
  mergeCoeval?: boolean;
  figure?: boolean;
  quiet?: boolean;
}

/**
 * The age model in words: ties and sedimentation rates per section.
 *
 * @example
 * ageModelWords(readAgeModel(readTable('height,age,age_sd\n0,10,0.1\n50,8,0\n', 'ties.csv')), 'Myr').split('\n')[1]; // '  every section: 2 ties, sedimentation rates 25; 1 with age_sd' (50 m in 2 Myr)
 */
export function ageModelWords(model: AgeModel, unit: string): string {
  const lines = [`Age model ${model.file} (ages by linear interpolation between ties; rates in m per ${unit}):`];
  for (const [section, ties] of model.sections) {
    const rates = sedimentationRates(ties).map((segment) => Number(segment.rate.toPrecision(3)));
    const uncertain = ties.filter((tie) => tie.ageSd > 0).length;
    lines.push(`  ${section || 'every section'}: ${ties.length} ties, sedimentation rates ${rates.join(', ')}${uncertain > 0 ? `; ${uncertain} with age_sd` : ''}`);
  }
  return lines.join('\n');
}

/**
 * Extrapolated horizons of fitted lineages in words (empty when none).
 *
 * @example
 * const lineage = { ...lineageFromArrays({ section: 'A', trait: 'x', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [1, 1, 1] }), extrapolated: [false, true, true] };
 * extrapolatedLineageWords([lineage]); // 'EXTRAPOLATED AGES (beyond the outermost ties) — A / x: 2 (input lines 3, 4)'
 */
export function extrapolatedLineageWords(lineages: readonly Lineage[]): string {
  const parts = lineages
    .map((lineage) => ({ name: lineageName(lineage), lines: lineage.lines.filter((_, i) => lineage.extrapolated[i]) }))
    .filter((entry) => entry.lines.length > 0)
    .map((entry) => `${entry.name}: ${entry.lines.length} (input line${entry.lines.length === 1 ? '' : 's'} ${entry.lines.join(', ')})`);
  return parts.length === 0 ? '' : `EXTRAPOLATED AGES (beyond the outermost ties) — ${parts.join('; ')}`;
}

/** What {@link fitAgeDraws} gives `fit`: the text block for the terminal, and the `age_uncertainty` block of the fit document (null without draws). */
export interface AgeDrawsResult {
  readonly text: string;
  readonly document: AgeUncertaintyDocument | null;
}

/**
 * `fit --age-draws N`: redraw the tie-point ages N times, refit every lineage
 * (without intervals), and summarise per lineage how the Akaike weights and
 * point estimates move. Returns the text block for the terminal (the ties and
 * rates even without draws; empty without an age model) and the fit
 * document's `age_uncertainty` block, which `runFitStreamed` gives the
 * document when it builds it.
 *
 * @example
 * const table = readTable('section,trait,height,n,mean,sd\nQuarrel Hollow,x,0,5,1,0.5\nQuarrel Hollow,x,10,5,2,0.5\nQuarrel Hollow,x,20,5,3,0.5\nQuarrel Hollow,x,30,5,3.5,0.5\n', 'h.csv');
 * const samples = readSamples(table);
 * const age = loadAgeModel('sample-data/locality-ties.csv', {}, 'height');
 * const selection = resolveModels('strict-stasis,random-walk');
 * const options = { ageModel: 'sample-data/locality-ties.csv', ageDraws: '3' };
 * const fits = lineagesOf(samples, options, new WarningLog(), { ageOf: ageFunction(age.model) }).map((lineage) => fitLineage(lineage, selection.models, { intervals: false }));
 * const drawn = fitAgeDraws('h.csv', options, { fits, selection }, samples, age);
 * const text = drawn.text.split('\n');
 * text[0]; // 'Age model sample-data/locality-ties.csv (ages by linear interpolation between ties; rates in m per Myr):'
 * text[4]; // 'Age uncertainty for "Quarrel Hollow / x": 3 redraws of the tie-point ages (seed 1); Akaike weight median [2.5%, 97.5%] and how often best:'
 * drawn.document?.draws; // 3
 */
export function fitAgeDraws(
  file: string,
  options: AgeModelOptions & SampleFileOptions,
  run: { readonly fits: readonly LineageFit[]; readonly selection: ModelSelection },
  samples: SampleSet,
  age: LoadedAgeModel | null,
  progress?: PowerProgress,
): AgeDrawsResult {
  const { draws, seed } = parseDrawOptions(options);
  const { fits, selection } = run;
  if (!age) return { text: '', document: null };
  const { model: ageModel } = age;
  const lines: string[] = [];
  const kind = fits[0]?.lineage.positionKind;
  if (kind === 'age' || kind === 'time') {
    lines.push(`warning: the samples give "${kind}", so the age model ${ageModel.file} is not used (it places heights and depths only)`);
    return { text: lines.join('\n'), document: null };
  }
  // The ties and sedimentation rates, as compare prints them.
  lines.push(ageModelWords(ageModel, fits[0]?.lineage.timeUnit.label ?? 'Myr'));
  const extrapolated = extrapolatedLineageWords(fits.map((fit) => fit.lineage));
  if (extrapolated) lines.push(extrapolated);
  if (draws === 0) return { text: lines.join('\n'), document: null };
  // The horizons were read once (streamed); each draw only places them again.
  const samplesFile = file === '-' ? 'stdin' : file;
  const { models } = selection;
  const perDraw = ageMonteCarlo(ageModel, draws, seed, (drawn) =>
    lineagesOf(samples, options, new WarningLog(), { ageOf: ageFunction(drawn, { extrapolate: options.extrapolate, samplesFile }) })
      .map((lineage) => fitLineage(lineage, models, { intervals: false })), progress?.stage('age draws: refitting every lineage', draws));
  const summaries = fits.map((fit) => {
    const name = lineageName(fit.lineage);
    const spreads = summariseDraws(perDraw.map((drawFits) => {
      const match = drawFits.find((entry) => lineageName(entry.lineage) === name);
      return (match?.models ?? []).map((model) => ({ key: model.id, weight: model.weight, best: match?.best === model.id, estimates: model.estimates }));
    }));
    return { fit, name, spreads };
  });
  const document: AgeUncertaintyDocument = {
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
  return { text: lines.join('\n'), document };
}

function spreadWords(spread: { median: number | null; lower: number | null; upper: number | null }, digits: number): string {
  if (spread.median === null) return '—';
  const show = (value: number | null): string => (value === null ? '—' : digits === 3 ? value.toFixed(3) : formatNumber(value, digits));
  return `${show(spread.median)} [${show(spread.lower)}, ${show(spread.upper)}]`;
}

/**
 * The age model as JSON: ties and sedimentation rates per section.
 *
 * @example
 * ageModelDocument(readAgeModel(readTable('height,age\n0,10\n50,8\n', 'ties.csv'))).sections[0].sedimentation_rates; // [{ from_height: 0, to_height: 50, rate: 25 }]
 */
export function ageModelDocument(model: AgeModel): AgeModelDocument {
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
  /** Per composite (same order): how the sections' offsets were removed before merging, in words. */
  readonly compositeNotes: readonly string[];
  /** Per trait: draws whose best was a tie of identical fits. */
  readonly tiedDraws: ReadonlyMap<string, number>;
  readonly spreads: ReadonlyMap<string, readonly CandidateSpread[]>;
  readonly draws: { draws: number; seed: number } | null;
  readonly ageModel: AgeModel | null;
  readonly document: Record<string, unknown>;
  readonly warnings: WarningLog;
  /** `--models`, resolved once at the start of the run. */
  readonly selection: ModelSelection;
}

/**
 * One draw's hypotheses as age-draw candidates; every member of a tied best (identical fits) counts as best.
 *
 * @example
 * const a = { ...lineageFromArrays({ section: 'A', trait: 'x', time: [0, 1, 2, 3], mean: [1, 1.5, 1.2, 2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', trait: 'x', time: [0, 1, 2, 3], mean: [3.5, 3.1, 4, 4.2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 9.5 };
 * const comparison = compareSections([a, b], [randomWalk], { intervals: false });
 * candidates(comparison).map((candidate) => [candidate.key, candidate.best]); // [['separate random-walk', false], ['shared random-walk', false], ['shared-offset random-walk', true]]
 */
export function candidates(comparison: TraitComparison): RankedCandidate[] {
  return comparison.hypotheses.map((hypothesis) => ({
    key: candidateKey(hypothesis),
    weight: hypothesis.weight,
    best: comparison.bestGroup.some((entry) => entry.id === hypothesis.id && entry.model === hypothesis.model),
    estimates: hypothesis.estimates,
  }));
}

/** The sections' offsets as `compare` estimated them: from the best-supported (lowest AICc) shared-offset fit, or null when none was fitted. */
export interface EstimatedOffsets {
  readonly model: string;
  /** Offset of each section from the first (0 for the first), in section order. */
  readonly offsets: readonly number[];
}

/**
 * The offsets of the lowest-AICc shared-offset hypothesis of a comparison, or null when no shared-offset hypothesis was compared.
 *
 * @example
 * const a = { ...lineageFromArrays({ section: 'A', trait: 'x', time: [0, 1, 2, 3], mean: [1, 1.5, 1.2, 2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', trait: 'x', time: [0, 1, 2, 3], mean: [3.5, 3.1, 4, 4.2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 9.5 };
 * const comparison = compareSections([a, b], [randomWalk], { intervals: false });
 * estimatedOffsets(comparison); // { model: 'random-walk', offsets: [0, 2.1655872976933774] } (section B sits 2.17 above A)
 */
export function estimatedOffsets(comparison: TraitComparison): EstimatedOffsets | null {
  let chosen: TraitComparison['hypotheses'][number] | null = null;
  for (const hypothesis of comparison.hypotheses) {
    if (hypothesis.id !== 'shared-offset' || hypothesis.aicc === null) continue;
    if (chosen === null || hypothesis.aicc < chosen.aicc!) chosen = hypothesis;
  }
  if (chosen === null) return null;
  const offsets = comparison.sections.map((section, s) => (s === 0 ? 0 : chosen!.estimates[perSectionName('offset', section.section || `section ${s + 1}`)]));
  if (!offsets.every(Number.isFinite)) return null;
  return { model: chosen.model, offsets };
}

/**
 * The sections of a trait with their estimated offsets removed (section s's
 * means minus c_s, so every section sits at the first section's level):
 * what `--composite` merges. The offsets are taken as known, so the
 * composite's intervals leave out their uncertainty.
 *
 * @example
 * const a = { ...lineageFromArrays({ section: 'A', trait: 'x', time: [0, 1, 2, 3], mean: [1, 1.5, 1.2, 2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', trait: 'x', time: [0, 1, 2, 3], mean: [3.5, 3.1, 4, 4.2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 9.5 };
 * const comparison = compareSections([a, b], [randomWalk], { intervals: false });
 * const [, shifted] = withoutOffsets([a, b], { model: 'random-walk', offsets: [0, 2] });
 * Array.from(shifted.mean); // [1.5, 1.1, 2, 2.2000000000000002] (B's means minus 2)
 */
export function withoutOffsets(sections: readonly Lineage[], offsets: EstimatedOffsets): Lineage[] {
  return sections.map((section, s) => (offsets.offsets[s] === 0 ? section : { ...section, mean: section.mean.map((value) => value - offsets.offsets[s]) }));
}

/**
 * Read the files, compare the sections of every trait, and build the
 * document (no output). The samples file is read once, as a stream (bounded
 * memory for specimen files of millions of rows; "-" reads stdin); the
 * lineages are assembled from its horizons again for every age-model draw.
 *
 * @param read the samples file already read (the report's fit read it), so it is not read again
 * @param progress progress bar of the age draws (terminal only; changes nothing)
 *
 * @example
 * (await runCompare('sample-data/locality-heights.csv', { ageModel: 'sample-data/locality-ties.csv', intervals: false })).selection.name; // 'classic'
 */
export async function runCompare(file: string, options: CompareCommandOptions, read?: StreamedInput, progress?: PowerProgress): Promise<CompareRun> {
  const warnings = new WarningLog();
  // Usage first (no point reading a large file for a mistyped option), then the samples, then the age model.
  const { draws, seed } = parseDrawOptions(options);
  const selection = resolveModels(options.models);
  const { name: modelSet, models } = selection;
  const intervals = intervalOptions(options.intervals);
  const { input, samples } = read ?? (await loadSamplesStreamed(file, options, readingProgress(file, options)));
  const { age } = ageModelHook(file, options, samples.timeKind, warnings);
  const lineagesUnder = (model: AgeModel | null, log: WarningLog): Lineage[] =>
    lineagesOf(samples, options, log, model ? { ageOf: ageFunction(model, { extrapolate: options.extrapolate, samplesFile: input.name }) } : {});
  const lineages = lineagesUnder(age?.model ?? null, warnings);
  if (age) warnUnusedAgeModel(lineages, age.model, warnings);
  // The same limits as fit for the shift searches of each section (refusal above the placement limit, long-run warning).
  const { checkShiftSearchCost } = await import('./run-cost.js');
  checkShiftSearchCost(lineages, models, { warnings });
  const run = compareTraits(lineages, models, intervals);
  for (const skipped of run.skipped) warnings.add('input', `trait "${skipped.trait}": ${skipped.reason}`);
  const composites: LineageFit[] = [];
  const compositeNotes: string[] = [];
  const compositeOffsets: Record<string, unknown>[] = [];
  if (options.composite) {
    const tolerant = models.map(toleratingCoeval);
    for (const comparison of run.comparisons) {
      // The composite is one lineage: merging sections that sit at different levels would read their offset as evolution.
      const offsets = estimatedOffsets(comparison);
      if (offsets === null) {
        warnings.add('input', `--composite: trait "${comparison.trait}" is not merged: no shared-offset hypothesis was fitted, so the sections' offsets are unknown (choose models other than strict-stasis)`);
        continue;
      }
      const merged = mergeSections(withoutOffsets(comparison.sections, offsets), { mergeCoeval: options.mergeCoeval }).lineage;
      const lineage = { ...merged, section: `${merged.section}, offsets removed` };
      const kept = modelsForLineage(lineage, tolerant, modelSet).models;
      composites.push(fitLineage(lineage, kept, intervals));
      const parts = comparison.sections.slice(1).map((section, s) => `${section.section} ${formatNumber(-offsets.offsets[s + 1])}`);
      compositeNotes.push(
        `Composite of "${comparison.trait}": the offsets estimated under shared-offset ${offsets.model} (the best-supported shared-offset hypothesis) were removed before merging — added to each section's means: ${parts.join(', ')}; ` +
          `every section then sits at the level of ${comparison.sections[0].section}. The offsets are taken as known, so the composite's intervals leave out their uncertainty; ` +
          `the shared-offset hypotheses carry Akaike weight ${comparison.hypotheses.filter((h) => h.id === 'shared-offset').reduce((sum, h) => sum + (h.weight ?? 0), 0).toFixed(3)} in the comparison above.`,
      );
      compositeOffsets.push({
        trait: comparison.trait,
        model: offsets.model,
        reference_section: comparison.sections[0].section,
        offsets_removed: Object.fromEntries(comparison.sections.map((section, s) => [section.section, offsets.offsets[s]])),
      });
    }
  }
  const spreads = new Map<string, readonly CandidateSpread[]>();
  const tiedDraws = new Map<string, number>();
  if (draws > 0 && age) {
    if (!hasAgeUncertainty(age.model)) warnings.add('input', `--age-draws: every age_sd in ${age.model.file} is 0, so every draw repeats the plain fit`);
    const perDraw = ageMonteCarlo(age.model, draws, seed, (drawn) => compareTraits(lineagesUnder(drawn, new WarningLog()), models, { intervals: false }), progress?.stage('age draws: comparing again', draws));
    for (const comparison of run.comparisons) {
      const matches = perDraw.map((result) => result.comparisons.find((entry) => entry.trait === comparison.trait));
      spreads.set(comparison.trait, summariseDraws(matches.map((match) => (match ? candidates(match) : []))));
      tiedDraws.set(comparison.trait, matches.filter((match) => match !== undefined && match.bestGroup.length > 1).length);
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
      intervals: intervals.intervals ? intervals.intervalMethod : 'none',
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
    traits: run.comparisons.map((comparison) => comparisonDocument(comparison, spreads.get(comparison.trait) ?? null, tiedDraws.get(comparison.trait) ?? 0)),
    skipped: run.skipped,
    age_model: age ? ageModelDocument(age.model) : null,
    composite: composites.map(lineageDocument),
    composite_offsets: compositeOffsets,
    caution: comparisonCaution,
    warnings: warnings.list().map((warning) => ({ category: warning.category, message: warning.message, count: warning.count })),
  };
  return { run, composites, compositeNotes, tiedDraws, spreads, draws: draws > 0 ? { draws, seed } : null, ageModel: age?.model ?? null, document, warnings, selection };
}

/**
 * Per-section lineage documents for the sections-together figure: each
 * section's own fit, with positions replaced by ages (age_i = firstAge - t_i)
 * so the sections line up on the common timescale.
 *
 * @example
 * const a = { ...lineageFromArrays({ section: 'A', trait: 'x', time: [0, 1, 2, 3], mean: [1, 1.5, 1.2, 2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', trait: 'x', time: [0, 1, 2, 3], mean: [3.5, 3.1, 4, 4.2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 9.5 };
 * const comparison = compareSections([a, b], [randomWalk], { intervals: false });
 * sectionDocuments(comparison, [randomWalk]).map((document) => [document.section, document.curve_origin]); // [['A', 0], ['B', 0.5]] (shared-offset: B joins the common process 0.5 Myr later)
 */
export function sectionDocuments(comparison: TraitComparison, models: ModelSelection['models']): FigureLineageDocument[] {
  const winner = comparison.best === null ? undefined : comparison.hypotheses.find((hypothesis) => hypothesis.id === comparison.best!.id && hypothesis.model === comparison.best!.model);
  const joint = winner?.joint ?? null;
  const { starts } = commonTime(comparison.sections);
  return comparison.sections.map((section, s) => {
    const document = lineageDocument(fitLineage(section, models, { intervals: false }));
    const { data } = document;
    const firstAge = section.firstAge ?? 0;
    const placed = { ...document, position_kind: 'age', data: { ...data, position: Array.from(section.time, (t) => firstAge - t) } };
    if (!winner || !joint) return placed;
    // A shared hypothesis won: the winning model's row carries the section's parameters under that hypothesis, not its separate fit.
    const parameters = joint.sectionParameters({ ...winner.estimates }, s);
    const rows = document.models.map((row) => {
      if (row.id !== winner.model) return row;
      const params = Object.fromEntries(Object.entries(parameters).map(([name, value]) => [name, { estimate: Number.isFinite(value) ? value : null, lower: null, upper: null, at_bound: null, lower_at_bound: false, upper_at_bound: false }]));
      return { ...row, params, derived: {} };
    });
    // Under shared-offset one process runs from the oldest horizon of all sections: this section joins it starts[s] time units later.
    return { ...placed, models: rows, smoothed: null, curve_origin: joint.hypothesis === 'shared-offset' ? starts[s] : 0 };
  });
}

/**
 * The sections figure's words for its lines: the winning hypothesis and model.
 *
 * @example
 * const a = { ...lineageFromArrays({ section: 'A', trait: 'x', time: [0, 1, 2, 3], mean: [1, 1.5, 1.2, 2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', trait: 'x', time: [0, 1, 2, 3], mean: [3.5, 3.1, 4, 4.2], samplingVariance: [0.05, 0.05, 0.05, 0.05] }), firstAge: 9.5 };
 * const comparison = compareSections([a, b], [randomWalk], { intervals: false });
 * hypothesisCaption(comparison, 'random walk'); // 'the random walk model as one lineage on the common timescale, each section shifted by its own offset (the best-supported hypothesis)'
 */
export function hypothesisCaption(comparison: TraitComparison, label: string): string {
  const best = comparison.best;
  if (!best || best.id === 'separate') return `the ${label} model fitted to each section separately (the best-supported hypothesis)`;
  if (best.id === 'shared') return `the ${label} model with one process shared by all sections, each from its own start (the best-supported hypothesis)`;
  return `the ${label} model as one lineage on the common timescale, each section shifted by its own offset (the best-supported hypothesis)`;
}
