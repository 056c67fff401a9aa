import { allocateSums, whiten, workSize, type WhitenedSums } from '../engine/kalman-filter.js';
import { informationLogDet, logLikAt, profileLogLik, profileOut, profileWithFixedCoefficient, type ProfileResult } from '../engine/gls.js';
import { allocateSpaceDerivatives, filterScore, informationScore, informationScoreWorkSize, scoreWorkSize, type SpaceDerivative } from '../engine/kalman-score.js';
import { allocateStateSpace, type StateSpace } from '../engine/state-space.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { PrefixFilter } from './prefix-filter.js';

/**
 * The exact likelihood of one model for one lineage, evaluated by the O(N)
 * filter with the location parameters profiled out by GLS. Buffers are
 * allocated once, so repeated evaluation inside an optimiser allocates only
 * the few small arrays of the GLS solve.
 *
 * The trait is centred on its average before filtering (every model's design
 * spans the constant, so this changes nothing but the rounding error of the
 * GLS cross-products, which keeps results invariant to adding a constant).
 *
 * @example
 * // Nearly exact means: the walk's increments 1, 2, 1 are independent N(0, q), so at q = 2
 * // logL = -2 ln 2 pi - (ln 1e-12 + 3 ln 2) / 2 - 6 / 4 (closed form; the first mean is the ancestral mean, known to 1e-12).
 * const lineage = lineageFromArrays({ time: [0, 1, 2, 3], mean: [0, 1, 3, 4], samplingVariance: [1e-12, 1e-12, 1e-12, 1e-12] });
 * const evaluator = new LikelihoodEvaluator(randomWalk, lineage);
 * evaluator.profile([2]); // 7.600035654304915 (to 1e-9)
 * evaluator.profile([2]) - evaluator.profile([1]); // 0.46027922915983144 (to 1e-9; 3 - 1.5 ln 2 - 1.5)
 * evaluator.centre; // 2 (the average of the means, taken off before filtering)
 */
