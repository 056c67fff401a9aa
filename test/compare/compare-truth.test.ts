/**
 * Issue 20 (compare tells the truth) and issue 18 item 3 (compare's intervals):
 * models the data cannot support are left out with the reason, exact ties are
 * named as ties, the composite removes the estimated offsets, and compare uses
 * the calibrated default interval method. Every printed conclusion is checked
 * against the numbers it summarises.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Matrix, solve } from 'ml-matrix';
import { beforeAll, describe, expect, it } from 'vitest';
import { candidates, runCompare, type CompareRun } from '../../src/analyses/compare-run.js';
import { compareSections, sameFit, sameFitTolerance, sharedShiftReason } from '../../src/compare/compare-sections.js';
import { offsetModel } from '../../src/compare/joint-models.js';
import { comparisonDocument, comparisonTable, estimateText } from '../../src/render/comparison-output.js';
import { escapeHtml } from '../../src/render/report/html.js';
import { comparisonDocumentBlock } from '../../src/render/report/optional-blocks.js';
import { mergeSections } from '../../src/compare/stack.js';
import { summariseDraws } from '../../src/compare/age-uncertainty.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { formatNumber } from '../../src/render/units.js';
import { lineageFromArrays, type Lineage } from '../../src/lineage.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { randomWalk } from '../../src/models/random-walk.js';
import { stasis } from '../../src/models/stasis.js';
import { createRandom } from '../../src/random/random.js';
import { simulateMeans, withMeans } from '../../src/random/simulate-lineage.js';

type Json = Record<string, any>;
type Random = ReturnType<typeof createRandom>;

const heights = new URL('../../sample-data/locality-heights.csv', import.meta.url).pathname;
const ties = new URL('../../sample-data/locality-ties.csv', import.meta.url).pathname;
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-compare-truth-'));

/** A simulated section: `size` horizons evenly spaced over `span`, first horizon at age `firstAge`. */
function simulatedSection(random: Random, name: string, size: number, span: number, firstAge: number, parameters: Record<string, number>): Lineage {
  const time = Array.from({ length: size }, (_, i) => (span * i) / (size - 1));
  const design = { ...lineageFromArrays({ time, mean: time.map(() => 0), samplingVariance: time.map(() => 0.01), count: time.map(() => 20), section: name, trait: 'width' }), firstAge };
  return withMeans(design, simulateMeans(directionalWalk, design, parameters, random));
}

/**
 * Weighted least squares log-likelihood of y = X beta + eps, eps_i ~ N(0, e_i)
 * independent (closed form; beta from the normal equations solved by ml-matrix).
 */
function weightedLeastSquaresLogLik(design: number[][], data: number[], variance: number[]): number {
  const weighted = design.map((row, i) => row.map((value) => value / variance[i]));
  const normal = new Matrix(weighted).transpose().mmul(new Matrix(design));
  const right = new Matrix(weighted).transpose().mmul(Matrix.columnVector(data));
  const beta = solve(normal, right).to1DArray();
  let logLik = 0;
  data.forEach((value, i) => {
    const residual = value - design[i].reduce((sum, x, j) => sum + x * beta[j], 0);
    logLik += -0.5 * (Math.log(2 * Math.PI * variance[i]) + (residual * residual) / variance[i]);
  });
  return logLik;
}

