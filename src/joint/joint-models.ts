import type { JointData, VectorDynamics } from './vector-filter.js';

/**
 * The eight joint models of several traits of one lineage (issue 17).
 * k traits; t from the group's oldest horizon; W a Brownian motion with step
 * covariance R per time unit; x_ij = z_j(t_i) + sampling error.
 *
 * - walks: z(t) = a (+ drift t) + W(t), so Cov(z(t), z(s)) = R min(t, s);
 * - stasis: z(t_i) independent N(theta, Sigma) at every horizon;
 * - ou: dz_j = -alpha_j (z_j - optimum_j) dt + dW_j, z(0) = a, so
 *   E z_j(t) = optimum_j + (a_j - optimum_j) exp(-alpha_j t) and
 *   Cov(z_j(t), z_l(s)) = R_jl exp(-alpha_j t - alpha_l s) (exp((alpha_j + alpha_l) min(t, s)) - 1) / (alpha_j + alpha_l)
 *   (the multivariate Ornstein–Uhlenbeck process with diagonal drift
 *   matrix: Bartoszek, Pienaar, Mostad, Andersson & Hansen 2012, J. Theor.
 *   Biol. 314:204-215; for fossil series Voje 2023, Paleobiology 49:747-764).
 *
 * "independent" models have a diagonal R (or Sigma), "correlated" ones a full
 * one, estimated through its Cholesky factor with a log diagonal.
 */
export type JointModelId =
  | 'independent-random-walks'
  | 'correlated-random-walk'
  | 'independent-directional-walks'
  | 'correlated-directional-walk'
  | 'independent-stasis'
  | 'correlated-stasis'
  | 'independent-ou'
  | 'correlated-ou';

/** One joint model: its structure; the fitting code in `fit-joint.ts` reads nothing else. */
export interface JointModel {
  readonly id: JointModelId;
  readonly label: string;
  /** One line for `--help` and the report. */
  readonly summary: string;
  /** Mean: a constant (ancestral mean or stasis mean), a + drift t, or the ou approach. */
  readonly mean: 'constant' | 'drift' | 'ou';
  /** Latent process: Brownian walk, independent stasis draws, or ou. */
  readonly process: 'walk' | 'stasis' | 'ou';
  /** Full (true) or diagonal (false) step / stasis covariance. */
  readonly correlated: boolean;
}

export const jointModels: readonly JointModel[] = [
  { id: 'independent-random-walks', label: 'Independent random walks', summary: 'each trait an unbiased random walk from its ancestral mean; steps uncorrelated (R diagonal)', mean: 'constant', process: 'walk', correlated: false },
  { id: 'correlated-random-walk', label: 'Correlated random walk', summary: 'one multivariate unbiased random walk; steps of the traits correlated (R full)', mean: 'constant', process: 'walk', correlated: true },
  { id: 'independent-directional-walks', label: 'Independent directional walks', summary: 'each trait a random walk with its own drift; steps uncorrelated', mean: 'drift', process: 'walk', correlated: false },
  { id: 'correlated-directional-walk', label: 'Correlated directional walk', summary: 'a multivariate random walk with a drift per trait; steps correlated', mean: 'drift', process: 'walk', correlated: true },
  { id: 'independent-stasis', label: 'Independent stasis', summary: 'each trait fluctuates about its own stasis mean; fluctuations uncorrelated (Sigma diagonal)', mean: 'constant', process: 'stasis', correlated: false },
  { id: 'correlated-stasis', label: 'Correlated stasis', summary: 'the traits fluctuate together about their stasis means (Sigma full)', mean: 'constant', process: 'stasis', correlated: true },
  { id: 'independent-ou', label: 'Independent Ornstein–Uhlenbeck', summary: 'each trait approaches its own optimum at its own rate alpha; steps uncorrelated', mean: 'ou', process: 'ou', correlated: false },
  { id: 'correlated-ou', label: 'Correlated Ornstein–Uhlenbeck', summary: 'each trait approaches its own optimum at its own rate alpha; steps correlated (R full)', mean: 'ou', process: 'ou', correlated: true },
];

/**
 * The joint model of an id, or undefined.
 *
 * @example
 * jointModel('correlated-ou').label; // 'Correlated Ornstein–Uhlenbeck'
 * jointModel('ou'); // undefined
 */
export function jointModel(id: string): JointModel | undefined {
  return jointModels.find((model) => model.id === id);
}

/**
 * Location parameters per trait: 1 (a or theta), 2 (a and drift; a and optimum).
 *
 * @example
 * locationsPerTrait(jointModel('independent-random-walks')); // 1 (the ancestral mean)
 * locationsPerTrait(jointModel('correlated-ou')); // 2 (the ancestral mean and the optimum)
 */
export function locationsPerTrait(model: JointModel): number {
  return model.mean === 'constant' ? 1 : 2;
}

/**
 * Covariance parameters: k (diagonal) or k(k+1)/2 (full).
 *
 * @example
 * covarianceParameterCount(jointModel('correlated-ou'), 3); // 6 (3 × 4 / 2)
 * covarianceParameterCount(jointModel('independent-ou'), 3); // 3
 */
export function covarianceParameterCount(model: JointModel, k: number): number {
  return model.correlated ? (k * (k + 1)) / 2 : k;
}

/**
 * K, the number of estimated parameters: location + covariance (+ k alphas for ou).
 *
 * @example
 * parameterCount(jointModel('correlated-ou'), 2); // 9 (2 × 2 locations + 3 covariances + 2 alphas)
 */
export function parameterCount(model: JointModel, k: number): number {
  return k * locationsPerTrait(model) + covarianceParameterCount(model, k) + (model.process === 'ou' ? k : 0);
}