export class LikelihoodEvaluator {
  readonly model: EvolutionModel;
  readonly lineage: Lineage;
  readonly space: StateSpace;
  readonly centre: number;
  private readonly data: Float64Array;
  private readonly sums: WhitenedSums;
  private readonly work: Float64Array;
  /** Number of filter passes so far (repeated process values answered from the cache are not counted). */
  evaluations = 0;
  /** Number of score passes ({@link LikelihoodEvaluator.profileScore}, also run by {@link LikelihoodEvaluator.restrictedScore}) so far. */
  scoreEvaluations = 0;
  /** Filter results by process values: see {@link LikelihoodEvaluator.whiten}. */
  private readonly cache: WhitenCache;
  /** The filter resuming after rows shared by every value of the later process axes (a shift model bound to one position), or null. */
  readonly prefix: PrefixFilter | null;
  /** Scratch of {@link LikelihoodEvaluator.profileScore}, allocated on first use. */
  private scoreScratch: { derivatives: SpaceDerivative[]; work: Float64Array; coefficients: Float64Array } | null = null;
  /** Scratch of {@link LikelihoodEvaluator.restrictedScore}, allocated on first use. */
  private informationScratch: { work: Float64Array; gradient: Float64Array } | null = null;

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
    this.cache = new WhitenCache(model.process.length, width);
    const shared = model.sharedPrefix;
    this.prefix = shared !== undefined && shared.rows > 0 && shared.rows < size && shared.axes < model.process.length ? new PrefixFilter(shared.rows, shared.axes, width) : null;
  }

  /**
   * Filter at these process values; returns the (reused) sums.
   *
   * The searches visit the same process values again and again: every
   * profile-likelihood step of a location parameter re-runs the same grid
   * (the whitening does not depend on the location value held fixed), and
   * the restricted profiles repeat the main search's grid. So the sums of
   * each filter pass are kept (at most {@link whitenCacheSize} entries, then
   * the cache starts afresh) and a repeat is answered by copying them back,
   * bit for bit what the pass would give. `space` holds the state space of
   * the last pass actually run; call `model.fillSpace` before reading it.
   */
  whiten(process: ArrayLike<number>): WhitenedSums {
    const sums = this.sums;
    if (this.cache.restore(process, sums)) return sums;
    this.model.fillSpace(this.lineage, process, this.space);
    this.evaluations += 1;
    if (this.prefix !== null) this.prefix.whiten(this.space, this.data, sums, this.work, process);
    else whiten(this.space, this.data, sums, this.work);
    this.cache.keep(process, sums);
    return sums;
  }

  /**
   * Hand the filter cache's storage to the next evaluator of the same shape
   * (a fit calls this when it is done: replicate loops and shift searches
   * make thousands of short-lived evaluators, whose caches would otherwise be
   * allocated and grown afresh each time). The evaluator stays usable, with
   * an empty cache; results never depend on what the cache holds.
   */
  release(): void {
    this.cache.release();
  }

  /** Profile log-likelihood at these process values (location parameters at their GLS estimate). */
  profile(process: ArrayLike<number>): number {
    return profileLogLik(this.whiten(process));
  }

  /** True when the model fills its state space's derivatives, so {@link LikelihoodEvaluator.profileScore} can be used. */
  get hasScore(): boolean {
    return this.model.fillSpaceDerivatives !== undefined;
  }

  /**
   * Profile log-likelihood at these process values (the value of
   * {@link LikelihoodEvaluator.profile}, bit for bit) and its gradient with
   * respect to the process values in natural units, written into `gradient`:
   * the score recursions (`engine/kalman-score.ts`) run over the residual at
   * the GLS coefficients, where by the envelope theorem the gradient of the
   * likelihood with the coefficients held is the gradient of the profile.
   * `gradient` is NaN where the profile is not finite. Needs the model's
   * `fillSpaceDerivatives` ({@link LikelihoodEvaluator.hasScore}). A stable
   * entry point for the searches and the interval code.
   *
   * @param process process values (natural units)
   * @param gradient output, length >= the number of process axes
   * @returns the profile log-likelihood
   */
  profileScore(process: ArrayLike<number>, gradient: Float64Array): number {
    const fill = this.model.fillSpaceDerivatives;
    if (fill === undefined) throw new Error(`model ${this.model.id} has no state-space derivatives`);
    const count = this.model.process.length;
    const sums = this.whiten(process);
    const logLik = profileLogLik(sums);
    if (!Number.isFinite(logLik)) {
      gradient.fill(Number.NaN, 0, count);
      return logLik;
    }
    const width = sums.width;
    this.scoreScratch ??= { derivatives: allocateSpaceDerivatives(sums.size, width, count), work: new Float64Array(scoreWorkSize(count)), coefficients: new Float64Array(width) };
    const { derivatives, work, coefficients } = this.scoreScratch;
    // GLS coefficients (centred trait) by back substitution R beta = z, as profileOut solves them.
    const triangle = sums.triangle;
    for (let i = width - 1; i >= 0; i--) {
      let value = sums.projected[i];
      for (let k = i + 1; k < width; k++) value -= triangle[i * width + k] * coefficients[k];
      coefficients[i] = value / triangle[i * width + i];
    }
    // The cache may have answered whiten without filling the space.
    this.model.fillSpace(this.lineage, process, this.space);
    fill(this.lineage, process, derivatives);
    this.scoreEvaluations += 1;
    filterScore(this.space, derivatives, this.data, coefficients, gradient, work);
    return logLik;
  }

  /**
   * Restricted (REML-type) log-likelihood at these process values (the value
   * of `restrictedLogLik(whiten(process))` in `fit/intervals.ts`, bit for
   * bit: the profile minus 0.5 ln det(X' V^-1 X)) and its gradient with
   * respect to the process values in natural units, written into `gradient`:
   * the profile's gradient ({@link LikelihoodEvaluator.profileScore}) minus
   * half that of ln det(X' V^-1 X), from the score recursions run over the
   * design columns (`informationScore`, `engine/kalman-score.ts`; Harville
   * 1977, J. Amer. Statist. Assoc. 72:320-340, for the derivatives of the
   * restricted likelihood). `gradient` is NaN where the value is not finite.
   * Needs the model's `fillSpaceDerivatives` ({@link LikelihoodEvaluator.hasScore}).
   *
   * @param process process values (natural units)
   * @param gradient output, length >= the number of process axes
   * @param omit a design column whose coefficient is held rather than integrated out (default none): the gradient is
   *   then that of the profile minus 0.5 ln det(X_r' V^-1 X_r), X_r without that column (the adjusted profile of a
   *   location parameter maximised over it, `parameterProfile`); the returned value is still the full restricted one
   * @returns the restricted log-likelihood
   * @example
   * // Stasis, two horizons of unit sampling variance, means 1 and 3: X'V^-1 X = 2 / (omega + 1), so the restricted logL is
   * // -ln 2 pi - 0.5 ln(omega + 1) - 1 / (omega + 1) - 0.5 ln 2, slope -0.5 / (omega + 1) + 1 / (omega + 1)^2 (closed form).
   * const lineage = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
   * const evaluator = new LikelihoodEvaluator(stasis, lineage);
   * const gradient = new Float64Array(1);
   * evaluator.restrictedScore([3], gradient); // -3.1275978372492634 (to 1e-12; -ln 2 pi - 1.5 ln 2 - 0.25 at omega = 3)
   * gradient[0]; // -0.0625 (to 1e-12; -1/8 + 1/16)
   */
  restrictedScore(process: ArrayLike<number>, gradient: Float64Array, omit = -1): number {
    const logLik = this.profileScore(process, gradient);
    const count = this.model.process.length;
    if (!Number.isFinite(logLik)) return Number.NEGATIVE_INFINITY;
    // profileScore left this pass's sums, state space and derivatives in place.
    const sums = this.sums;
    const width = sums.width;
    this.informationScratch ??= { work: new Float64Array(informationScoreWorkSize(width, count)), gradient: new Float64Array(count) };
    const { work, gradient: information } = this.informationScratch;
    const derivatives = (this.scoreScratch as { derivatives: SpaceDerivative[] }).derivatives;
    informationScore(this.space, derivatives, sums, information, work, omit);
    for (let k = 0; k < count; k++) gradient[k] -= 0.5 * information[k];
    return logLik - 0.5 * informationLogDet(sums);
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

/** Storage of released caches by shape (key width : value width), per thread. */
const spareTables = new Map<string, Array<{ capacity: number; keys: Float64Array<ArrayBuffer>; values: Float64Array<ArrayBuffer>; used: Uint8Array<ArrayBuffer> }>>();
/** Released tables kept per shape (each at most {@link whitenCacheSize} slots). */
const sparesKept = 4;

/** Most filter results one evaluator keeps (each is a few dozen numbers); then the cache starts afresh. */
export const whitenCacheSize = 1 << 14;

/**
 * Open-addressing hash table from process values (compared exactly, as
 * doubles) to the variable part of the whitened sums: ln det V, residual,
 * singular, R, z. Typed arrays only, so a lookup allocates nothing; it
 * starts small and doubles up to {@link whitenCacheSize} slots at half load.
 */
class WhitenCache {
  private readonly keyWidth: number;
  private readonly valueWidth: number;
  private capacity = 0;
  private count = 0;
  private keys = new Float64Array(0);
  private values = new Float64Array(0);
  private used = new Uint8Array(0);
  private readonly bits = new Float64Array(1);
  private readonly words = new Uint32Array(this.bits.buffer);

  constructor(keyWidth: number, designWidth: number) {
    this.keyWidth = keyWidth;
    this.valueWidth = 3 + designWidth * designWidth + designWidth;
  }

  private hash(process: ArrayLike<number>): number {
    let hash = 0x811c9dc5;
    for (let i = 0; i < this.keyWidth; i++) {
      this.bits[0] = process[i];
      hash = Math.imul(hash ^ this.words[0], 0x01000193);
      hash = Math.imul(hash ^ this.words[1], 0x01000193);
    }
    return (hash ^ (hash >>> 15)) >>> 0;
  }

  private find(process: ArrayLike<number>): number {
    const mask = this.capacity - 1;
    let slot = this.hash(process) & mask;
    for (;;) {
      if (this.used[slot] === 0) return -1 - slot;
      let same = true;
      const base = slot * this.keyWidth;
      for (let i = 0; i < this.keyWidth; i++) {
        if (this.keys[base + i] !== process[i]) {
          same = false;
          break;
        }
      }
      if (same) return slot;
      slot = (slot + 1) & mask;
    }
  }

  /** Copy kept sums for these process values into `sums`; false when not kept. */
  restore(process: ArrayLike<number>, sums: WhitenedSums): boolean {
    if (this.capacity === 0 || process.length !== this.keyWidth) return false;
    const slot = this.find(process);
    if (slot < 0) return false;
    const values = this.values;
    const base = slot * this.valueWidth;
    sums.sumLogVariance = values[base];
    sums.residual = values[base + 1];
    sums.singular = values[base + 2] === 1;
    const triangle = sums.triangle;
    const projected = sums.projected;
    for (let j = 0; j < triangle.length; j++) triangle[j] = values[base + 3 + j];
    for (let j = 0; j < projected.length; j++) projected[j] = values[base + 3 + triangle.length + j];
    return true;
  }

  /** Keep the sums of a filter pass at these process values. */
  keep(process: ArrayLike<number>, sums: WhitenedSums): void {
    if (process.length !== this.keyWidth || this.keyWidth === 0) return;
    for (let i = 0; i < this.keyWidth; i++) if (Number.isNaN(process[i])) return;
    if (2 * (this.count + 1) > this.capacity) {
      if (this.capacity === 0 && this.takeSpare()) {
        // Storage of a released cache of the same shape, emptied.
      } else if (this.capacity >= whitenCacheSize) this.reset(this.capacity);
      else this.grow();
    }
    const found = this.find(process);
    const slot = found < 0 ? -1 - found : found;
    if (found < 0) this.count += 1;
    this.used[slot] = 1;
    for (let i = 0; i < this.keyWidth; i++) this.keys[slot * this.keyWidth + i] = process[i];
    const values = this.values;
    const base = slot * this.valueWidth;
    values[base] = sums.sumLogVariance;
    values[base + 1] = sums.residual;
    values[base + 2] = sums.singular ? 1 : 0;
    for (let j = 0; j < sums.triangle.length; j++) values[base + 3 + j] = sums.triangle[j];
    for (let j = 0; j < sums.projected.length; j++) values[base + 3 + sums.triangle.length + j] = sums.projected[j];
  }

  /** Give this cache's storage to {@link spareTables} (at most {@link sparesKept} per shape) and start empty. */
  release(): void {
    if (this.capacity === 0) return;
    const shape = `${this.keyWidth}:${this.valueWidth}`;
    const spares = spareTables.get(shape) ?? [];
    if (spares.length < sparesKept) spares.push({ capacity: this.capacity, keys: this.keys, values: this.values, used: this.used });
    spareTables.set(shape, spares);
    this.capacity = 0;
    this.count = 0;
    this.keys = new Float64Array(0);
    this.values = new Float64Array(0);
    this.used = new Uint8Array(0);
  }

  /** Take the storage of a released cache of the same shape, emptied; false when there is none. */
  private takeSpare(): boolean {
    const spare = spareTables.get(`${this.keyWidth}:${this.valueWidth}`)?.pop();
    if (spare === undefined) return false;
    spare.used.fill(0);
    this.capacity = spare.capacity;
    this.count = 0;
    this.keys = spare.keys;
    this.values = spare.values;
    this.used = spare.used;
    return true;
  }

  private reset(capacity: number): void {
    this.count = 0;
    if (capacity === this.capacity) {
      // Starting afresh at the same size: only the occupancy marks need clearing (stale keys and values are never read).
      this.used.fill(0);
      return;
    }
    this.capacity = capacity;
    this.keys = new Float64Array(capacity * this.keyWidth);
    this.values = new Float64Array(capacity * this.valueWidth);
    this.used = new Uint8Array(capacity);
  }

  private grow(): void {
    const { capacity, keys, values, used, keyWidth, valueWidth } = this;
    this.reset(capacity === 0 ? 256 : capacity * 2);
    const key = new Float64Array(keyWidth);
    for (let slot = 0; slot < capacity; slot++) {
      if (used[slot] === 0) continue;
      for (let i = 0; i < keyWidth; i++) key[i] = keys[slot * keyWidth + i];
      const target = -1 - this.find(key);
      this.used[target] = 1;
      this.count += 1;
      for (let i = 0; i < keyWidth; i++) this.keys[target * keyWidth + i] = key[i];
      for (let j = 0; j < valueWidth; j++) this.values[target * valueWidth + j] = values[slot * valueWidth + j];
    }
  }
}