describe('compare --models extended lists only what the data support', () => {
  let document: Json;
  let table: string;
  beforeAll(async () => {
    const run = await runCompare(heights, { ageModel: ties, intervals: false, models: 'extended' });
    document = run.document as Json;
    table = comparisonTable(run.run.comparisons[0]);
  }, 60_000);

  // The issue: 16 shared/shared-offset shift rows were "not fitted: the likelihood is not finite", and
  // covariate models were ranked without a covariate. Every listed hypothesis must now be a real fit.
  it('every listed hypothesis is fitted; shift models are separate only, with the reason for the rest', () => {
    for (const trait of document.traits) {
      for (const hypothesis of trait.hypotheses) {
        expect(hypothesis.converged, `${hypothesis.id} ${hypothesis.model}: ${hypothesis.message}`).toBe(true);
        expect(hypothesis.message).toBeNull();
        expect(/^covariate-/.test(hypothesis.model)).toBe(false);
        if (/punctuated|-then-|optimum-shift/.test(hypothesis.model)) expect(hypothesis.id).toBe('separate');
      }
      const leftOut = trait.left_out as Json[];
      // The six mode shifts, punctuated-1 (shared variance and separate) and optimum-shift: shared and shared-offset each, with the reason.
      const sharedShift = leftOut.filter((entry) => entry.reason === sharedShiftReason);
      expect(sharedShift).toHaveLength(2 * 9);
      // accelerating-walk: no shared hypothesis (its rate is searched relative to each section's span), with the reason.
      expect(leftOut.find((entry) => entry.model === 'accelerating-walk' && entry.id === 'shared')?.reason).toMatch(/own span/);
      // Brisk Fen Cut has 12 horizons: two shifts with segments of at least 5 horizons need 15 (5 + 5 + 5).
      for (const model of ['punctuated-2', 'punctuated-2-separate']) {
        const entry = leftOut.find((item) => item.model === model)!;
        expect(entry.id).toBe('every');
        expect(entry.reason).toMatch(/Brisk Fen Cut: 12 horizons leave no admissible shift position/);
      }
      for (const model of ['covariate-stasis', 'covariate-walk']) {
        expect(leftOut.find((item) => item.model === model)!.reason).toMatch(/no covariate/);
      }
      // Nothing is both listed and left out.
      for (const entry of leftOut) {
        expect(trait.hypotheses.some((h: Json) => h.model === entry.model && (entry.id === 'every' || h.id === entry.id))).toBe(false);
      }
    }
  });

  it('the report lists the left-out hypotheses with their reason, as the table does', () => {
    const html = comparisonDocumentBlock(document as never);
    expect(html).toContain('Left out, never ranked');
    const leftOut = (document.traits[0].left_out as Json[]);
    expect(leftOut.length).toBeGreaterThan(0);
    for (const entry of leftOut) expect(html).toContain(escapeHtml(`of ${entry.model}: ${entry.reason}`));
  });

  it('the table names no unfitted row and says what was left out and why', () => {
    expect(table).not.toMatch(/not finite anywhere/);
    expect(table).not.toMatch(/not compared/);
    expect(table).toMatch(/Left out, never ranked — shared and shared-offset of punctuated-1, .*: not fitted: a shift shared by several sections/);
    expect(table).toMatch(/every hypothesis of covariate-stasis, covariate-walk: not fitted: Quarrel Hollow: no covariate/);
  });
});

describe('hypotheses that cannot be fitted are left out with the reason, not listed', () => {
  // Section A has zero sampling variance everywhere: under a walk its first horizon is known exactly and the
  // joint density does not exist (DEVELOPERS.md, "singular for the data"); stasis still has a variance there.
  const a = { ...lineageFromArrays({ time: [0, 1, 2, 3, 4, 5], mean: [1, 1.2, 1.1, 1.5, 1.4, 1.7], samplingVariance: [0, 0, 0, 0, 0, 0], count: [5, 5, 5, 5, 5, 5], section: 'A', trait: 'x' }), firstAge: 10 };
  const b = { ...lineageFromArrays({ time: [0, 1, 2, 3, 4, 5], mean: [1, 1.3, 1.2, 1.4, 1.6, 1.5], samplingVariance: [0.01, 0.01, 0.01, 0.01, 0.01, 0.01], count: [5, 5, 5, 5, 5, 5], section: 'B', trait: 'x' }), firstAge: 9.5 };
  const comparison = compareSections([a, b], [stasis, randomWalk], { intervals: false });

  it('lists only fitted hypotheses; the walk is left out for every hypothesis with the singular-covariance reason', () => {
    expect(comparison.hypotheses.every((h) => h.converged)).toBe(true);
    expect(comparison.hypotheses.map((h) => h.model)).toEqual(['stasis', 'stasis', 'stasis']);
    const walk = comparison.leftOut.filter((entry) => entry.model === 'random-walk');
    expect(walk.map((entry) => entry.id)).toEqual(['separate', 'shared', 'shared-offset']);
    expect(walk[0].reason).toMatch(/^A: not fitted: the covariance is singular/);
    expect(comparisonTable(comparison)).toMatch(/Left out, never ranked — separate of random-walk: A: not fitted: the covariance is singular/);
  });
});

