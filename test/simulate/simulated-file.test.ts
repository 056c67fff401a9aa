import { describe, expect, it } from 'vitest';
import { readTable } from '../../src/data/read-table.js';
import { readSamples } from '../../src/data/samples.js';
import { buildLineages } from '../../src/lineage.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { designFromOptions, designLineage } from '../../src/simulate/design.js';
import { simulatedTable } from '../../src/simulate/sample-table.js';

// What `simulate` writes must read back through the tool's own input path
// and carry the distribution it claims. Facts checked (common practice;
// textbook Brownian motion with drift observed with sampling error): the
// horizon mean at time t has expectation a + delta t and variance
// sigma2 t + v / n. Tolerances are 4 standard errors over R = 1000
// replicates (mean: sqrt(var / R); sample variance: var sqrt(2 / (R - 1)));
// a 4-SE band is exceeded by chance with probability about 6e-5 per check.
const design = designFromOptions({ horizons: 6, spacing: 0.5, count: 10, withinVariance: 0.2 });
const truth = { ancestral_mean: 3, drift: 0.4, step_variance: 0.3 };
const replicates = 1000;

function readBack(text: string) {
  const lineages = buildLineages(readSamples(readTable(text, 'simulated.csv')));
  expect(lineages.length).toBe(replicates);
  return lineages;
}

// One simulated file per form, read back once (issue 22: the specimen form's
// within-horizon variances are checked on the same draws as its endpoint;
// for normal specimens the sample variance is independent of the sample
// mean, so sharing the draws leaves both checks' power as it was).
const readBackByForm = new Map<'summary' | 'specimen', ReturnType<typeof readBack>>();
function simulatedLineages(form: 'summary' | 'specimen') {
  let lineages = readBackByForm.get(form);
  if (!lineages) {
    lineages = readBack(simulatedTable({ model: directionalWalk, designs: [designLineage(design)], parameters: [truth], replicates, seed: 5, form }));
    readBackByForm.set(form, lineages);
  }
  return lineages;
}

describe('simulated samples files', () => {
  for (const form of ['summary', 'specimen'] as const) {
    it(`${form} form: reads back and its endpoint has mean a + delta t and variance sigma2 t + v/n`, () => {
      const lineages = simulatedLineages(form);
      expect(Array.from(lineages[0].time)).toEqual(design.time);
      const last = design.time.length - 1;
      const t = design.time[last];
      const values = lineages.map((lineage) => lineage.mean[last]);
      const mean = values.reduce((sum, value) => sum + value, 0) / replicates;
      const variance = values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (replicates - 1);
      const expectedVariance = truth.step_variance * t + 0.2 / 10;
      expect(Math.abs(mean - (truth.ancestral_mean + truth.drift * t))).toBeLessThan(4 * Math.sqrt(expectedVariance / replicates));
      expect(Math.abs(variance / expectedVariance - 1)).toBeLessThan(4 * Math.sqrt(2 / (replicates - 1)));
      // First horizon: only sampling error about the ancestral mean.
      const first = lineages.map((lineage) => lineage.mean[0]);
      const firstMean = first.reduce((sum, value) => sum + value, 0) / replicates;
      expect(Math.abs(firstMean - truth.ancestral_mean)).toBeLessThan(4 * Math.sqrt(0.02 / replicates));
    });
  }

  it('specimen form: the within-horizon sample variances average to v (unbiased, n - 1 divisor)', () => {
    const lineages = simulatedLineages('specimen');
    const variances = lineages.flatMap((lineage) => Array.from(lineage.withinVariance));
    const average = variances.reduce((sum, value) => sum + value, 0) / variances.length;
    // Var(s^2) = 2 v^2 / (n - 1) for normal specimens: SE of the average = v sqrt(2 / ((n - 1) K)).
    expect(Math.abs(average / 0.2 - 1)).toBeLessThan(4 * Math.sqrt(2 / (9 * variances.length)));
  });
});

describe('horizons of one specimen (issue 19: simulate output reads back into fit)', () => {
  // A design read with --pool from a file whose n = 1 rows leave sd empty (a sample of one has no sd).
  const text = 'age,n,mean,sd\n5,1,10.0,\n4,3,10.2,0.5\n3,4,10.1,0.4\n2,1,10.5,\n1,5,10.4,0.6\n';
  const designs = buildLineages(readSamples(readTable(text, 'design.csv')), { pool: true });

  it('the design file itself reads with --pool (the empty sd of an n = 1 row is no error), and still asks for --pool without it', () => {
    // Pooled variance, closed form: sum((n - 1) v) / sum(n - 1) = (2 * 0.25 + 3 * 0.16 + 4 * 0.36) / 9.
    expect(designs[0].withinVariance[0]).toBeCloseTo((2 * 0.25 + 3 * 0.16 + 4 * 0.36) / 9, 14);
    expect(() => buildLineages(readSamples(readTable(text, 'design.csv')))).toThrow('design.csv line 2, column "sd": is empty where n = 1 (one specimen has no standard deviation), got ""; --pool handles this');
  });

  it('summary output leaves the sd of n = 1 rows empty and reads back with --pool to the same design', () => {
    const output = simulatedTable({ model: directionalWalk, designs, parameters: [truth], replicates: 1, seed: 3, form: 'summary' });
    const rows = output.trim().split('\n').slice(1).map((row) => row.split(','));
    expect(rows.filter((row) => row[3] === '1').map((row) => row[5])).toEqual(['', '']);
    const [back] = buildLineages(readSamples(readTable(output, 'simulated.csv')), { pool: true });
    expect(Array.from(back.count)).toEqual(Array.from(designs[0].count));
    back.withinVariance.forEach((variance, i) => expect(variance).toBeCloseTo(designs[0].withinVariance[i], 9));
  });
});
