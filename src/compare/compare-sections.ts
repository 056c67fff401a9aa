import { fitModel, type FitOptions, type ModelFit, type ParameterEstimate } from '../fit/fit-model.js';
import { aicc, akaikeWeights, lowestCriterion } from '../fit/model-choice.js';
import type { Lineage } from '../lineage.js';
import { defaultMinimumSegment, type EvolutionModel } from '../models/model.js';
import { offsetModel, perSectionName, sharedModel, type HypothesisId, type JointModel } from './joint-models.js';
import { likelihoodRatioTest, type LikelihoodRatioTest } from './likelihood-ratio.js';

/** One hypothesis (separate, shared or shared-offset) of one model family, fitted to all sections of a trait. */
export interface HypothesisFit {
  readonly id: HypothesisId;
  /** Model family id (e.g. "directional-walk"). */
  readonly model: string;
  readonly label: string;
  /** K: for separate, the sum of the sections' K. */
  readonly k: number;
  /** N: all horizons of all sections. */
  readonly horizons: number;
  /** For separate, the sum of the sections' maximised logL. */
  readonly logLik: number;
  readonly aicc: number | null;
  readonly deltaAicc: number | null;
  readonly weight: number | null;
  readonly converged: boolean;
  /** Why not fitted or not compared, in words. */
  readonly message: string | null;
  /** Estimates; per-section ones named `name[section]`. */
  readonly parameters: Readonly<Record<string, ParameterEstimate>>;
  readonly estimates: Readonly<Record<string, number>>;
  readonly flags: readonly string[];
  /** The single-section fits a separate hypothesis is made of. */
  readonly sectionFits: readonly ModelFit[] | null;
  /** The joint model (shared, shared-offset), for smoothing and figures. */
  readonly joint: JointModel | null;
  /** The underlying fit of the joint model (process values etc.). */
  readonly fit: ModelFit | null;
  /** How the 95% intervals were made ("none" without intervals; for separate, the sections' methods joined by " / "). */
  readonly intervalMethod: string;
  /**
   * Candidate keys (`candidateKey`) of the other compared hypotheses that are
   * the same fit at the estimates: equal K and logL equal to {@link sameFitTolerance}.
   * The data cannot tell these apart; their AICc and weights are equal.
   */
  readonly sameFitAs: readonly string[];
}

/** A hypothesis × model family that is not fitted at all, with the reason (never ranked, never listed as a row). */
export interface LeftOutHypothesis {
  /** The hypotheses left out: one id, or every hypothesis of the family. */
  readonly id: HypothesisId | 'every';
  readonly model: string;
  readonly reason: string;
}

/** Shared against separate for one model family. */
export interface FamilyTest extends LikelihoodRatioTest {
  readonly model: string;
  readonly restricted: HypothesisId;
  readonly full: HypothesisId;
}

/** Every hypothesis × model family for one trait, ranked together by AICc. */
export interface TraitComparison {
  readonly trait: string;
  readonly sections: readonly Lineage[];
  readonly horizons: number;
  /** The fitted hypotheses (every one converged; those that could not be fitted are in `leftOut`). */
  readonly hypotheses: readonly HypothesisFit[];
  /** The lowest-AICc hypothesis, or null when none was compared. */
  readonly best: { id: HypothesisId; model: string } | null;
  /**
   * The best and every hypothesis that is the same fit as it (see
   * `HypothesisFit.sameFitAs`); more than one entry means the best cannot be
   * told apart from the others here. Empty when none was compared.
   */
  readonly bestGroup: readonly { id: HypothesisId; model: string }[];
  readonly tests: readonly FamilyTest[];
  /** Hypotheses not fitted because the model set or the data do not allow them, with the reason. */
  readonly leftOut: readonly LeftOutHypothesis[];
}

/** Options of {@link compareSections}. */
export interface CompareOptions extends FitOptions {
  /** Also fit shared-offset (default true). */
  offsets?: boolean;
}

/**
 * Two hypotheses with the same K are the same fit when their maximised logL
 * differ by at most this much (absolute, or relative to |logL| above 1):
 * the optimiser's and the filter's rounding, far below the 0.001 that the
 * tables print. Example: with the step variance at 0, the shared and
 * shared-offset directional walks are the same linear model (each section's
 * start is the common start plus its offset) and their logL differ only in
 * the last digits.
 */
export const sameFitTolerance = 1e-6;