describe('exact ties are not rankings', () => {
  // Seeded: three sections of one directional walk with no random-walk component (step variance 0),
  // so the ML step variance sits at 0 under both joint hypotheses (checked below as a precondition).
  const random = createRandom(20);
  const common = { ancestral_mean: 5, drift: 0.8, step_variance: 0 };
  const sections = [
    simulatedSection(random, 'Orlen Gap', 12, 3, 12, common),
    simulatedSection(random, 'Marrow Cut', 10, 2.5, 11.8, { ...common, ancestral_mean: 5 + 0.8 * 0.2 }),
  ];
  const comparison = compareSections(sections, [directionalWalk], { intervals: false });
  const shared = comparison.hypotheses.find((h) => h.id === 'shared')!;
  const offset = comparison.hypotheses.find((h) => h.id === 'shared-offset')!;

  // Closed form: with step variance 0 both are the linear model "own start per section + common drift"
  // (offset: common start + drift x common time + offset = the same column space), fitted by weighted least squares.
  it('shared and shared-offset directional walks at step variance 0 are the same fit, equal to weighted least squares', () => {
    expect(shared.estimates.step_variance).toBe(0);
    expect(offset.estimates.step_variance).toBe(0);
    const design: number[][] = [];
    const data: number[] = [];
    const variance: number[] = [];
    sections.forEach((section, s) => section.time.forEach((t, i) => {
      design.push([s === 0 ? 1 : 0, s === 1 ? 1 : 0, t]);
      data.push(section.mean[i]);
      variance.push(section.samplingVariance[i]);
    }));
    const reference = weightedLeastSquaresLogLik(design, data, variance);
    expect(Math.abs(shared.logLik - reference)).toBeLessThan(1e-8);
    expect(Math.abs(offset.logLik - reference)).toBeLessThan(1e-8);
    expect(shared.k).toBe(offset.k);
    expect(sameFit(shared, offset)).toBe(true);
    expect(shared.sameFitAs).toEqual(['shared-offset directional-walk']);
    expect(offset.sameFitAs).toEqual(['shared directional-walk']);
  });

  it('the best is reported as a tie that cannot be told apart, with the combined weight of the tied rows', () => {
    expect(comparison.bestGroup.map((entry) => entry.id).sort()).toEqual(['shared', 'shared-offset']);
    const text = comparisonTable(comparison);
    expect(text).toMatch(/Best supported: cannot be told apart here — (shared directional-walk and shared-offset directional-walk|shared-offset directional-walk and shared directional-walk) are the same fit/);
    const combined = Number(/together they carry Akaike weight (\d+\.\d+)/.exec(text)![1]);
    expect(combined).toBeCloseTo(shared.weight! + offset.weight!, 3);
    // Equal AICc, so equal Akaike weights (Burnham & Anderson 2002): neither is "the" best.
    expect(Math.abs(shared.weight! - offset.weight!)).toBeLessThan(1e-6);
    expect(text.match(/<- best supported, tied \(same fit\)/g)).toHaveLength(2);
    expect(text).not.toMatch(/<- best supported$/m);
  });

  it('the report names the tie too: no single "best supported" row, the combined weight of the tied rows', () => {
    const html = comparisonDocumentBlock({ traits: [comparisonDocument(comparison)] } as never);
    expect(html.match(/best supported, tied \(same fit\)/g)).toHaveLength(2);
    expect(html).not.toContain('<strong>best supported</strong>');
    expect(html).toContain('Best supported: cannot be told apart here.');
    const combined = Number(/together they carry Akaike weight (\d+\.\d+)/.exec(html)![1]);
    expect(combined).toBeCloseTo(shared.weight! + offset.weight!, 3);
  });

  it('age-draw summaries count the tied rows together: each is best in every draw where the tie is best', () => {
    const spreads = summariseDraws([candidates(comparison), candidates(comparison), candidates(comparison)]);
    expect(spreads.find((spread) => spread.key === 'shared directional-walk')!.bestFraction).toBe(1);
    expect(spreads.find((spread) => spread.key === 'shared-offset directional-walk')!.bestFraction).toBe(1);
    const text = comparisonTable(comparison, { draws: 3, seed: 1, spreads, tiedDraws: 3 });
    expect(text).toMatch(/In 3 of 3 draws the best was a tie of identical fits/);
  });

  it('fits that differ by more than rounding are not ties', () => {
    expect(sameFit({ k: 3, logLik: 10 }, { k: 3, logLik: 10 + 100 * sameFitTolerance })).toBe(false);
    expect(sameFit({ k: 3, logLik: 10 }, { k: 4, logLik: 10 })).toBe(false);
    // The same sections with the second one's means bent a little: no longer one linear model, no tie.
    const other = compareSections([sections[0], { ...sections[1], mean: sections[1].mean.map((value, i) => value + 0.05 * Math.sin(i)) }], [randomWalk], { intervals: false });
    expect(other.bestGroup).toHaveLength(1);
  });
});

