/**
 * The vector Kalman filter of the joint (several-trait) models: k traits of
 * one lineage observed at N horizons, some values missing.
 *
 * State-space form (mean-free; the mean is X beta, profiled out by GLS):
 *   x_i = (X beta)_i + u_i + eps_i,  eps_i ~ N(0, E_i)  (observed components only)
 *   u_i = Phi_i u_{i-1} + w_i,       w_i ~ N(0, Q_i),    Phi_i = diag(phi_i)
 * with Phi_0 = 0, so Q_0 is the covariance of u_0 (0 for the walks and ou,
 * which start exactly at their ancestral means; Sigma for stasis).
 *
 * The filter runs over the data and every design column at once (the gain
 * does not depend on the data); each horizon's innovations, multiplied by
 * the inverse Cholesky factor of their covariance F_i, are rows of
 * L^-1 x and L^-1 X (L the Cholesky factor of the dense covariance of the
 * observed values), and ln det V = sum ln det F_i (de Jong 1991, Ann. Stat.
 * 19:1073-1083, the augmented filter, here in vector form). A missing value
 * is simply left out of the observation at its horizon (Durbin & Koopman
 * 2012, Time Series Analysis by State Space Methods, 2nd ed., section 4.10),
 * which is exact: nothing is imputed. Cost O(N k^3) per column.
 */

/** One group's data in the filter's layout. */
export interface JointData {
  /** Number of traits k. */
  readonly traits: number;
  /** Elapsed time t_i of each horizon (t_0 = 0), strictly increasing. */
  readonly time: Float64Array;
  /** Trait means, horizon-major (N × k); NaN where a trait was not measured. */
  readonly values: Float64Array;
  /** Sampling covariance E_i of each horizon's means, N × k × k; entries of missing traits are ignored. */
  readonly sampling: Float64Array;
}

/** The dynamics of the mean-free latent process, horizon by horizon. */
export interface VectorDynamics {
  /** Diagonal of Phi_i, N × k (Phi_0 is taken as 0 whatever it holds). */
  readonly transition: Float64Array;
  /** Process covariance Q_i, N × k × k (Q_0: covariance of the first state). */
  readonly process: Float64Array;
}

/**
 * The whitened regression of one pass: ln det V, the number of observed
 * values, and the upper-triangular factor R of [L^-1 X | L^-1 x] (design
 * columns first, data last), accumulated row by row with Givens rotations.
 */
export interface WhitenedRegression {
  readonly logDet: number;
  readonly observed: number;
  /** (p + 1) × (p + 1) upper triangle, row-major. */
  readonly factor: Float64Array;
  readonly columns: number;
}

/**
 * Cholesky factor of the m × m symmetric matrix `a` (row-major) in place
 * (lower triangle). Returns false when `a` is not positive definite.
 *
 * @example
 * const a = Float64Array.of(4, 2, 2, 5);
 * choleskyInPlace(a, 2); // true
 * [a[0], a[2], a[3]]; // [2, 1, 2] (L = [[2, 0], [1, 2]], L L' = [[4, 2], [2, 5]])
 * choleskyInPlace(Float64Array.of(1, 2, 2, 1), 2); // false (not positive definite)
 */
export function choleskyInPlace(a: Float64Array, m: number): boolean {
  for (let j = 0; j < m; j++) {
    let diagonal = a[j * m + j];
    for (let p = 0; p < j; p++) diagonal -= a[j * m + p] * a[j * m + p];
    if (!(diagonal > 0)) return false;
    const root = Math.sqrt(diagonal);
    a[j * m + j] = root;
    for (let i = j + 1; i < m; i++) {
      let sum = a[i * m + j];
      for (let p = 0; p < j; p++) sum -= a[i * m + p] * a[j * m + p];
      a[i * m + j] = sum / root;
    }
    for (let p = j + 1; p < m; p++) a[j * m + p] = 0;
  }
  return true;
}

