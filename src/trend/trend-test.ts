import type { LineageFit, RankedFit } from '../fit/fit-lineage.js';
import { LikelihoodEvaluator } from '../fit/evaluator.js';
import { fitModel } from '../fit/fit-model.js';
import { restrictedEstimates } from '../fit/intervals.js';
import { aicc, lowestCriterion } from '../fit/model-choice.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { findModel } from '../models/registry.js';
import { designLineage, designOf } from '../simulate/design.js';
import { createRandom } from '../random/random.js';
import { replicateSeed } from '../random/seeds.js';
import { simulateMeans, withMeans } from '../random/simulate-lineage.js';

/** The models that make the null "no directional change" (MODELS.md ids). */
export const nonDirectionalModels: readonly string[] = ['random-walk', 'stasis', 'strict-stasis'];

/** The model whose drift is tested. */
export const directionalModel = 'directional-walk';

/** The method, in the words every output uses. */
export const trendTestMethod = 'null-variance Wald statistic of drift (step variance from the random walk\'s REML fit), parametric bootstrap from the REML-fitted non-directional models, sequential Monte Carlo p-value';

/** Options of {@link trendTest}; every field has a default. */
export interface TrendTestOptions {
  /** Level of the test (default 0.05); `supported` is p_value < level. */
  readonly level?: number;
  /** Seed (default 1); each replicate's stream depends on (seed, generator, index) only. */
  readonly seed?: number;
  /** Besag–Clifford stopping count h: stop once h replicates reach the observed statistic (default 10). */
  readonly exceedances?: number;
  /** Most replicates per null generator (default 199: smallest p-value 1/200). */
  readonly maxReplicates?: number;
  /** Fewest replicates from the fitted null, for `aicc_false_trend_rate` (default 99). */
  readonly rateReplicates?: number;
  /**
   * Factors applied to the random walk's REML step variance, one bootstrap
   * each; the p-value is the largest (default [1, 3]).
   */
  readonly varianceFactors?: readonly number[];
  /** 'score' (default): {@link nullVarianceWald}; 'ratio': the ML likelihood ratio {@link trendStatistic} (kept for the calibration benchmark, where it is too liberal). */
  readonly statistic?: 'score' | 'ratio';
  /** Model ids the user's AICc table compares (default the classic five); the false-trend rate uses those of the classic five among them. */
  readonly models?: readonly string[];
}

/** The trend verdict of one lineage: plain data, written as fit.json's `trend_test`. */
export interface TrendTest {
  readonly method: string;
  /** Observed statistic: the null-variance Wald statistic W0 ({@link nullVarianceWald}), or with `statistic: 'ratio'` the likelihood ratio {@link trendStatistic}. */
  readonly statistic: number | null;
  readonly p_value: number | null;
  readonly level: number;
  /** p_value < level. */
  readonly supported: boolean;
  /** Sign of the directional walk's drift when the trend is supported, else null. */
  readonly direction: 'increase' | 'decrease' | null;
  /** Replicates simulated for the p-value (over every null generator). */
  readonly replicates: number;
  readonly seed: number;
  /** Share of replicates from the fitted null in which AICc alone ranks the directional walk first. */
  readonly aicc_false_trend_rate: number | null;
  /** Share of the same replicates in which AICc ranks ou first (null when ou is not compared). */
  readonly aicc_ou_rate: number | null;
  /** Replicates the two rates are computed from. */
  readonly rate_replicates: number;
  /** The best non-directional model by AICc: the fitted null the rates are simulated from. */
  readonly null_model: string | null;
  /** p-value under each fitted null generator (the reported p_value is the largest). */
  readonly p_by_null: Readonly<Record<string, number>>;
  /** Why there is no verdict (too few horizons, a model not fitted...), else null. */
  readonly note: string | null;
}

/** One simulated replicate: the statistic and which model AICc ranked first. */
interface ReplicateOutcome {
  readonly statistic: number | null;
  readonly best: string | null;
}

const fitted = (model: RankedFit | undefined): model is RankedFit =>
  model !== undefined && model.converged && Number.isFinite(model.logLik) && Object.values(model.estimates).every(Number.isFinite);

/**
 * T = 2 (logL_directional - max over the non-directional models of logL).
 * The directional walk nests the random walk and strict stasis, not stasis,
 * so T may be negative; the bootstrap needs no sign.
 *
 * @example
 * trendStatistic({ 'directional-walk': -3, 'random-walk': -5, stasis: -4 }); // 2 (2 × (-3 - (-4)))
 * trendStatistic({ 'directional-walk': null, stasis: -4 }); // null
 */