describe('--composite removes the offsets compare estimated, and says so', () => {
  let run: CompareRun;
  let document: Json;
  const truth = 0.6;
  beforeAll(async () => {
    // Seeded: one directional walk seen in two sections, the second shifted by +0.6 (the shared-offset model itself).
    const local = createRandom(33);
    const design = [
      simulatedSection(local, 'Orlen Gap', 14, 4, 12, { ancestral_mean: 5, drift: 0.8, step_variance: 0.02 }),
      simulatedSection(local, 'Marrow Cut', 12, 3.3, 11.6, { ancestral_mean: 5, drift: 0.8, step_variance: 0.02 }),
    ];
    const joint = offsetModel(directionalWalk, design);
    const means = simulateMeans(joint.model, joint.lineage, { ancestral_mean: 5, drift: 0.8, step_variance: 0.02, 'offset[Marrow Cut]': truth }, local);
    const merged = mergeSections(design);
    const rows = ['section,trait,age,n,mean,sd'];
    merged.sectionOf.forEach((s, i) => {
      const section = design[s];
      rows.push(`${section.section},width,${(merged.lineage.firstAge! - merged.lineage.time[i]).toFixed(6)},20,${means[i]},${Math.sqrt(0.01 * 20)}`);
    });
    const file = join(folder, 'offset-sections.csv');
    writeFileSync(file, rows.join('\n') + '\n');
    run = await runCompare(file, { intervals: false, composite: true, models: 'random-walk,directional-walk' });
    document = run.document as Json;
  }, 60_000);

  it('uses the offsets of the best-supported shared-offset fit and subtracts them from the section means', () => {
    const trait = document.traits[0];
    const offsetFits = trait.hypotheses.filter((h: Json) => h.id === 'shared-offset');
    const chosen = offsetFits.reduce((a: Json, b: Json) => (a.aicc <= b.aicc ? a : b));
    const record = document.composite_offsets[0];
    expect(record.model).toBe(chosen.model);
    expect(record.offsets_removed['Marrow Cut']).toBe(chosen.params['offset[Marrow Cut]'].estimate);
    // The estimate is near the generating offset (seeded simulation; its own sampling error is about 0.1).
    expect(Math.abs(record.offsets_removed['Marrow Cut'] - truth)).toBeLessThan(0.3);
    // Every composite mean is the section mean minus its section's offset (merged in common-time order).
    const composite = run.composites[0].lineage;
    const merged = mergeSections(run.run.comparisons[0].sections);
    merged.sectionOf.forEach((s, i) => {
      const removed = s === 0 ? 0 : record.offsets_removed['Marrow Cut'];
      expect(composite.mean[i]).toBeCloseTo(merged.lineage.mean[i] - removed, 12);
    });
    expect(run.compositeNotes[0]).toContain(`shared-offset ${chosen.model}`);
    expect(run.compositeNotes[0]).toContain(`added to each section's means: Marrow Cut ${formatNumber(-record.offsets_removed['Marrow Cut'])}`);
    const offsetWeight = offsetFits.reduce((sum: number, h: Json) => sum + h.weight, 0);
    expect(run.compositeNotes[0]).toContain(`the shared-offset hypotheses carry Akaike weight ${offsetWeight.toFixed(3)}`);
  });

  // Profile identity: with the offsets fixed at their joint maximum, the composite's maximum under the same
  // model equals the shared-offset maximum (the joint maximum over the remaining parameters).
  it('the composite logL of the model whose offsets were used equals its shared-offset logL', () => {
    const record = document.composite_offsets[0];
    const chosen = document.traits[0].hypotheses.find((h: Json) => h.id === 'shared-offset' && h.model === record.model);
    const composite = run.composites[0].models.find((model) => model.id === record.model)!;
    expect(Math.abs(composite.logLik - chosen.logLik)).toBeLessThan(1e-6);
  });
});

