import { allocateSums, whiten, workSize, type WhitenedSums } from '../engine/kalman-filter.js';
import { logLikAt, profileOut, profileWithFixedCoefficient, type ProfileResult } from '../engine/gls.js';
import { allocateStateSpace, type StateSpace } from '../engine/state-space.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';

/**
 * The exact likelihood of one model for one lineage, evaluated by the O(N)
 * filter with the location parameters profiled out by GLS. Buffers are
 * allocated once, so repeated evaluation inside an optimiser allocates only
 * the few small arrays of the GLS solve.
 *
 * The trait is centred on its average before filtering (every model's design
 * spans the constant, so this changes nothing but the rounding error of the
 * GLS cross-products, which keeps results invariant to adding a constant).
 */
export class LikelihoodEvaluator {
  readonly model: EvolutionModel;
  readonly lineage: Lineage;
  readonly space: StateSpace;
  readonly centre: number;
  private readonly data: Float64Array;
  private readonly sums: WhitenedSums;
  private readonly work: Float64Array;
  /** Number of filter passes so far. */
  evaluations = 0;

  constructor(model: EvolutionModel, lineage: Lineage) {
    this.model = model;
    this.lineage = lineage;
    const size = lineage.mean.length;
    const width = model.width(lineage);
    let centre = 0;
    for (let i = 0; i < size; i++) centre += lineage.mean[i];
    this.centre = centre / size;
    this.data = Float64Array.from(lineage.mean, (value) => value - this.centre);
    this.space = allocateStateSpace(size, width, lineage.samplingVariance);
    this.sums = allocateSums(size, width);
    this.work = new Float64Array(workSize(width));
  }

  /** Filter at these process values; returns the (reused) sums. */
  whiten(process: ArrayLike<number>): WhitenedSums {
    this.model.fillSpace(this.lineage, process, this.space);
    this.evaluations += 1;
    return whiten(this.space, this.data, this.sums, this.work);
  }

  /** Profile log-likelihood at these process values (location parameters at their GLS estimate). */
  profile(process: ArrayLike<number>): number {
    return profileOut(this.whiten(process)).logLik;
  }

  /** GLS details at these process values, with coefficients on the trait's own scale. */
  details(process: ArrayLike<number>): ProfileResult {
    const result = profileOut(this.whiten(process));
    const constant = this.model.constantCoefficients(process, this.lineage);
    const coefficients = Float64Array.from(result.coefficients, (value, j) => value + this.centre * constant[j]);
    return { ...result, coefficients };
  }

  /** Profile log-likelihood with location parameter `name` held at `value`. */
  profileWithLocation(name: string, value: number, process: ArrayLike<number>): number {
    const { index, coefficient } = this.model.fixLocation(name, value, process, this.lineage);
    const constant = this.model.constantCoefficients(process, this.lineage);
    return profileWithFixedCoefficient(this.whiten(process), index, coefficient - this.centre * constant[index]);
  }

  /** Log-likelihood at a full set of natural parameters (nothing profiled). */
  atParameters(parameters: Record<string, number>): number {
    const process = this.model.processFrom(parameters, this.lineage);
    const coefficients = this.model.coefficientsFrom(parameters, this.lineage);
    const constant = this.model.constantCoefficients(process, this.lineage);
    const centred = coefficients.map((value, j) => value - this.centre * constant[j]);
    return logLikAt(this.whiten(process), centred);
  }
}
