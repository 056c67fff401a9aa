import type { Warning } from '../data/warnings.js';
import type { LineageFit, RankedFit } from '../fit/fit-lineage.js';
import type { ParameterEstimate } from '../fit/fit-model.js';
import type { CompilationDocument } from './compilation-table.js';
import type { EstimateView, FitDocumentView, LineageView, ModelView } from './report/document-view.js';

/** What produced a result: tool, inputs with checksums, and every option. */
export interface Provenance {
  readonly tool: string;
  readonly version: string;
  readonly inputs: readonly { file: string; sha256: string }[];
  readonly options: Readonly<Record<string, unknown>>;
}

/**
 * A finite number or null (JSON has no Infinity or NaN, and the tool never prints them).
 *
 * @example
 * finiteOrNull(Infinity); // null
 * finiteOrNull(undefined); // null
 * finiteOrNull(-2.5); // -2.5
 */
export function finiteOrNull(value: number | null | undefined): number | null {
  return value === null || value === undefined || !Number.isFinite(value) ? null : value;
}

/**
 * An estimate and its interval ends as JSON (null for what is not finite), with where it sits at a bound.
 *
 * @example
 * estimateEndsDocument({ estimate: 2, lower: 1, upper: Infinity, atBound: null, lowerAtBound: false, upperAtBound: true }); // { estimate: 2, lower: 1, upper: null, at_bound: null }
 */
export function estimateEndsDocument(estimate: ParameterEstimate): Pick<EstimateView, 'estimate' | 'lower' | 'upper' | 'at_bound'> {
  return {
    estimate: finiteOrNull(estimate.estimate),
    lower: finiteOrNull(estimate.lower),
    upper: finiteOrNull(estimate.upper),
    at_bound: estimate.atBound,
  };
}

function estimateDocument(estimate: ParameterEstimate): EstimateView {
  return {
    ...estimateEndsDocument(estimate),
    lower_at_bound: estimate.lowerAtBound,
    upper_at_bound: estimate.upperAtBound,
  };
}

/**
 * What a ranked model of any kind (one trait, or several traits in `joint`) reports of its place in the AICc table, as JSON fields in this order.
 *
 * @example
 * rankingDocument({ id: 'stasis', label: 'stasis', k: 2, logLik: -3, aicc: NaN, deltaAicc: null, weight: 1 }); // { id: 'stasis', label: 'stasis', k: 2, logLik: -3, aicc: null, delta_aicc: null, weight: 1 }
 */
export function rankingDocument(model: { id: string; label: string; k: number; logLik: number | null; aicc: number | null; deltaAicc: number | null; weight: number | null }): { id: string; label: string; k: number; logLik: number | null; aicc: number | null; delta_aicc: number | null; weight: number | null } {
  return {
    id: model.id,
    label: model.label,
    k: model.k,
    logLik: finiteOrNull(model.logLik),
    aicc: finiteOrNull(model.aicc),
    delta_aicc: finiteOrNull(model.deltaAicc),
    weight: finiteOrNull(model.weight),
  };
}

/**
 * The JSON form of one ranked model fit.
 *
 * @example
 * // Strict stasis with unit sampling variances, means 1, 3, 2: mean 2, logL = -1.5 ln 2 pi - 1 (closed form).
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const model = modelDocument(fitLineage(lineage, [strictStasis], { intervals: false }).models[0]);
 * [model.id, model.k, model.weight, model.params.stasis_mean.estimate]; // ['strict-stasis', 1, 1, 2]
 * model.logLik; // -3.7568155996140176 (to 1e-12)
 */
export function modelDocument(model: RankedFit): ModelView {
  return {
    ...rankingDocument(model),
    converged: model.converged,
    compared: model.aicc !== null,
    not_compared_reason: model.notCompared,
    interval_method: model.intervalMethod,
    params: Object.fromEntries(Object.entries(model.parameters).map(([name, estimate]) => [name, estimateDocument(estimate)])),
    derived: Object.fromEntries(Object.entries(model.derived).map(([name, estimate]) => [name, estimateDocument(estimate)])),
    flags: model.flags,
    ...(model.extra ?? {}),
  };
}

/**
 * The JSON form of one lineage's fit, including its data so figures can be redrawn without refitting.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const document = lineageDocument(fitLineage(lineage, [strictStasis, randomWalk], { intervals: false }));
 * [document.section, document.trait, document.horizons, document.best_model]; // ['A', 'length', 3, 'strict-stasis']
 * document.models[1].not_compared_reason; // 'not compared: N - K - 1 = 0 <= 0 (too few horizons for K = 2)'
 */
