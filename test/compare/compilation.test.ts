import { describe, expect, it } from 'vitest';
import { distribution, summariseCompilation } from '../../src/compare/compilation.js';
import type { LineageFit } from '../../src/fit/fit-lineage.js';
import { compilationDocument, compilationTable } from '../../src/render/compilation-table.js';

/** A minimal lineage fit: weights per model and a drift estimate with its interval (what the summary reads). */
function fakeFit(name: string, weights: Record<string, number | null>, drift: { estimate: number; lower: number | null; upper: number | null } | null): LineageFit {
  const ids = Object.keys(weights);
  let best: string | null = null;
  for (const id of ids) if (weights[id] !== null && (best === null || (weights[id] as number) > (weights[best] as number))) best = id;
  return {
    lineage: { section: name, trait: 'length', timeUnit: { label: 'Myr', years: 1e6 } },
    best,
    smoothed: null,
    models: ids.map((id) => ({
      id,
      label: `${id} label`,
      weight: weights[id],
      parameters: id === 'directional-walk' && drift ? { drift: { ...drift, atBound: null, lowerAtBound: false, upperAtBound: false } } : {},
    })),
  } as unknown as LineageFit;
}

describe('distribution', () => {
  it('gives the quartiles of Hyndman & Fan type 7 (numpy.percentile default)', () => {
    // Closed form of type 7: position (n - 1) p, linear between order statistics; numpy.percentile([1,2,3,4],[25,50,75]) = [1.75, 2.5, 3.25].
    const even = distribution([4, 1, 3, 2]);
    expect(even.lowerQuartile).toBeCloseTo(1.75, 12);
    expect(even.median).toBeCloseTo(2.5, 12);
    expect(even.upperQuartile).toBeCloseTo(3.25, 12);
    // numpy.percentile([0.3,-1.2,5.5,2.0,0.0,7.25,-0.4],[25,50,75]) = [-0.2, 0.3, 3.75]; numpy.mean = 1.9214285714285713.
    const odd = distribution([0.3, -1.2, 5.5, 2.0, 0.0, 7.25, -0.4, null, Number.NaN]);
    expect(odd.count).toBe(7);
    expect(odd.lowerQuartile).toBeCloseTo(-0.2, 12);
    expect(odd.median).toBeCloseTo(0.3, 12);
    expect(odd.upperQuartile).toBeCloseTo(3.75, 12);
    expect(odd.mean).toBeCloseTo(1.9214285714285713, 12);
    expect(odd.minimum).toBe(-1.2);
    expect(odd.maximum).toBe(7.25);
    expect(distribution([null]).median).toBeNull();
  });
});

describe('summariseCompilation', () => {
  const fits = [
    fakeFit('A', { stasis: 0.7, 'random-walk': 0.2, 'directional-walk': 0.1 }, { estimate: 0.5, lower: 0.1, upper: 0.9 }),
    fakeFit('B', { stasis: 0.1, 'random-walk': 0.6, 'directional-walk': 0.3 }, { estimate: -0.4, lower: -0.8, upper: -0.05 }),
    fakeFit('C', { stasis: 0.05, 'random-walk': 0.15, 'directional-walk': 0.8 }, { estimate: 0.2, lower: -0.1, upper: 0.5 }),
    fakeFit('D', { stasis: null, 'random-walk': null, 'directional-walk': null }, null),
  ];
  const summary = summariseCompilation(fits);

  it('counts wins per model and summarises the Akaike weights', () => {
    expect(summary.lineages).toBe(4);
    expect(summary.compared).toBe(3);
    expect(summary.models.map((model) => [model.id, model.wins])).toEqual([['stasis', 1], ['random-walk', 1], ['directional-walk', 1]]);
    const stasis = summary.models[0];
    expect(stasis.compared).toBe(3);
    expect(stasis.winShare).toBeCloseTo(1 / 3, 12);
    // Weights 0.05, 0.1, 0.7: median 0.1, mean 0.85 / 3 (arithmetic).
    expect(stasis.weight.median).toBeCloseTo(0.1, 12);
    expect(stasis.weight.mean).toBeCloseTo(0.85 / 3, 12);
    expect(stasis.weights).toEqual([0.7, 0.1, 0.05, null]);
  });

  it('summarises drift and counts intervals that exclude zero', () => {
    const drift = summary.drift!;
    expect(drift.estimate.count).toBe(3);
    expect(drift.estimate.median).toBeCloseTo(0.2, 12);
    expect(drift.positive).toBe(1);
    expect(drift.negative).toBe(1);
    expect(drift.withInterval).toBe(3);
    expect(drift.winnersEstimate.count).toBe(1);
    expect(drift.winnersEstimate.median).toBeCloseTo(0.2, 12);
  });

  it('renders a table with the caution and a JSON document with one entry per lineage', () => {
    const text = compilationTable(summary);
    expect(text).toContain('Compilation of 4 lineages (3 with models compared by AICc)');
    expect(text).toContain('wholly above 0 in 1 lineage, wholly below 0 in 1');
    expect(text).toContain('drift versus selection');
    const document = compilationDocument(summary) as { per_lineage: { best: string | null }[]; models: { wins: number }[] };
    expect(document.per_lineage.map((entry) => entry.best)).toEqual(['stasis', 'random-walk', 'directional-walk', null]);
    expect(document.models.reduce((sum, model) => sum + model.wins, 0)).toBe(3);
  });

  it('says so when no drift interval was computed', () => {
    const bare = summariseCompilation([fakeFit('A', { 'directional-walk': 1 }, { estimate: 0.5, lower: null, upper: null })]);
    expect(bare.drift!.withInterval).toBe(0);
    expect(compilationTable(bare)).toContain('no drift intervals');
  });
});