describe('compare uses the calibrated default interval method (issue 18 item 3)', () => {
  let run: CompareRun;
  beforeAll(async () => {
    run = await runCompare(heights, { ageModel: ties, models: 'random-walk' });
  }, 60_000);

  it('by default every hypothesis has integrated-likelihood intervals and says so, not "profile"', () => {
    const comparison = run.run.comparisons[0];
    for (const hypothesis of comparison.hypotheses) expect(hypothesis.intervalMethod).toBe('integrated');
    expect((run.document as Json).provenance.options.intervals).toBe('integrated');
    const text = comparisonTable(comparison);
    expect(text).toMatch(/Its estimates \(95% integrated-likelihood intervals where computed\)/);
    expect(text).not.toMatch(/profile intervals/);
  });

  it('the printed intervals are those of the fitter with the same method (shared-offset and one section of separate)', () => {
    const comparison = run.run.comparisons[0];
    const offset = comparison.hypotheses.find((h) => h.id === 'shared-offset')!;
    const direct = fitModel(offset.joint!.model, offset.joint!.lineage, { intervalMethod: 'integrated' });
    for (const [name, estimate] of Object.entries(direct.parameters)) {
      expect(offset.parameters[name].lower).toBe(estimate.lower);
      expect(offset.parameters[name].upper).toBe(estimate.upper);
    }
    const separate = comparison.hypotheses.find((h) => h.id === 'separate')!;
    const single = fitModel(randomWalk, comparison.sections[1], { intervalMethod: 'integrated' });
    expect(separate.parameters['step_variance[Brisk Fen Cut]'].upper).toBe(single.parameters.step_variance.upper);
  });

  it('an unknown --intervals method is a usage error before any file is read', async () => {
    await expect(runCompare(join(folder, 'no-such-file.csv'), { intervals: 'bogus' })).rejects.toThrow(/--intervals must be one of profile, adjusted, bootstrap, integrated, got "bogus"/);
  });

  it('--intervals profile still gives the plain profile, labelled as asymptotic', async () => {
    const profile = await runCompare(heights, { ageModel: ties, models: 'random-walk', intervals: 'profile' });
    const comparison = profile.run.comparisons[0];
    for (const hypothesis of comparison.hypotheses) expect(hypothesis.intervalMethod).toBe('profile');
    expect(comparisonTable(comparison)).toMatch(/95% profile-likelihood \(asymptotic\) intervals where computed/);
  }, 60_000);
});

describe('interval ends in words', () => {
  // Common practice (and fit's table): "open" is said only of an end that reaches a bound or limit where the
  // likelihood stays above the cut-off; an end that was never computed is shown as a dash, not as "open".
  const base = { estimate: 0.3, lower: 0.1, upper: 0.9, atBound: null, lowerAtBound: false, upperAtBound: false } as const;
  it('prints "open" only for an end at a limit', () => {
    expect(estimateText('alpha', { ...base, upper: null, upperAtBound: true })).toBe('alpha 0.3 [0.1, open]');
    expect(estimateText('alpha', { ...base, upper: null })).toBe('alpha 0.3 [0.1, —]');
    expect(estimateText('alpha', { ...base, lower: null, upper: null })).toBe('alpha 0.3');
    expect(estimateText('alpha', base)).toBe('alpha 0.3 [0.1, 0.9]');
  });
});