/**
 * Whether two maximised fits are identical at their estimates (equal K, logL equal to {@link sameFitTolerance}).
 *
 * @example
 * sameFit({ k: 2, logLik: -10 }, { k: 2, logLik: -10.000001 }); // true (1e-7 relative)
 * sameFit({ k: 2, logLik: -10 }, { k: 3, logLik: -10 }); // false
 */
export function sameFit(a: { k: number; logLik: number }, b: { k: number; logLik: number }): boolean {
  if (a.k !== b.k || !Number.isFinite(a.logLik) || !Number.isFinite(b.logLik)) return false;
  return Math.abs(a.logLik - b.logLik) <= sameFitTolerance * Math.max(1, Math.abs(a.logLik), Math.abs(b.logLik));
}

/**
 * Why a family's shared and shared-offset hypotheses are not fitted when the
 * model has a shift (a discrete position searched per lineage): a shift
 * "shared" by sections could mean one age on the common timescale or one
 * process with each section's own position, and the joint models here
 * define neither, so they are left out rather than fitted as something else.
 */
export const sharedShiftReason =
  'not fitted: a shift shared by several sections (one shift age on the common timescale, or each section its own shift position) is not defined here; only separate is fitted for shift models';

/**
 * Whether shared-offset is a distinct hypothesis for a family: with no
 * process at all (strict stasis) a common mean plus offsets is exactly
 * "every section its own mean", i.e. separate, so it is left out.
 *
 * @example
 * offsetApplies(strictStasis); // false
 * offsetApplies(randomWalk); // true
 */
export function offsetApplies(base: EvolutionModel): boolean {
  return base.process.length > 0;
}

function separateFit(base: EvolutionModel, sections: readonly Lineage[], horizons: number, options: FitOptions): Omit<HypothesisFit, 'aicc' | 'deltaAicc' | 'weight'> {
  const fits = sections.map((section) => fitModel(base, section, options));
  const parameters: Record<string, ParameterEstimate> = {};
  const estimates: Record<string, number> = {};
  const flags: string[] = [];
  fits.forEach((fit, s) => {
    const name = sections[s].section || `section ${s + 1}`;
    for (const [key, value] of Object.entries(fit.parameters)) parameters[perSectionName(key, name)] = value;
    for (const [key, value] of Object.entries(fit.estimates)) estimates[perSectionName(key, name)] = value;
    for (const flag of fit.flags) flags.push(`${name}: ${flag}`);
  });
  const failed = fits.findIndex((fit) => !fit.converged);
  let logLik = 0;
  let k = 0;
  for (const fit of fits) {
    logLik += fit.logLik;
    k += fit.k;
  }
  return {
    id: 'separate',
    model: base.id,
    label: base.label,
    k,
    horizons,
    logLik: failed >= 0 ? Number.NEGATIVE_INFINITY : logLik,
    converged: failed < 0,
    message: failed >= 0 ? `${sections[failed].section || `section ${failed + 1}`}: ${fits[failed].message}` : null,
    parameters,
    estimates,
    flags,
    sectionFits: fits,
    joint: null,
    fit: null,
    intervalMethod: [...new Set(fits.map((fit) => fit.intervalMethod))].join(' / '),
    sameFitAs: [],
  };
}

function jointFit(joint: JointModel, horizons: number, options: FitOptions): Omit<HypothesisFit, 'aicc' | 'deltaAicc' | 'weight'> {
  const fit = fitModel(joint.model, joint.lineage, options);
  return {
    id: joint.hypothesis,
    model: joint.base.id,
    label: joint.base.label,
    k: fit.k,
    horizons,
    logLik: fit.logLik,
    converged: fit.converged,
    message: fit.message,
    parameters: fit.parameters,
    estimates: fit.estimates,
    flags: fit.flags,
    sectionFits: null,
    joint,
    fit,
    intervalMethod: fit.intervalMethod,
    sameFitAs: [],
  };
}

/** The first section's reason why a model cannot be fitted to it at all (no covariate; no admissible shift position), or null. */
function sectionRefusal(base: EvolutionModel, sections: readonly Lineage[], minimumSegment: number | undefined): string | null {
  for (const [s, section] of sections.entries()) {
    const name = section.section || `section ${s + 1}`;
    const unavailable = base.unavailable?.(section) ?? null;
    if (unavailable) return `${name}: ${unavailable.replace(/^not fitted: /, '')}`;
    if (base.configurations && base.configurations(section, { minimumSegment }).length === 0) {
      return `${name}: ${section.mean.length} horizons leave no admissible shift position with segments of at least ${minimumSegment ?? defaultMinimumSegment} horizons`;
    }
  }
  return null;
}

