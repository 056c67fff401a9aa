import { describe, expect, it } from 'vitest';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { designFromOptions, designLineage, extendDesign } from '../../src/simulate/design.js';
import { fitReplicate, type FitReplicateTask } from '../../src/simulate/replicates.js';
import { poolRunner } from '../../src/simulate/run-replicates.js';
import { simulatedTable } from '../../src/simulate/sample-table.js';
import { replicateSeed } from '../../src/random/seeds.js';

// Reproducibility is the contract of `simulate --seed` and of every
// replicate batch: these checks are exact (no tolerance).
const design = designFromOptions({ horizons: 12, spacing: 0.25, count: 15, withinVariance: 0.4 });
const parameters = { ancestral_mean: 5, drift: 0.3, step_variance: 0.05 };

describe('seeded simulation', () => {
  it('the same seed gives byte-identical output; another seed does not', () => {
    const request = { model: directionalWalk, designs: [designLineage(design)], parameters: [parameters], replicates: 3, seed: 42, form: 'summary' as const };
    expect(simulatedTable(request)).toBe(simulatedTable(request));
    expect(simulatedTable({ ...request, seed: 43 })).not.toBe(simulatedTable(request));
    expect(simulatedTable({ ...request, form: 'specimen' })).toBe(simulatedTable({ ...request, form: 'specimen' }));
  });

  it('a replicate does not depend on how many replicates are drawn (seed per replicate)', () => {
    const request = { model: directionalWalk, designs: [designLineage(design)], parameters: [parameters], seed: 7, form: 'summary' as const };
    const rowsOf = (text: string, section: string) => text.split('\n').filter((line) => line.startsWith(section));
    const few = simulatedTable({ ...request, replicates: 2 });
    const many = simulatedTable({ ...request, replicates: 9 });
    expect(rowsOf(many, 'simulated r002')).toEqual(rowsOf(few, 'simulated r002'));
    expect(rowsOf(few, 'simulated r002').length).toBe(12);
  });

  it('replicate seeds differ between neighbouring coordinates and repeat for equal ones', () => {
    const seeds = new Set<number>();
    for (let stream = 0; stream < 10; stream++) for (let index = 0; index < 100; index++) seeds.add(replicateSeed(1, stream, index));
    expect(seeds.size).toBe(1000);
    expect(replicateSeed(5, 3, 9)).toBe(replicateSeed(5, 3, 9));
  });

  it('results are identical on 1 and 2 worker threads', async () => {
    const tasks: FitReplicateTask[] = Array.from({ length: 8 }, (_, index) => ({
      design,
      generator: 'directional-walk',
      parameters,
      fit: ['stasis', 'random-walk', 'directional-walk'],
      seed: 3,
      stream: 1,
      index,
    }));
    const inline = await poolRunner({ threads: 1 }).fits(tasks);
    const threaded = await poolRunner({ threads: 2 }).fits(tasks);
    expect(threaded).toEqual(inline);
    expect(inline[0]).toEqual(fitReplicate(tasks[0]));
  });
});

describe('designs', () => {
  it('extends a design at its own spacing and sample sizes, cycling through them', () => {
    const base = { time: [0, 1, 3], count: [5, 6, 7], withinVariance: [1, 1, 2], timeUnit: 'Myr' };
    const longer = extendDesign(base, 7);
    expect(longer.time).toEqual([0, 1, 3, 4, 6, 7, 9]);
    expect(longer.count).toEqual([5, 6, 7, 5, 6, 7, 5]);
    expect(extendDesign(base, 2).time).toEqual([0, 1]);
  });
  it('a design lineage carries e_i = v_i / n_i (MODELS.md)', () => {
    const lineage = designLineage({ time: [0, 1], count: [4, 10], withinVariance: [2, 5], timeUnit: 'Myr' });
    expect(Array.from(lineage.samplingVariance)).toEqual([0.5, 0.5]);
  });
});