/** Fold one row into the Givens factor (`factor` is columns × columns upper triangle). */
function foldRow(factor: Float64Array, columns: number, row: Float64Array): void {
  for (let j = 0; j < columns; j++) {
    const value = row[j];
    if (value === 0) continue;
    const pivot = factor[j * columns + j];
    const radius = Math.hypot(pivot, value);
    const cosine = pivot / radius;
    const sine = value / radius;
    factor[j * columns + j] = radius;
    for (let c = j + 1; c < columns; c++) {
      const upper = factor[j * columns + c];
      const lower = row[c];
      factor[j * columns + c] = cosine * upper + sine * lower;
      row[c] = -sine * upper + cosine * lower;
    }
  }
}

/**
 * Run the mean-free vector filter over the data and the design columns
 * (`design[c]` is N × k, horizon-major like the data) and return the
 * whitened regression, or null when some innovation covariance F_i is not
 * positive definite (the density does not exist, e.g. an exactly known
 * start with zero sampling variance).
 *
 * @example
 * // One trait, two horizons, a walk with unit step variance from an exactly known start (Q_0 = 0), sampling
 * // variances 1 and 0: V = diag(1, 1), so ln det V = 0 (closed form).
 * const data = { traits: 1, time: Float64Array.of(0, 1), values: Float64Array.of(0, 1), sampling: Float64Array.of(1, 0) };
 * whitenJoint(data, { transition: Float64Array.of(0, 1), process: Float64Array.of(0, 1) }, []).logDet; // 0
 */
export function whitenJoint(data: JointData, dynamics: VectorDynamics, design: readonly Float64Array[]): WhitenedRegression | null {
  const k = data.traits;
  const horizons = data.time.length;
  const p = design.length;
  const columns = p + 1;
  // state[c * k + j]: filtered mean-free state of column c (design columns 0..p-1, data p).
  const state = new Float64Array(columns * k);
  const predicted = new Float64Array(columns * k);
  const covariance = new Float64Array(k * k);
  const prior = new Float64Array(k * k);
  const observedIndex = new Int32Array(k);
  const innovationCovariance = new Float64Array(k * k);
  const gain = new Float64Array(k * k); // B' = L^-1 M', m × k
  const innovation = new Float64Array(k * columns);
  const row = new Float64Array(columns);
  const factor = new Float64Array(columns * columns);
  let logDet = 0;
  let observed = 0;
  for (let i = 0; i < horizons; i++) {
    const base = i * k;
    const processBase = i * k * k;
    for (let j = 0; j < k; j++) {
      const phiJ = i === 0 ? 0 : dynamics.transition[base + j];
      for (let c = 0; c < columns; c++) predicted[c * k + j] = phiJ * state[c * k + j];
      for (let l = 0; l < k; l++) {
        const phiL = i === 0 ? 0 : dynamics.transition[base + l];
        prior[j * k + l] = phiJ * covariance[j * k + l] * phiL + dynamics.process[processBase + j * k + l];
      }
    }
    let m = 0;
    for (let j = 0; j < k; j++) if (!Number.isNaN(data.values[base + j])) observedIndex[m++] = j;
    if (m === 0) {
      covariance.set(prior);
      state.set(predicted);
      continue;
    }
    for (let r = 0; r < m; r++) {
      const jr = observedIndex[r];
      for (let s = 0; s < m; s++) {
        const js = observedIndex[s];
        innovationCovariance[r * m + s] = prior[jr * k + js] + data.sampling[processBase + jr * k + js];
      }
    }
    if (!choleskyInPlace(innovationCovariance, m)) return null;
    for (let r = 0; r < m; r++) logDet += 2 * Math.log(innovationCovariance[r * m + r]);
    // Innovations of every column at the observed traits, whitened: z = L^-1 v.
    for (let r = 0; r < m; r++) {
      const jr = observedIndex[r];
      for (let c = 0; c < columns; c++) {
        const y = c < p ? design[c][base + jr] : data.values[base + jr];
        let value = y - predicted[c * k + jr];
        for (let s = 0; s < r; s++) value -= innovationCovariance[r * m + s] * innovation[s * columns + c];
        innovation[r * columns + c] = value / innovationCovariance[r * m + r];
      }
    }
    // B' = L^-1 M' with M = prior[:, observed] (k × m): gain rows r = 0..m-1, k entries each.
    for (let r = 0; r < m; r++) {
      for (let j = 0; j < k; j++) {
        let value = prior[j * k + observedIndex[r]];
        for (let s = 0; s < r; s++) value -= innovationCovariance[r * m + s] * gain[s * k + j];
        gain[r * k + j] = value / innovationCovariance[r * m + r];
      }
    }
    for (let j = 0; j < k; j++) {
      for (let c = 0; c < columns; c++) {
        let update = 0;
        for (let r = 0; r < m; r++) update += gain[r * k + j] * innovation[r * columns + c];
        state[c * k + j] = predicted[c * k + j] + update;
      }
      for (let l = 0; l <= j; l++) {
        let reduction = 0;
        for (let r = 0; r < m; r++) reduction += gain[r * k + j] * gain[r * k + l];
        const value = prior[j * k + l] - reduction;
        covariance[j * k + l] = value;
        covariance[l * k + j] = value;
      }
    }
    for (let r = 0; r < m; r++) {
      for (let c = 0; c < columns; c++) row[c] = innovation[r * columns + c];
      foldRow(factor, columns, row);
    }
    observed += m;
  }
  return { logDet, observed, factor, columns };
}

