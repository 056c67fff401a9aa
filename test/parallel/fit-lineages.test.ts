import { describe, expect, it } from 'vitest';
import { benchLineage } from '../../bench/workload.js';
import { fitLineage } from '../../src/fit/fit-lineage.js';
import { classicModels } from '../../src/models/registry.js';
import { fitLineages } from '../../src/parallel/fit-lineages.js';

// Six invented 12-horizon lineages (seeded, bench/workload.ts), one per classic generating model and one more.
const lineages = Array.from({ length: 6 }, (_, k) => benchLineage(12, 4100 + k, k));

describe('fitLineages on threads (issue 14)', () => {
  it('gives the sequential fits, in input order, each carrying the caller\'s own lineage', async () => {
    // Reference: one fitLineage call per lineage in this thread (the definition of the batch).
    const sequential = lineages.map((lineage) => fitLineage(lineage, classicModels, { intervals: false }));
    for (const threads of [2, 3]) {
      const fits = await fitLineages(lineages, classicModels, { intervals: false }, { threads });
      // Every number equal (structured cloning copies doubles exactly), the same keys in the same order.
      expect(fits).toEqual(sequential);
      expect(fits.map((fit) => Object.keys(fit))).toEqual(sequential.map((fit) => Object.keys(fit)));
      // Workers send no lineage back: the fit holds the very object it was given, as a sequential fit does.
      fits.forEach((fit, index) => expect(fit.lineage).toBe(lineages[index]));
    }
  });
});