/** Why shared-offset is not fitted for a covariate model: the merged timeline of all sections carries no covariate. */
export const offsetCovariateReason = 'not fitted: the common timeline of all sections carries no covariate here; shared-offset is defined for models without one';

/**
 * Fit, for each model family, the hypotheses that the sections record
 * - separate: every section its own parameters (logL and K are exactly the
 *   sums of the single-section fits);
 * - shared: one process for all sections, each with its own starting value
 *   (see `sharedModel`);
 * - shared-offset: one lineage on the common timescale with a constant offset
 *   per section (see `offsetModel`);
 * and rank every hypothesis × family together by AICc with N = all horizons
 * of all sections (Hurvich & Tsai 1989) and Akaike weights (Burnham &
 * Anderson 2002). Shared is nested in separate, so each family also gets a
 * likelihood-ratio test of shared against separate.
 *
 * @param sections lineages of one trait from two or more sections
 *
 * @example
 * // Strict stasis with unit sampling variances: separate means 2 and 4 fit exactly, so
 * // logL = -2 ln 2 pi - 1; shared (one mean, 3) adds residuals 4 + 0 + 1 + 1, logL = -2 ln 2 pi - 3 (closed forms).
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', trait: 'length', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] });
 * const comparison = compareSections([a, b], [strictStasis], { intervals: false });
 * comparison.hypotheses.map((h) => h.logLik); // [-4.675754132818691, -6.675754132818691] (to 1e-12; separate, shared)
 * comparison.tests[0].statistic; // 4 (to 1e-12)
 * comparison.tests[0].pValue; // 0.0455002638963584 (to 1e-12; P(chi2_1 > 4))
 * comparison.best; // { id: 'shared', model: 'strict-stasis' } (AICc 17.35 against 25.35)
 */
export function compareSections(sections: readonly Lineage[], models: readonly EvolutionModel[], options: CompareOptions = {}): TraitComparison {
  if (sections.length < 2) throw new Error('compareSections needs two or more sections');
  const horizons = sections.reduce((sum, section) => sum + section.mean.length, 0);
  let fits: Omit<HypothesisFit, 'aicc' | 'deltaAicc' | 'weight'>[] = [];
  const fitOptions: FitOptions = { intervals: options.intervals, intervalMethod: options.intervalMethod, gridPoints: options.gridPoints, minimumSegment: options.minimumSegment };
  const leftOut: LeftOutHypothesis[] = [];
  for (const base of models) {
    const refusal = sectionRefusal(base, sections, options.minimumSegment);
    if (refusal !== null) {
      // As `fit` leaves out what a lineage does not allow; a joint model would otherwise fit something else (a covariate of 0).
      leftOut.push({ id: 'every', model: base.id, reason: `not fitted: ${refusal}` });
      continue;
    }
    fits.push(separateFit(base, sections, horizons, fitOptions));
    if (base.configurations) {
      leftOut.push({ id: 'shared', model: base.id, reason: sharedShiftReason });
      if ((options.offsets ?? true) && offsetApplies(base)) leftOut.push({ id: 'shared-offset', model: base.id, reason: sharedShiftReason });
      continue;
    }
    if (base.notShared) leftOut.push({ id: 'shared', model: base.id, reason: `not fitted: ${base.notShared}` });
    else fits.push(jointFit(sharedModel(base, sections), horizons, fitOptions));
    if (!(options.offsets ?? true) || !offsetApplies(base)) continue;
    if (base.unavailable) leftOut.push({ id: 'shared-offset', model: base.id, reason: offsetCovariateReason });
    else fits.push(jointFit(offsetModel(base, sections), horizons, fitOptions));
  }
  // A hypothesis whose likelihood could not be maximised (e.g. a singular covariance) is left out with its reason, not listed as a row.
  for (const fit of fits) if (!fit.converged) leftOut.push({ id: fit.id, model: fit.model, reason: fit.message ?? 'not fitted' });
  fits = fits.filter((fit) => fit.converged);
  const criteria = fits.map((fit) => (fit.converged ? aicc(fit.logLik, fit.k, horizons) : null));
  const { delta, weight } = akaikeWeights(criteria);
  const hypotheses: HypothesisFit[] = fits.map((fit, j) => ({
    ...fit,
    aicc: criteria[j],
    deltaAicc: delta[j],
    weight: weight[j],
    message: fit.message ?? (criteria[j] === null ? `not compared: N - K - 1 = ${horizons - fit.k - 1} <= 0` : null),
    sameFitAs: criteria[j] === null ? [] : fits.filter((other, k) => k !== j && criteria[k] !== null && sameFit(fit, other)).map(candidateKey),
  }));
  const lowest = lowestCriterion(criteria);
  const best: TraitComparison['best'] = lowest === -1 ? null : { id: hypotheses[lowest].id, model: hypotheses[lowest].model };
  const bestFit = best === null ? undefined : hypotheses.find((h) => h.id === best!.id && h.model === best!.model);
  const bestGroup = bestFit ? hypotheses.filter((h) => h === bestFit || bestFit.sameFitAs.includes(candidateKey(h))).map((h) => ({ id: h.id, model: h.model })) : [];
  const tests: FamilyTest[] = [];
  for (const base of models) {
    const shared = hypotheses.find((h) => h.model === base.id && h.id === 'shared');
    const separate = hypotheses.find((h) => h.model === base.id && h.id === 'separate');
    if (!shared || !separate || !shared.converged || !separate.converged) continue;
    tests.push({ model: base.id, restricted: 'shared', full: 'separate', ...likelihoodRatioTest(shared.logLik, shared.k, separate.logLik, separate.k) });
  }
  return { trait: sections[0].trait, sections, horizons, hypotheses, best, bestGroup, tests, leftOut };
}