export function lineageDocument(fit: LineageFit): LineageView {
  const { lineage } = fit;
  const list = (values: ArrayLike<number>): (number | null)[] => Array.from(values, (value) => finiteOrNull(value));
  return {
    section: lineage.section,
    trait: lineage.trait,
    horizons: lineage.mean.length,
    // Horizons whose age the age model extrapolated beyond its ties (also per horizon in data.extrapolated).
    extrapolated_horizons: lineage.extrapolated.filter(Boolean).length,
    // Age before present of the oldest horizon (age_i = first_age - time_i): puts sections given by height on one timescale.
    first_age: finiteOrNull(lineage.firstAge ?? null),
    time_unit: lineage.timeUnit.label,
    // The --trait-unit label as given (null when none): redraw and report read it back for axes and units.
    trait_unit: lineage.traitUnit ?? null,
    position_kind: lineage.positionKind,
    transform: lineage.logTransformed ? 'ln' : 'none',
    sampling_variance: lineage.pooled ? 'pooled' : 'per-horizon',
    best_model: fit.best,
    models: fit.models.map(modelDocument),
    data: {
      time: list(lineage.time),
      position: list(lineage.position),
      // Age of each horizon (age_i = first_age - time_i): the ages themselves, or those an age model gave heights/depths; null for elapsed-time input.
      age: lineage.positionKind === 'age' ? list(lineage.position) : lineage.positionKind === 'time' || lineage.firstAge === undefined ? null : Array.from(lineage.time, (t) => finiteOrNull((lineage.firstAge as number) - t)),
      mean: list(lineage.mean),
      n: list(lineage.count),
      within_variance: list(lineage.withinVariance),
      sampling_variance: list(lineage.samplingVariance),
      extrapolated: lineage.extrapolated,
      line: lineage.lines,
    },
    smoothed: fit.smoothed
      ? { model: fit.smoothed.model, mean: list(fit.smoothed.mean), standard_error: list(fit.smoothed.standardError) }
      : null,
  };
}

/** The age model as fit.json holds it (`age_model`): the tie file, and per section its ties and sedimentation rates. */
export interface AgeModelDocument {
  readonly file: string;
  readonly position_kind: string;
  readonly sections: readonly {
    readonly section: string;
    readonly ties: readonly { readonly height: number; readonly age: number; readonly age_sd: number; readonly line: number }[];
    readonly sedimentation_rates: readonly { readonly from_height: number; readonly to_height: number; readonly rate: number }[];
  }[];
}

/** `fit --age-draws` as fit.json holds it (`age_uncertainty`): per lineage, how the weights and estimates spread over the redrawn ages. */
export interface AgeUncertaintyDocument {
  readonly draws: number;
  readonly seed: number;
  readonly method: string;
  readonly lineages: readonly { readonly section: string; readonly trait: string; readonly models: readonly Readonly<Record<string, unknown>>[] }[];
}

/**
 * What `fit` adds to the document besides the fits, given when it is built
 * (issue 22: the document is built once and never patched afterwards).
 */
export interface FitDocumentBlocks {
  /** Per lineage, in `fits` order: blocks added after the lineage's own fields (models left out, rates, adequacy, trend test). */
  readonly lineageBlocks?: readonly Readonly<Record<string, unknown>>[];
  /** `--age-model`: the ties and rates. */
  readonly ageModel?: AgeModelDocument;
  /** `--age-draws`: the spread over redrawn tie ages. */
  readonly ageUncertainty?: AgeUncertaintyDocument;
  /** `--summary`: the cross-lineage summary. */
  readonly compilation?: CompilationDocument;
}

/**
 * The fit document as `fit` builds it, typed once (issue 22): the shape the
 * report and the figures read (`FitDocumentView`), plus the blocks `fit` adds
 * (`--age-model`, `--age-draws`, `--summary`), each given at build time.
 */
export interface FitDocument extends FitDocumentView {
  readonly age_model?: AgeModelDocument;
  readonly age_uncertainty?: AgeUncertaintyDocument;
  readonly compilation?: CompilationDocument;
}

/**
 * The whole `--json` / fit.json document, built once: its top level is frozen,
 * so a block cannot be added after the fact (give it in `blocks`).
 * Keys in this order: provenance, model_set, lineages, warnings, then
 * age_model, age_uncertainty and compilation when given.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic');
 * Object.keys(document); // ['provenance', 'model_set', 'lineages', 'warnings']
 * Object.isFrozen(document); // true
 */
export function fitDocument(fits: readonly LineageFit[], provenance: Provenance, warnings: readonly Warning[], modelSet: string, blocks: FitDocumentBlocks = {}): FitDocument {
  const { lineageBlocks, ageModel, ageUncertainty, compilation } = blocks;
  return Object.freeze({
    provenance,
    model_set: modelSet,
    lineages: fits.map((fit, j) => (lineageBlocks?.[j] ? { ...lineageDocument(fit), ...lineageBlocks[j] } : lineageDocument(fit))),
    warnings: warnings.map((warning) => ({ category: warning.category, message: warning.message, count: warning.count })),
    ...(ageModel ? { age_model: ageModel } : {}),
    ...(ageUncertainty ? { age_uncertainty: ageUncertainty } : {}),
    ...(compilation ? { compilation } : {}),
  });
}
