import type { LineageFit, RankedFit } from '../fit/fit-lineage.js';
import { LikelihoodEvaluator } from '../fit/evaluator.js';
import { fitModel } from '../fit/fit-model.js';
import { restrictedEstimates } from '../fit/intervals.js';
import { aicc, lowestCriterion } from '../fit/model-choice.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { findModel } from '../models/registry.js';
import { designLineage, designOf } from '../simulate/design.js';
import { createRandom } from '../simulate/random.js';
import { replicateSeed } from '../simulate/seeds.js';
import { simulateMeans, withMeans } from '../simulate/simulate-lineage.js';

/** The models that make the null "no directional change" (MODELS.md ids). */
export const nonDirectionalModels: readonly string[] = ['random-walk', 'stasis', 'strict-stasis'];

/** The model whose drift is tested. */
export const directionalModel = 'directional-walk';

/** The method, in the words every output uses. */
export const trendTestMethod = 'parametric bootstrap of the likelihood ratio, directional walk against the best non-directional model, sequential Monte Carlo p-value';

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
  /** Model ids the user's AICc table compares (default the classic five); the false-trend rate uses those of the classic five among them. */
  readonly models?: readonly string[];
}

/** The trend verdict of one lineage: plain data, written as fit.json's `trend_test`. */
export interface TrendTest {
  readonly method: string;
  /** Observed T = 2 (logL_directional - max logL over the non-directional models); may be negative. */
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
function replicate(design: Lineage, generator: string, parameters: Record<string, number>, models: readonly EvolutionModel[], compared: readonly string[] | null, seed: number): ReplicateOutcome {
  const random = createRandom(seed);
  const lineage = withMeans(design, simulateMeans(modelById(generator), design, parameters, random));
  const logLik: Record<string, number | null> = {};
  const size = lineage.mean.length;
  const criteria: (number | null)[] = [];
  for (const model of models) {
    const fit = fitModel(model, lineage, { intervals: false });
    logLik[model.id] = fit.converged && Number.isFinite(fit.logLik) ? fit.logLik : null;
  }
  const statistic = trendStatistic(logLik);
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
 * sequentialPValue(() => 1, 0.5, 10, 99); // { p: 1, drawn: 10 }: ten draws, each at least 0.5
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
 * Statistic: T = 2 (logL_directional-walk - max logL over random-walk,
 * stasis and strict-stasis) on the data. Null distribution: parametric
 * bootstrap (Davison & Hinkley 1997, ch. 4) from the fitted random walk and
 * from the best non-directional model by AICc when that is another one
 * (replicates on the lineage's own times and sampling variances, every
 * model refitted); the reported p-value is the larger of the two, so the
 * test keeps its level whichever of the non-directional models is true.
 * Each p-value is the sequential one of Besag & Clifford (1991), so clear
 * cases stop early. `aicc_false_trend_rate` is the share of replicates
 * from the best non-directional model in which AICc alone ranks the
 * directional walk first (at least `rateReplicates` of them are drawn).
 *
 * Pure: no files, no printing; the same seed gives the same result on any
 * thread. Returns a verdict with `note` set (and no p-value) when the
 * directional walk or every non-directional model is missing or not
 * fitted, e.g. too few horizons.
 *
 * Besag, J. & Clifford, P. (1991). Sequential Monte Carlo p-values.
 * Biometrika 78:301-304. Davison, A. C. & Hinkley, D. V. (1997). Bootstrap
 * Methods and their Application. Cambridge University Press.
 *
 * @example
 * trendTest(fitLineage(lineage, classicModels, { intervals: false }), { seed: 1 }).p_value; // e.g. 0.37
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
  if (!fitted(full) || full.aicc === null) return empty('no trend test: the directional walk was not fitted or not compared (too few horizons?)');
  const nulls = nonDirectionalModels.map((id) => byId.get(id)).filter(fitted);
  if (nulls.length === 0) return empty('no trend test: no non-directional model was fitted');
  const logLik: Record<string, number> = {};
  for (const model of [full, ...nulls]) logLik[model.id] = model.logLik;
  const statistic = trendStatistic(logLik)!;
  const criteria = nulls.map((model) => model.aicc);
  const bestNull = lowestCriterion(criteria) === -1 ? nulls[0] : nulls[lowestCriterion(criteria)];
  const generators = [...new Set([...(nulls.some((model) => model.id === 'random-walk') ? ['random-walk'] : []), bestNull.id])];
  // Replicates fit the test's models, plus ou when the user's table compares it (for the rates).
  const testIds = [directionalModel, ...nulls.map((model) => model.id)];
  const compared = ['strict-stasis', 'stasis', 'random-walk', 'directional-walk', 'ou'].filter((id) => userModels.includes(id) && (id === 'ou' ? byId.get('ou')?.aicc !== null && byId.get('ou') !== undefined : testIds.includes(id)));
  const models = testIds.map(modelById);
  const design = designLineage(designOf(fit.lineage));
  const pByNull: Record<string, number> = {};
  let replicates = 0;
  let rateBest: (string | null)[] = [];
  for (const generator of generators) {
    // Drawn from the restricted (REML) fit: the ML step variance of a short walk is biased low, often to 0, which made the bootstrap too liberal.
    const parameters = restrictedEstimates(new LikelihoodEvaluator(modelById(generator), fit.lineage));
    const outcomes: ReplicateOutcome[] = [];
    const draw = (index: number): ReplicateOutcome => {
      if (outcomes[index] === undefined) outcomes[index] = replicate(design, generator, parameters, models, generator === bestNull.id && index < rateMinimum ? compared : null, replicateSeed(seed, streamOf[generator], index));
      return outcomes[index];
    };
    const result = sequentialPValue((index) => draw(index).statistic, statistic, exceedances, most);
    pByNull[generator] = result.p;
    if (generator === bestNull.id) {
      for (let index = outcomes.length; index < rateMinimum; index++) draw(index);
      rateBest = outcomes.map((outcome) => outcome.best);
    }
    replicates += outcomes.length;
  }
  const p = Math.max(...Object.values(pByNull));
  const counted = rateBest.filter((best) => best !== null);
  const share = (id: string): number | null => (counted.length === 0 ? null : counted.filter((best) => best === id).length / counted.length);
  const supported = p < level;
  const drift = full.estimates.drift;
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