/**
 * "hypothesis model", the key of a hypothesis in age-draw summaries and `sameFitAs`.
 *
 * @example
 * candidateKey({ id: 'shared-offset', model: 'ou' }); // 'shared-offset ou'
 */
export function candidateKey(hypothesis: Pick<HypothesisFit, 'id' | 'model'>): string {
  return `${hypothesis.id} ${hypothesis.model}`;
}

/** The traits that can be compared, and why others were skipped. */
export interface ComparisonRun {
  readonly comparisons: readonly TraitComparison[];
  readonly skipped: readonly { trait: string; reason: string }[];
}

/**
 * Group lineages by trait (order of first appearance).
 *
 * @example
 * const length = (section) => lineageFromArrays({ section, trait: 'length', time: [0, 1], mean: [1, 2], samplingVariance: [1, 1] });
 * const width = lineageFromArrays({ section: 'A', trait: 'width', time: [0, 1], mean: [1, 2], samplingVariance: [1, 1] });
 * const groups = lineagesByTrait([length('A'), width, length('B')]);
 * [...groups.keys()]; // ['length', 'width']
 * groups.get('length').map((lineage) => lineage.section); // ['A', 'B']
 */
export function lineagesByTrait(lineages: readonly Lineage[]): Map<string, Lineage[]> {
  const groups = new Map<string, Lineage[]>();
  for (const lineage of lineages) {
    const group = groups.get(lineage.trait);
    if (group) group.push(lineage);
    else groups.set(lineage.trait, [lineage]);
  }
  return groups;
}

/**
 * {@link compareSections} for every trait measured in two or more sections.
 *
 * @example
 * const length = (section, mean) => lineageFromArrays({ section, trait: 'length', time: [0, 1], mean, samplingVariance: [1, 1] });
 * const width = lineageFromArrays({ section: 'A', trait: 'width', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const run = compareTraits([length('A', [1, 3]), width, length('B', [4, 4])], [strictStasis], { intervals: false });
 * run.comparisons.map((comparison) => comparison.trait); // ['length']
 * run.skipped; // [{ trait: 'width', reason: 'measured in one section only (A); nothing to compare' }]
 */
export function compareTraits(lineages: readonly Lineage[], models: readonly EvolutionModel[], options: CompareOptions = {}): ComparisonRun {
  const comparisons: TraitComparison[] = [];
  const skipped: { trait: string; reason: string }[] = [];
  for (const [trait, sections] of lineagesByTrait(lineages)) {
    if (sections.length < 2) {
      skipped.push({ trait, reason: `measured in one section only (${sections[0].section || 'unnamed'}); nothing to compare` });
      continue;
    }
    comparisons.push(compareSections(sections, models, options));
  }
  return { comparisons, skipped };
}