export function trendStatistic(logLik: Readonly<Record<string, number | null | undefined>>): number | null {
  const full = logLik[directionalModel];
  if (full === null || full === undefined || !Number.isFinite(full)) return null;
  let reduced = Number.NEGATIVE_INFINITY;
  for (const id of nonDirectionalModels) {
    const value = logLik[id];
    if (value !== null && value !== undefined && Number.isFinite(value)) reduced = Math.max(reduced, value);
  }
  return Number.isFinite(reduced) ? 2 * (full - reduced) : null;
}

/**
 * The null-variance Wald (score-type) statistic of drift: the step
 * variance estimated under the null, by the random walk's restricted
 * likelihood (REML), held fixed; the drift by GLS at that variance and
 * W0 = drift² / Var(drift). The variance cannot collapse to 0 under the
 * alternative, the cause of the heavy null tails of the ML ratio and of
 * the directional walk's own REML Wald statistic on short walks.
 *
 * @example
 * // Nearly exact means: increments 1, 2, 1 are independent N(drift, s), so drift = 4/3, the walk's REML s = (1 + 4 + 1) / 3 = 2,
 * // Var(drift) = s / 3 and W0 = (16/9) / (2/3) = 8/3 (closed form).
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [1e-12, 1e-12, 1e-12, 1e-12] });
 * nullVarianceWald(lineage).statistic; // 2.6666666667 (to 1e-9; 8/3)
 * nullVarianceWald(lineage).drift; // 1.3333333333 (to 1e-9; 4/3)
 */
export function nullVarianceWald(lineage: Lineage): { statistic: number; drift: number } | null {
  const walk = modelById('random-walk');
  const stepVariance = restrictedEstimates(new LikelihoodEvaluator(walk, lineage)).step_variance;
  const model = modelById(directionalModel);
  const evaluator = new LikelihoodEvaluator(model, lineage);
  const process = model.processFrom({ step_variance: stepVariance }, lineage);
  const details = evaluator.details(process);
  const { index } = model.fixLocation('drift', 0, process, lineage);
  const width = details.coefficients.length;
  const variance = details.coefficientCovariance[index * width + index];
  const drift = details.coefficients[index];
  if (!Number.isFinite(details.logLik) || !(variance > 0) || !Number.isFinite(drift)) return null;
  return { statistic: (drift * drift) / variance, drift };
}

function modelById(id: string): EvolutionModel {
  const model = findModel(id);
  if (!model) throw new Error(`unknown model "${id}"`);
  return model;
}

/**
 * Simulate one data set from `generator` at `parameters` on the lineage's
 * design, fit the test's models, and return T; with `compared`, also fit the
 * other models of the user's table (ou on a 16-point grid, for speed: only
 * its AICc rank is used) and return the AICc winner among `compared`.
 */
function replicate(design: Lineage, generator: string, parameters: Record<string, number>, models: readonly EvolutionModel[], compared: readonly string[] | null, seed: number, kind: 'score' | 'ratio'): ReplicateOutcome {
  const random = createRandom(seed);
  const lineage = withMeans(design, simulateMeans(modelById(generator), design, parameters, random));
  const logLik: Record<string, number | null> = {};
  const size = lineage.mean.length;
  const criteria: (number | null)[] = [];
  if (kind === 'ratio' || compared !== null) {
    for (const model of models) {
      const fit = fitModel(model, lineage, { intervals: false });
      logLik[model.id] = fit.converged && Number.isFinite(fit.logLik) ? fit.logLik : null;
    }
  }
  const statistic = kind === 'ratio' ? trendStatistic(logLik) : (nullVarianceWald(lineage)?.statistic ?? null);
  if (compared === null) return { statistic, best: null };
  for (const id of compared) {
    if (!(id in logLik)) {
      const fit = fitModel(modelById(id), lineage, { intervals: false, gridPoints: 16 });
      logLik[id] = fit.converged && Number.isFinite(fit.logLik) ? fit.logLik : null;
    }
    const value = logLik[id];
    criteria.push(value === null ? null : aicc(value, modelById(id).parameterCount(lineage), size));
  }
  const lowest = lowestCriterion(criteria);
  return { statistic, best: lowest === -1 ? null : compared[lowest] };
}

/**
 * The parameters a null generator draws from: its restricted (REML) fit
 * (Patterson & Thompson 1971). The ML step variance of a short walk is
 * biased low, often to 0, and the statistic's null distribution grows
 * with the step variance, so a bootstrap from the ML fit rejects too often.
 */