/**
 * The design columns (N × k each, horizon-major), trait by trait: the
 * constant (a_j or theta_j), then drift_j t, or for ou exp(-alpha_j t)
 * (a_j) and 1 - exp(-alpha_j t) (optimum_j).
 *
 * @example
 * jointDesign(jointModel('independent-directional-walks'), { traits: 1, time: Float64Array.of(0, 1, 2) }, null); // [Float64Array.of(1, 1, 1), Float64Array.of(0, 1, 2)] (the constant, then t)
 */
export function jointDesign(model: JointModel, data: JointData, alpha: readonly number[] | null): Float64Array[] {
  const k = data.traits;
  const horizons = data.time.length;
  const columns: Float64Array[] = [];
  for (let j = 0; j < k; j++) {
    const first = new Float64Array(horizons * k);
    const second = model.mean === 'constant' ? null : new Float64Array(horizons * k);
    for (let i = 0; i < horizons; i++) {
      const t = data.time[i];
      if (model.mean === 'ou') {
        const decay = Math.exp(-(alpha as readonly number[])[j] * t);
        first[i * k + j] = decay;
        (second as Float64Array)[i * k + j] = -Math.expm1(-(alpha as readonly number[])[j] * t);
      } else {
        first[i * k + j] = 1;
        if (second) second[i * k + j] = t;
      }
    }
    columns.push(first);
    if (second) columns.push(second);
  }
  return columns;
}

/**
 * The state-space dynamics of a model at a k × k covariance (R for the walks
 * and ou, Sigma for stasis; row-major) and, for ou, the alphas.
 * Walks: phi = 1, Q_i = R tau_i; ou: phi_j = exp(-alpha_j tau_i),
 * Q_jl = R_jl (1 - exp(-(alpha_j + alpha_l) tau_i)) / (alpha_j + alpha_l);
 * stasis: phi = 0, Q_i = Sigma (also at the first horizon).
 *
 * @example
 * const dynamics = jointDynamics(jointModel('correlated-random-walk'), { traits: 2, time: Float64Array.of(0, 2) }, Float64Array.of(1, 0.5, 0.5, 2), null);
 * Array.from(dynamics.process.subarray(4)); // [2, 1, 1, 4] (Q_1 = R tau, tau = 2)
 * Array.from(dynamics.transition); // [0, 0, 1, 1]
 */
export function jointDynamics(model: JointModel, data: JointData, covariance: Float64Array, alpha: readonly number[] | null): VectorDynamics {
  const k = data.traits;
  const horizons = data.time.length;
  const transition = new Float64Array(horizons * k);
  const process = new Float64Array(horizons * k * k);
  for (let i = 0; i < horizons; i++) {
    if (model.process === 'stasis') {
      process.set(covariance, i * k * k);
      continue;
    }
    if (i === 0) continue;
    const tau = data.time[i] - data.time[i - 1];
    for (let j = 0; j < k; j++) {
      transition[i * k + j] = model.process === 'ou' ? Math.exp(-(alpha as readonly number[])[j] * tau) : 1;
      for (let l = 0; l < k; l++) {
        let factor = tau;
        if (model.process === 'ou') {
          const rate = (alpha as readonly number[])[j] + (alpha as readonly number[])[l];
          factor = rate > 0 ? -Math.expm1(-rate * tau) / rate : tau;
        }
        process[i * k * k + j * k + l] = covariance[j * k + l] * factor;
      }
    }
  }
  return { transition, process };
}

/**
 * Mean and covariance of the latent trait means at every (horizon, trait),
 * written straight from the definitions above (not from the state-space
 * form): the dense reference the filter is tested against. Locations in
 * the design's order (trait by trait). Returns the N k mean vector and the
 * N k × N k covariance, horizon-major, without sampling error.
 *
 * @example
 * jointMeanCovariance(jointModel('correlated-random-walk'), [1, 2], 1, [5], Float64Array.of(2), null); // { mean: [5, 5], covariance: [[2, 2], [2, 4]] } (R min(t, s))
 */
export function jointMeanCovariance(
  model: JointModel,
  time: ArrayLike<number>,
  k: number,
  locations: readonly number[],
  covariance: Float64Array,
  alpha: readonly number[] | null,
): { mean: number[]; covariance: number[][] } {
  const horizons = time.length;
  const per = locationsPerTrait(model);
  const mean: number[] = [];
  for (let i = 0; i < horizons; i++) {
    for (let j = 0; j < k; j++) {
      const first = locations[j * per];
      const t = time[i];
      if (model.mean === 'constant') mean.push(first);
      else if (model.mean === 'drift') mean.push(first + locations[j * per + 1] * t);
      else {
        const optimum = locations[j * per + 1];
        mean.push(optimum + (first - optimum) * Math.exp(-(alpha as readonly number[])[j] * t));
      }
    }
  }
  const size = horizons * k;
  const dense = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let i = 0; i < horizons; i++) {
    for (let h = 0; h < horizons; h++) {
      for (let j = 0; j < k; j++) {
        for (let l = 0; l < k; l++) {
          const r = covariance[j * k + l];
          let value: number;
          if (model.process === 'stasis') value = i === h ? r : 0;
          else if (model.process === 'walk') value = r * Math.min(time[i], time[h]);
          else {
            const aj = (alpha as readonly number[])[j];
            const al = (alpha as readonly number[])[l];
            const shared = Math.min(time[i], time[h]);
            const rate = aj + al;
            value = r * Math.exp(-aj * time[i] - al * time[h]) * (rate > 0 ? Math.expm1(rate * shared) / rate : shared);
          }
          dense[i * k + j][h * k + l] = value;
        }
      }
    }
  }
  return { mean, covariance: dense };
}
