import { lineageFromArrays, type Lineage } from '../src/lineage.js';
import { classicModels } from '../src/models/registry.js';
import { createRandom, type RandomSource } from '../src/random/random.js';
import { simulateMeans, withMeans } from '../src/random/simulate-lineage.js';

/**
 * Invented benchmark lineages: uneven horizon spacing, uneven sample sizes,
 * means drawn from one of the five classic models (cycled by `which`). The
 * numbers only need to look like real sequences to exercise every code
 * path; they describe no real section.
 */
export function benchLineage(horizons: number, seed: number, which = seed): Lineage {
  const random = createRandom(seed);
  const time = new Float64Array(horizons);
  for (let i = 1; i < horizons; i++) time[i] = time[i - 1] + 0.02 + 0.08 * random.uniform();
  const count = Float64Array.from({ length: horizons }, () => 8 + Math.floor(25 * random.uniform()));
  const samplingVariance = Float64Array.from(count, (n) => (0.3 * (0.7 + 0.6 * random.uniform())) / n);
  const design = lineageFromArrays({ time, mean: new Float64Array(horizons), samplingVariance, count, section: `bench ${seed}`, trait: 'length' });
  const model = classicModels[((which % 5) + 5) % 5];
  return withMeans(design, simulateMeans(model, design, generating(model.id, time[horizons - 1], random), random));
}

function generating(id: string, span: number, random: RandomSource): Record<string, number> {
  const jitter = 0.5 + random.uniform();
  switch (id) {
    case 'strict-stasis':
      return { stasis_mean: 5 };
    case 'stasis':
      return { stasis_mean: 5, stasis_variance: 0.02 * jitter };
    case 'random-walk':
      return { ancestral_mean: 5, step_variance: 0.05 * jitter };
    case 'directional-walk':
      return { ancestral_mean: 5, step_variance: 0.05 * jitter, drift: 0.4 * (random.uniform() - 0.5) };
    default:
      return { ancestral_mean: 5, optimum: 6, alpha: (10 * jitter) / Math.max(span, 1e-9), step_variance: 0.05 * jitter };
  }
}

/** A samples CSV (summary form) of `lineages` lineages of `horizons` horizons each. */
export function batchCsv(lineages: number, horizons: number, seed = 1): string {
  const lines = ['section,trait,time,n,mean,var'];
  for (let k = 0; k < lineages; k++) {
    const lineage = benchLineage(horizons, seed * 100003 + k, k);
    for (let i = 0; i < horizons; i++) {
      const variance = lineage.samplingVariance[i] * lineage.count[i];
      lines.push(`section ${1 + Math.floor(k / 10)},trait ${1 + (k % 10)},${lineage.time[i].toFixed(6)},${lineage.count[i]},${lineage.mean[i].toFixed(6)},${variance.toFixed(6)}`);
    }
  }
  return lines.join('\n') + '\n';
}