function generatorParameters(generator: string, lineage: Lineage): Record<string, number> {
  return restrictedEstimates(new LikelihoodEvaluator(modelById(generator), lineage));
}

/** Stream number of each generator in the replicate seeds (fixed, so a seed means the same draws in every version of the model list). */
const streamOf: Readonly<Record<string, number>> = { 'random-walk': 151, stasis: 152, 'strict-stasis': 153 };

/**
 * Sequential Monte Carlo p-value of Besag & Clifford (1991): draw
 * replicates one at a time and stop at the h-th replicate whose statistic
 * reaches the observed one; then p = h / L (L replicates drawn). Without h
 * such replicates in `most` draws, p = (g + 1) / (most + 1) with g of them.
 * Replicates whose statistic could not be computed are skipped (not counted).
 *
 * Besag, J. & Clifford, P. (1991). Sequential Monte Carlo p-values.
 * Biometrika 78:301-304.
 *
 * @example
 * sequentialPValue(() => 1, 0.5, 10, 99); // { p: 1, drawn: 10 } (ten draws, each at least 0.5: stop at h = 10)
 * sequentialPValue(() => 0, 0.5, 10, 99); // { p: 0.01, drawn: 99 } (none reached 0.5: (0 + 1) / (99 + 1))
 */
export function sequentialPValue(draw: (index: number) => number | null, observed: number, exceedances: number, most: number): { p: number; drawn: number } {
  let reached = 0;
  let drawn = 0;
  for (let index = 0; drawn < most && index < most * 2; index++) {
    const value = draw(index);
    if (value === null) continue;
    drawn++;
    // A tiny relative tolerance: refits of a replicate equal to the data must count as reaching it.
    if (value >= observed - 1e-9 * Math.max(1, Math.abs(observed))) reached++;
    if (reached >= exceedances) return { p: reached / drawn, drawn };
  }
  return { p: (reached + 1) / (drawn + 1), drawn };
}

/**
 * The trend verdict of one fitted lineage: is there directional change?
 *
 * Statistic: W0 = drift² / Var(drift) by GLS under the directional walk with
 * the step variance held at the random walk's REML estimate
 * ({@link nullVarianceWald}); large |drift| in either direction counts.
 * Null distribution: parametric bootstrap (Davison & Hinkley 1997, ch. 4)
 * on the lineage's own times and sampling variances, from the REML fit of
 * the random walk at its step variance and at `varianceFactors` times it,
 * and from the best non-directional model by AICc (random walk, stasis,
 * strict stasis) when that is another one; the reported p-value is the
 * largest, so the test keeps its level whichever of them is true and when
 * the step variance is underestimated (W0's null distribution grows with
 * the step variance; measured in bench/trend-calibration.ts). Each p-value
 * is the sequential one of Besag & Clifford (1991), so clear cases stop
 * early. `aicc_false_trend_rate` is the share of replicates from the best
 * non-directional model in which AICc alone ranks the directional walk
 * first among the user's models (at least `rateReplicates` drawn).
 *
 * Pure: no files, no printing; the same seed gives the same result on any
 * thread. Returns a verdict with `note` set (and no p-value) when the
 * directional walk or every non-directional model is missing or not
 * fitted, e.g. too few horizons.
 *
 * Besag, J. & Clifford, P. (1991). Sequential Monte Carlo p-values.
 * Biometrika 78:301-304. Davison, A. C. & Hinkley, D. V. (1997). Bootstrap
 * Methods and their Application. Cambridge University Press. Patterson,
 * H. D. & Thompson, R. (1971). Biometrika 58:545-554 (REML).
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5, 6, 7], mean: [0, 1.1, 1.9, 3.2, 3.9, 5.1, 6, 7.2], samplingVariance: Array(8).fill(0.01) });
 * const test = trendTest(fitLineage(lineage, classicModels, { intervals: false }), { seed: 1, maxReplicates: 19, rateReplicates: 9 });
 * test.p_value; // 0.05 (no replicate reached the observed statistic: (0 + 1) / (19 + 1), the smallest p of 19 replicates)
 * test.null_model; // 'random-walk'
 */
