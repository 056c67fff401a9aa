import { allocateStateSpace } from '../engine/state-space.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import type { RandomSource } from './random.js';

/**
 * Draw horizon means from a model with given parameters on the design of a
 * lineage (its times and sampling variances): the latent deviation follows
 * the model's state-space dynamics, the mean is X beta, and each horizon mean
 * gets its own sampling error N(0, e_i). Exactly the distribution whose
 * likelihood the engine computes, so a fit to simulated data is a fair test.
 *
 * @param model the generating model
 * @param design a lineage supplying times and sampling variances (its means are ignored)
 * @param parameters natural parameters of the model (names as in MODELS.md)
 * @param random seeded source; draws are consumed in horizon order
 * @returns simulated horizon means x_i
 *
 * @example
 * // Step variance 0 and tiny sampling variances: the means stay at the ancestral mean (to the sampling sd, 1e-6).
 * const design = lineageFromArrays({ time: [0, 1, 2], mean: [0, 0, 0], samplingVariance: [1e-12, 1e-12, 1e-12] });
 * const means = simulateMeans(randomWalk, design, { ancestral_mean: 5, step_variance: 0 }, createRandom(1));
 * Math.max(...means.map((mean) => Math.abs(mean - 5))) < 1e-5; // true
 */
export function simulateMeans(
  model: EvolutionModel,
  design: Lineage,
  parameters: Record<string, number>,
  random: RandomSource,
): Float64Array {
  return meansSimulator(model, design, parameters)(random);
}

/**
 * {@link simulateMeans} in two steps (issue 14): the state space is filled
 * once, and the returned function draws one set of means per call (a new
 * array each time; the draws are consumed in the same order, so a seeded
 * source gives the same means as `simulateMeans`). For replicate loops that
 * draw many data sets from one model at one set of parameters.
 *
 * @example
 * const design = lineageFromArrays({ time: [0, 1, 2], mean: [0, 0, 0], samplingVariance: [0.01, 0.01, 0.01] });
 * const draw = meansSimulator(randomWalk, design, { ancestral_mean: 5, step_variance: 0.1 });
 * const once = simulateMeans(randomWalk, design, { ancestral_mean: 5, step_variance: 0.1 }, createRandom(1));
 * Array.from(draw(createRandom(1))).join() === Array.from(once).join(); // true (the same draws in the same order)
 * draw(createRandom(1)).length; // 3
 */
export function meansSimulator(model: EvolutionModel, design: Lineage, parameters: Record<string, number>): (random: RandomSource) => Float64Array {
  const size = design.time.length;
  const space = allocateStateSpace(size, model.width(design), design.samplingVariance);
  const process = model.processFrom(parameters, design);
  const coefficients = model.coefficientsFrom(parameters, design);
  model.fillSpace(design, process, space);
  return (random) => {
    const means = new Float64Array(size);
    let deviation = 0;
    for (let i = 0; i < size; i++) {
      const phi = i === 0 ? 0 : space.transition[i];
      deviation = phi * deviation + Math.sqrt(Math.max(0, space.processVariance[i])) * random.normal();
      let location = 0;
      for (let j = 0; j < space.width; j++) location += space.design[i * space.width + j] * coefficients[j];
      means[i] = location + deviation + Math.sqrt(Math.max(0, space.observationVariance[i])) * random.normal();
    }
    return means;
  };
}

/**
 * A copy of a design lineage with new horizon means (e.g. simulated ones).
 *
 * @example
 * const design = lineageFromArrays({ time: [0, 1, 2], mean: [0, 0, 0], samplingVariance: [0.1, 0.1, 0.1] });
 * Array.from(withMeans(design, Float64Array.of(1, 2, 3)).mean); // [1, 2, 3]
 * Array.from(design.mean); // [0, 0, 0] (the design is not changed)
 */
export function withMeans(design: Lineage, means: Float64Array): Lineage {
  return { ...design, mean: means };
}
