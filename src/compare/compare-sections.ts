import { fitModel, type FitOptions, type ModelFit, type ParameterEstimate } from '../fit/fit-model.js';
import { aicc, akaikeWeights } from '../fit/model-choice.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
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
  readonly hypotheses: readonly HypothesisFit[];
  /** The lowest-AICc hypothesis, or null when none was compared. */
  readonly best: { id: HypothesisId; model: string } | null;
  readonly tests: readonly FamilyTest[];
}

/** Options of {@link compareSections}. */
export interface CompareOptions extends FitOptions {
  /** Also fit shared-offset (default true). */
  offsets?: boolean;
}

/**
 * Whether shared-offset is a distinct hypothesis for a family: with no
 * process at all (strict stasis) a common mean plus offsets is exactly
 * "every section its own mean", i.e. separate, so it is left out.
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
  };
}

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
 */
export function compareSections(sections: readonly Lineage[], models: readonly EvolutionModel[], options: CompareOptions = {}): TraitComparison {
  if (sections.length < 2) throw new Error('compareSections needs two or more sections');
  const horizons = sections.reduce((sum, section) => sum + section.mean.length, 0);
  const fits: Omit<HypothesisFit, 'aicc' | 'deltaAicc' | 'weight'>[] = [];
  const fitOptions: FitOptions = { intervals: options.intervals, gridPoints: options.gridPoints };
  for (const base of models) {
    fits.push(separateFit(base, sections, horizons, fitOptions));
    fits.push(jointFit(sharedModel(base, sections), horizons, fitOptions));
    if ((options.offsets ?? true) && offsetApplies(base)) fits.push(jointFit(offsetModel(base, sections), horizons, fitOptions));
  }
  const criteria = fits.map((fit) => (fit.converged ? aicc(fit.logLik, fit.k, horizons) : null));
  const { delta, weight } = akaikeWeights(criteria);
  const hypotheses: HypothesisFit[] = fits.map((fit, j) => ({
    ...fit,
    aicc: criteria[j],
    deltaAicc: delta[j],
    weight: weight[j],
    message: fit.message ?? (criteria[j] === null ? `not compared: N - K - 1 = ${horizons - fit.k - 1} <= 0` : null),
  }));
  let best: TraitComparison['best'] = null;
  let lowest = Number.POSITIVE_INFINITY;
  for (const hypothesis of hypotheses) {
    if (hypothesis.aicc !== null && hypothesis.aicc < lowest) {
      lowest = hypothesis.aicc;
      best = { id: hypothesis.id, model: hypothesis.model };
    }
  }
  const tests: FamilyTest[] = [];
  for (const base of models) {
    const shared = hypotheses.find((h) => h.model === base.id && h.id === 'shared');
    const separate = hypotheses.find((h) => h.model === base.id && h.id === 'separate');
    if (!shared || !separate || !shared.converged || !separate.converged) continue;
    tests.push({ model: base.id, restricted: 'shared', full: 'separate', ...likelihoodRatioTest(shared.logLik, shared.k, separate.logLik, separate.k) });
  }
  return { trait: sections[0].trait, sections, horizons, hypotheses, best, tests };
}

/** The traits that can be compared, and why others were skipped. */
export interface ComparisonRun {
  readonly comparisons: readonly TraitComparison[];
  readonly skipped: readonly { trait: string; reason: string }[];
}

/** Group lineages by trait (order of first appearance). */
export function lineagesByTrait(lineages: readonly Lineage[]): Map<string, Lineage[]> {
  const groups = new Map<string, Lineage[]>();
  for (const lineage of lineages) {
    const group = groups.get(lineage.trait);
    if (group) group.push(lineage);
    else groups.set(lineage.trait, [lineage]);
  }
  return groups;
}

/** {@link compareSections} for every trait measured in two or more sections. */
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
