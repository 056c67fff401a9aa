import { describe, expect, it } from 'vitest';
import { ageMonteCarlo, redrawAgeModel, spreadOf, summariseDraws } from '../../src/compare/age-uncertainty.js';
import { quantileOfSorted } from '../../src/statistics/quantiles.js';
import { compareTraits } from '../../src/compare/compare-sections.js';
import { ageFunction, hasAgeUncertainty, readAgeModel, type AgeModel } from '../../src/data/age-model.js';
import { readTable } from '../../src/data/read-table.js';
import { readSamples } from '../../src/data/samples.js';
import { fitLineage } from '../../src/fit/fit-lineage.js';
import { buildLineages } from '../../src/lineage.js';
import { classicModels } from '../../src/models/registry.js';
import { createRandom } from '../../src/random/random.js';

// Invented demo-style data (heights in two fictional sections); what is checked is
// an identity (sd = 0 draws equal the plain fit) and reproducibility, not the values.
const samplesText = [
  'section,trait,height,n,mean,sd',
  'Orlen Gap,width,1,12,3.02,0.3', 'Orlen Gap,width,6,14,3.11,0.28', 'Orlen Gap,width,11,10,3.35,0.31', 'Orlen Gap,width,17,15,3.38,0.3',
  'Orlen Gap,width,22,11,3.61,0.29', 'Orlen Gap,width,29,13,3.70,0.33', 'Orlen Gap,width,35,12,3.88,0.3',
  'Marrow Cut,width,2,12,3.20,0.3', 'Marrow Cut,width,5,12,3.26,0.3', 'Marrow Cut,width,9,13,3.41,0.32', 'Marrow Cut,width,14,14,3.52,0.28',
  'Marrow Cut,width,18,10,3.58,0.3', 'Marrow Cut,width,24,12,3.79,0.31',
].join('\n') + '\n';
const samples = readSamples(readTable(samplesText, 'samples.csv'));
const ties = (sd: number): AgeModel => readAgeModel(readTable(
  `section,height,age,age_sd\nOrlen Gap,0,9,${sd}\nOrlen Gap,20,8.2,${sd}\nOrlen Gap,40,7.1,${sd}\nMarrow Cut,0,8.8,${sd}\nMarrow Cut,25,7.6,${sd}\n`,
  'ties.csv',
));
const lineagesUnder = (model: AgeModel) => buildLineages(samples, { ageOf: ageFunction(model) });

describe('Monte Carlo over tie-point ages', () => {
  // Identity (the issue): with every age_sd = 0 every draw is the age model itself, so each refit equals the plain fit exactly.
  it('with all age_sd = 0 reproduces the plain fit exactly', () => {
    const model = ties(0);
    const plain = lineagesUnder(model).map((lineage) => fitLineage(lineage, classicModels, { intervals: false }));
    const draws = ageMonteCarlo(model, 3, 99, (drawn) => lineagesUnder(drawn).map((lineage) => fitLineage(lineage, classicModels, { intervals: false })));
    for (const draw of draws) {
      draw.forEach((fit, index) => {
        expect(Array.from(fit.lineage.time)).toEqual(Array.from(plain[index].lineage.time));
        fit.models.forEach((model, j) => {
          expect(model.logLik).toBe(plain[index].models[j].logLik);
          expect(model.weight).toBe(plain[index].models[j].weight);
          expect(model.estimates).toEqual(plain[index].models[j].estimates);
        });
      });
    }
    const summary = summariseDraws(draws.map((draw) => draw[0].models.map((m) => ({ key: m.id, weight: m.weight, best: draw[0].best === m.id, estimates: m.estimates }))));
    for (const spread of summary) {
      const plainModel = plain[0].models.find((m) => m.id === spread.key)!;
      expect(spread.weight.median).toBe(plainModel.weight);
      expect(spread.weight.lower).toBe(plainModel.weight);
      expect(spread.bestFraction).toBe(plain[0].best === spread.key ? 1 : 0);
    }
  });

  // Same for the comparison: sd = 0 draws give exactly the plain hypotheses' logL.
  it('comparison draws with all age_sd = 0 equal the plain comparison', () => {
    const model = ties(0);
    const plain = compareTraits(lineagesUnder(model), classicModels, { intervals: false });
    const [draw] = ageMonteCarlo(model, 1, 5, (drawn) => compareTraits(lineagesUnder(drawn), classicModels, { intervals: false }));
    expect(draw.comparisons[0].hypotheses.map((h) => h.logLik)).toEqual(plain.comparisons[0].hypotheses.map((h) => h.logLik));
  });

  // Seeded: the same seed gives identical draws; another seed gives different ages.
  it('is reproducible with a seed and moves the ages when age_sd > 0', () => {
    const model = ties(0.08);
    const run = (seed: number) => ageMonteCarlo(model, 4, seed, (drawn) => lineagesUnder(drawn).map((lineage) => Array.from(lineage.time)));
    expect(run(42)).toEqual(run(42));
    expect(run(42)).not.toEqual(run(43));
    const plainTimes = lineagesUnder(model).map((lineage) => Array.from(lineage.time));
    expect(run(42)[0]).not.toEqual(plainTimes);
  });

  // Type-7 quantiles (Hyndman & Fan 1996, the numpy/R default): numpy.quantile([1, 2, 3, 4], [0.5, 0.025, 0.975]) = 2.5, 1.075, 3.925.
  it('quantiles match numpy\'s default (type 7)', () => {
    expect(quantileOfSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    const spread = spreadOf([4, null, 2, 1, 3]);
    expect(spread.lower).toBeCloseTo(1.075, 12);
    expect(spread.upper).toBeCloseTo(3.925, 12);
    expect(spread.count).toBe(4);
  });
});

describe('age model: Monte Carlo redraws', () => {
  const model = readAgeModel(readTable('section,height,age,age_sd\nA,0,10,0.3\nA,50,9.8,0.3\nA,80,5,0.1\nB,0,7,0\nB,10,6,0\n', 'ties.csv'));
  it('keeps ties in stratigraphic order and is reproducible with a seed', () => {
    expect(hasAgeUncertainty(model)).toBe(true);
    const first = createRandom(11);
    const second = createRandom(11);
    for (let draw = 0; draw < 200; draw++) {
      const a = redrawAgeModel(model, first).sections.get('A')!;
      const b = redrawAgeModel(model, second).sections.get('A')!;
      expect(a.map((tie) => tie.age)).toEqual(b.map((tie) => tie.age));
      expect(a[0].age).toBeGreaterThan(a[1].age);
      expect(a[1].age).toBeGreaterThan(a[2].age);
    }
  });
  it('leaves ties with age_sd = 0 exactly as they are', () => {
    const drawn = redrawAgeModel(model, createRandom(3));
    expect(drawn.sections.get('B')).toBe(model.sections.get('B'));
  });
});