export function trendTest(fit: LineageFit, options: TrendTestOptions = {}): TrendTest {
  const level = options.level ?? 0.05;
  const seed = options.seed ?? 1;
  const exceedances = options.exceedances ?? 10;
  const most = options.maxReplicates ?? 199;
  const rateMinimum = options.rateReplicates ?? 99;
  const userModels = options.models ?? fit.models.map((model) => model.id);
  const byId = new Map(fit.models.map((model) => [model.id, model]));
  const empty = (note: string, statistic: number | null = null): TrendTest => ({
    method: trendTestMethod, statistic, p_value: null, level, supported: false, direction: null, replicates: 0, seed,
    aicc_false_trend_rate: null, aicc_ou_rate: null, rate_replicates: 0, null_model: null, p_by_null: {}, note,
  });
  const full = byId.get(directionalModel);
  if (full === undefined) return empty('no trend test: the directional walk is not among the models fitted (add directional-walk to --models to test for a trend)');
  if (!fitted(full) || full.aicc === null) return empty(`no trend test: the directional walk was not fitted or not compared${full.message ? ` (${full.message})` : ''}`);
  const nulls = nonDirectionalModels.map((id) => byId.get(id)).filter(fitted);
  if (nulls.length === 0) return empty('no trend test: no non-directional model was fitted');
  const logLik: Record<string, number> = {};
  for (const model of [full, ...nulls]) logLik[model.id] = model.logLik;
  const kind = options.statistic ?? 'score';
  const wald = kind === 'score' ? nullVarianceWald(fit.lineage) : null;
  if (kind === 'score' && wald === null) return empty('no trend test: the drift could not be estimated at the random walk\'s restricted step variance (singular covariance?)');
  const statistic = kind === 'score' ? wald!.statistic : trendStatistic(logLik)!;
  const criteria = nulls.map((model) => model.aicc);
  const bestNull = lowestCriterion(criteria) === -1 ? nulls[0] : nulls[lowestCriterion(criteria)];
  // The random walk is drawn at its REML step variance and at `varianceFactors` times it; the best non-directional model at its REML fit.
  const factors = options.varianceFactors ?? [1, 3];
  const generators: { key: string; model: string; factor: number; stream: number }[] = [];
  if (nulls.some((model) => model.id === 'random-walk')) {
    factors.forEach((factor, k) => generators.push({ key: factor === 1 ? 'random-walk' : `random-walk (step variance × ${Number(factor.toPrecision(3))})`, model: 'random-walk', factor, stream: streamOf['random-walk'] + 10 * k }));
  }
  if (bestNull.id !== 'random-walk') generators.push({ key: bestNull.id, model: bestNull.id, factor: 1, stream: streamOf[bestNull.id] });
  const rateKey = bestNull.id;
  // Replicates fit the test's models, plus ou when the user's table compares it (for the rates).
  const testIds = [directionalModel, ...nulls.map((model) => model.id)];
  const compared = ['strict-stasis', 'stasis', 'random-walk', 'directional-walk', 'ou'].filter((id) => userModels.includes(id) && (id === 'ou' ? byId.get('ou')?.aicc !== null && byId.get('ou') !== undefined : testIds.includes(id)));
  const models = testIds.map(modelById);
  const design = designLineage(designOf(fit.lineage));
  const pByNull: Record<string, number> = {};
  let replicates = 0;
  let rateBest: (string | null)[] = [];
  for (const generator of generators) {
    const parameters = generatorParameters(generator.model, fit.lineage);
    if (generator.factor !== 1) parameters.step_variance *= generator.factor;
    const forRates = generator.key === rateKey;
    const outcomes: ReplicateOutcome[] = [];
    const draw = (index: number): ReplicateOutcome => {
      if (outcomes[index] === undefined) outcomes[index] = replicate(design, generator.model, parameters, models, forRates && index < rateMinimum ? compared : null, replicateSeed(seed, generator.stream, index), kind);
      return outcomes[index];
    };
    const result = sequentialPValue((index) => draw(index).statistic, statistic, exceedances, most);
    pByNull[generator.key] = result.p;
    if (forRates) {
      for (let index = outcomes.length; index < rateMinimum; index++) draw(index);
      rateBest = outcomes.map((outcome) => outcome.best);
    }
    replicates += outcomes.length;
  }
  const p = Math.max(...Object.values(pByNull));
  const counted = rateBest.filter((best) => best !== null);
  const share = (id: string): number | null => (counted.length === 0 ? null : counted.filter((best) => best === id).length / counted.length);
  const supported = p < level;
  const drift = wald ? wald.drift : full.estimates.drift;
  return {
    method: trendTestMethod,
    statistic,
    p_value: p,
    level,
    supported,
    direction: supported && drift !== 0 ? (drift > 0 ? 'increase' : 'decrease') : null,
    replicates,
    seed,
    aicc_false_trend_rate: compared.includes(directionalModel) ? share(directionalModel) : null,
    aicc_ou_rate: compared.includes('ou') ? share('ou') : null,
    rate_replicates: counted.length,
    null_model: bestNull.id,
    p_by_null: pByNull,
    note: null,
  };
}
