/**
 * Issue 20, "power on the assumption users actually hold": when the fitted
 * step variance is 0 or poorly determined, power is run under the estimate
 * and under the upper end of its 95% interval, both are shown and named, and
 * a coverage check whose truth sits on the bound is reported as vacuous.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Matrix, inverse } from 'ml-matrix';
import { beforeAll, describe, expect, it } from 'vitest';
import { assumedStepVariances, powerTable, runPower, type PowerRun } from '../../src/analyses/power-run.js';
import { fitModel } from '../../src/fit/fit-model.js';
import { loadLineages, readInput } from '../../src/analyses/input.js';
import { WarningLog } from '../../src/data/warnings.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { assumedVarianceWords, powerAssumptionCaption, powerCurvePlan } from '../../src/render/figures/power-curve.js';
import { vacuousBoundWords } from '../../src/simulate/power.js';
import { formatNumber } from '../../src/render/units.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

type Json = Record<string, any>;
const shells = new URL('../../sample-data/shell-length.csv', import.meta.url).pathname;
const lineage = loadLineages(readInput(shells), {}, new WarningLog())[0];

/**
 * Closed form: standard error of the GLS drift of a directional walk,
 * Var(beta) = (X' V^-1 X)^-1 with X = [1, t], V_ij = s2 min(t_i, t_j) + e_i [i = j]
 * (MODELS.md covariance of a walk from the first horizon), by ml-matrix.
 */
function driftStandardError(time: ArrayLike<number>, sampling: ArrayLike<number>, stepVariance: number): number {
  const size = time.length;
  const covariance = new Matrix(size, size);
  for (let i = 0; i < size; i++) for (let j = 0; j < size; j++) covariance.set(i, j, stepVariance * Math.min(time[i], time[j]) + (i === j ? sampling[i] : 0));
  const design = new Matrix(Array.from({ length: size }, (_, i) => [1, time[i]]));
  const information = design.transpose().mmul(inverse(covariance)).mmul(design);
  return Math.sqrt(inverse(information).get(1, 1));
}

describe('power under the step variance the data allow', () => {
  let run: PowerRun;
  let document: Json;
  const fitted = fitModel(directionalWalk, lineage, { intervals: true, intervalMethod: 'integrated' });
  beforeAll(async () => {
    run = await runPower(shells, { replicates: '20', coverage: false, threads: '1', seed: '5' });
    document = run.document as Json;
  }, 120_000);

  it('the first lineage of the demo file has its step variance at 0 (the case of the issue)', async () => {
    expect(fitted.estimates.step_variance).toBe(0);
    expect(fitted.parameters.step_variance.upper).toBeGreaterThan(0);
  });

  it('runs under the estimate and the upper end of its 95% interval, the larger on top', async () => {
    const upper = fitted.parameters.step_variance.upper!;
    expect(run.assumptions.map((entry) => entry.stepVariance)).toEqual([0, upper]);
    expect(document.assumptions.map((entry: Json) => entry.settings.step_variance)).toEqual([0, upper]);
    expect(document.settings.step_variance).toBe(upper);
    expect(document.generator.step_variance).toBe(upper);
    expect(document.generator.fitted_step_variance).toBe(0);
    expect(document.grid).toEqual(document.assumptions[1].grid);
    // One drift grid for both, so the curves share an axis.
    expect(document.assumptions[0].grid.map((point: Json) => point.drift)).toEqual(document.assumptions[1].grid.map((point: Json) => point.drift));
  });

  it('each analysis uses the drift standard error of its own step variance (GLS closed form, ml-matrix)', async () => {
    for (const entry of run.assumptions) {
      expect(entry.driftStandardError).toBeCloseTo(driftStandardError(lineage.time, lineage.samplingVariance, entry.stepVariance), 10);
    }
    // The default grid runs from 0 to 5 standard errors at the larger step variance.
    const grid = document.grid.map((point: Json) => point.drift);
    expect(grid[grid.length - 1]).toBeCloseTo(5 * run.assumptions[1].driftStandardError, 12);
  });

  it('the table names each assumed step variance beside its own numbers', async () => {
    const text = powerTable(run);
    const blocks = text.split('\n  Assumed step variance ').slice(1);
    expect(blocks).toHaveLength(2);
    blocks.forEach((block, b) => {
      const report = run.assumptions[b].report;
      expect(Number(block.split(' ')[0])).toBeCloseTo(run.assumptions[b].stepVariance, 3);
      expect(block).toContain(`False-trend rate (true drift 0): best ${report.false_trend.p_best.toFixed(3)}, weight ${report.false_trend.p_weight.toFixed(3)}, LRT ${report.false_trend.p_lrt.toFixed(3)}`);
      // Every grid row carries the assumed step variance and its three rates.
      const rows = block.split('\n').filter((line) => /^\s+[\d.e+-]+\s+[\d.e+-]+\s+[\d.e+-]+\s+[01]\.\d{3}/.test(line));
      expect(rows).toHaveLength(report.grid.length);
      rows.forEach((row, r) => {
        const cells = row.trim().split(/\s+/);
        expect(Number(cells[2])).toBeCloseTo(run.assumptions[b].stepVariance, 3);
        expect(cells.slice(3)).toEqual([report.grid[r].p_best.toFixed(3), report.grid[r].p_weight.toFixed(3), report.grid[r].p_lrt.toFixed(3)]);
      });
    });
    expect(run.notes.join('\n')).toMatch(/fitted step variance 0 is at its bound 0: power is shown under it and under 0\.05\d*, the upper end of its 95% interval/);
    // The comparing note quotes the two analyses' own numbers.
    const [low, high] = run.assumptions.map((entry) => entry.report);
    const at = (value: number | null): string => (value === null ? 'beyond the grid' : formatNumber(value));
    expect(run.notes).toContain(
      `under step variance 0 (fitted estimate) the false-trend rate is ${low.false_trend.p_best.toFixed(3)} (AICc best) and ${low.false_trend.p_lrt.toFixed(3)} (test), ` +
        `and 80% test power is reached at drift ${at(low.smallest_drift.p_lrt)}; under ${formatNumber(run.assumptions[1].stepVariance)} (upper end of its 95% interval) at ${at(high.smallest_drift.p_lrt)}`,
    );
  });

  it('the figure prints the assumed step variances and draws three curves for each', async () => {
    const input = {
      grid: run.report.grid, lineage: 'x', horizons: 24, replicates: 20, timeUnit: 'Myr', weightThreshold: 0.5, targetPower: 0.8, level: 0.05, withinSd: 1,
      assumptions: run.assumptions.map((entry) => ({ stepVariance: entry.stepVariance, source: entry.source, grid: entry.report.grid })),
    };
    expect(assumedVarianceWords(input)).toMatch(/^Assumed step variance 0 \(fitted estimate; faded curves\) and 0\.05\d* \(upper end of its 95% interval.*; solid curves\) \(trait units\)² per Myr\.$/);
    const configuration = powerCurvePlan(input).plan.configuration() as Json;
    const curves = configuration.data.datasets.filter((dataset: Json) => /step variance/.test(dataset.label));
    expect(curves).toHaveLength(6);
    // The solid curves are the upper end's grid, point for point.
    const solidTest = curves.find((dataset: Json) => dataset.label.startsWith('bootstrap') && !dataset.label.endsWith('variance 0'));
    expect(solidTest.data.map((point: Json) => point.y)).toEqual(run.assumptions[1].report.grid.map((point) => point.p_lrt));
    expect(powerAssumptionCaption(document)).toMatch(/^Assumed step variance 0 \(fitted estimate\) and 0\.05\d* \(upper end of its 95% interval\)/);
    // A document with one assumption names it too (the two report captions are no longer identical).
    expect(powerAssumptionCaption({ settings: { step_variance: 0.2 } })).toBe('Assumed step variance 0.2.');
  });
});

