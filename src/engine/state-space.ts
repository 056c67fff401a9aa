/**
 * Scalar linear-Gaussian state-space form shared by every model.
 *
 * The observed horizon means are x_i = mu_i + u_i + epsilon_i with
 * mu = X beta (the design, linear in the location parameters beta),
 * epsilon_i ~ N(0, e_i) (sampling error) and a mean-free latent deviation
 * u_i = transition_i * u_{i-1} + N(0, processVariance_i). A transition of 0
 * restarts the latent process, so processVariance_0 is the initial variance
 * (0 for the walks and ou, the stasis variance for stasis) and a section
 * boundary inside a multi-section fit is a transition of 0 as well.
 *
 * Harvey, A. C. (1989). Forecasting, Structural Time Series Models and the
 * Kalman Filter. Cambridge University Press.
 */
export interface StateSpace {
  /** Number of horizons N. */
  readonly size: number;
  /** Number of design columns p (location parameters). */
  readonly width: number;
  /** transition_i (phi_i); entry 0 is ignored and treated as 0. */
  readonly transition: Float64Array;
  /** processVariance_i (q_i >= 0); entry 0 is the initial variance. */
  readonly processVariance: Float64Array;
  /** Sampling variance of each mean (e_i >= 0). */
  readonly observationVariance: Float64Array;
  /** Design matrix X, row-major, size × width. */
  readonly design: Float64Array;
}

/**
 * Allocate a state space of the given size and width, zero-filled, with the
 * given observation variances.
 *
 * @example
 * const space = allocateStateSpace(3, 1, Float64Array.of(0.1, 0.1, 0.1));
 * space.design.length; // 3
 */
export function allocateStateSpace(size: number, width: number, observationVariance: Float64Array): StateSpace {
  return {
    size,
    width,
    transition: new Float64Array(size),
    processVariance: new Float64Array(size),
    observationVariance,
    design: new Float64Array(size * width),
  };
}