/** GLS from a whitened regression: the coefficients, the residual sum of squares and the profile logL. */
export interface JointProfile {
  readonly logLik: number;
  readonly coefficients: Float64Array;
  readonly residualSquares: number;
}

/**
 * The profile log-likelihood over the location parameters (exact GLS):
 * logL = -0.5 (n ln 2 pi + ln det V + min_beta |L^-1 (x - X beta)|^2), n the
 * number of observed values. Null when the design is rank-deficient for the
 * observed data (relative pivot below 1e-12).
 *
 * @example
 * // V = diag(1, 2) and a constant mean: GLS mean (0 + 1/2) / (1 + 1/2) = 1/3, residual squares 1/9 + (2/3)^2 / 2 = 1/3,
 * // logL = -0.5 (2 ln 2 pi + ln 2 + 1/3) (closed forms).
 * const data = { traits: 1, time: Float64Array.of(0, 1), values: Float64Array.of(0, 1), sampling: Float64Array.of(1, 1) };
 * const profile = profileFromWhitened(whitenJoint(data, { transition: Float64Array.of(0, 1), process: Float64Array.of(0, 1) }, [Float64Array.of(1, 1)]));
 * profile.coefficients[0]; // 0.3333333333333333 (to 1e-15)
 * profile.logLik; // -2.3511173233559846 (to 1e-12)
 */
export function profileFromWhitened(whitened: WhitenedRegression): JointProfile | null {
  const { factor, columns } = whitened;
  const p = columns - 1;
  let largest = 0;
  for (let j = 0; j < p; j++) largest = Math.max(largest, Math.abs(factor[j * columns + j]));
  const coefficients = new Float64Array(p);
  for (let j = p - 1; j >= 0; j--) {
    const pivot = factor[j * columns + j];
    if (!(Math.abs(pivot) > 1e-12 * largest)) return null;
    let value = factor[j * columns + p];
    for (let c = j + 1; c < p; c++) value -= factor[j * columns + c] * coefficients[c];
    coefficients[j] = value / pivot;
  }
  const residualSquares = factor[p * columns + p] ** 2;
  const logLik = -0.5 * (whitened.observed * Math.log(2 * Math.PI) + whitened.logDet + residualSquares);
  return { logLik, coefficients, residualSquares };
}