describe('when to add the upper end', () => {
  // A well-determined estimate (upper end < 4 x estimate) keeps one analysis; a given list is used as given.
  it('keeps the estimate alone when it is well determined, and a given list as given', async () => {
    const fit = fitModel(directionalWalk, lineage, { intervals: true, intervalMethod: 'integrated' });
    const upper = fit.parameters.step_variance.upper!;
    expect(assumedStepVariances(lineage, upper / 2, undefined, [])).toHaveLength(1);
    expect(assumedStepVariances(lineage, upper / 5, undefined, []).map((entry) => entry.stepVariance)).toEqual([upper / 5, upper]);
    expect(assumedStepVariances(lineage, 0, [0.3, 0.1], []).map((entry) => entry.stepVariance)).toEqual([0.1, 0.3]);
  });
});

describe('coverage when the truth sits on the bound', () => {
  it('reports the step variance coverage as vacuous (null, with the reason) instead of 1.000', async () => {
    const run = await runPower(shells, { replicates: '20', drifts: '0,0.2', stepVariance: '0', threads: '1', seed: '5' });
    const coverage = run.report.coverage!;
    for (const values of Object.values(coverage.coverage)) {
      expect(values.step_variance).toBeNull();
      expect(values.drift).toBeGreaterThan(0);
    }
    expect(coverage.vacuous.step_variance).toBe(vacuousBoundWords);
    const text = powerTable(run);
    expect(text).toMatch(/step_variance —/);
    expect(text).not.toMatch(/step_variance 1\.000/);
    expect(text).toContain('step_variance: not checked (—): the true step variance is 0, its lower bound');
  }, 120_000);
});

describe('report --power-step-variance', () => {
  it('passes the assumed step variance to the power analyses and names it in the figure caption', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-power-assumption-'));
    const out = join(folder, 'report.html');
    // One lineage (the first section of the demo file), so the report runs one power analysis.
    const lines = readFileSync(shells, 'utf8').trim().split('\n');
    const single = join(folder, 'one-lineage.csv');
    writeFileSync(single, [lines[0], ...lines.slice(1).filter((line) => line.startsWith('Varnek Draw,'))].join('\n') + '\n');
    // --no-trend-test: the check reads the assumed step variance on the page, not the verdict (issue 22).
    const result = await runCliHere(['report', single, '--no-intervals', '--no-trend-test', '--power', '--power-replicates', '20', '--power-step-variance', '0.02', '--out', out, '--quiet'], root);
    expect(result.status, result.stderr).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('Assumed step variance 0.02.');
    const help = await runCliHere(['report', '--help'], root);
    expect(help.stdout).toMatch(/--power-step-variance <list>/);
  }, 180_000);
});
