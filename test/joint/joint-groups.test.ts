import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { readTable } from '../../src/data/read-table.js';
import { readSamples } from '../../src/data/samples.js';
import { WarningLog } from '../../src/data/warnings.js';
import { jointGroups, readSpecimens, validCovarianceShare } from '../../src/joint/joint-groups.js';
import { buildLineages } from '../../src/lineage.js';

// The within-horizon sampling covariance of several traits from a specimen column (joint-groups.ts): each pair's
// covariance of means is r_jl sqrt(e_j e_l) n_jl / sqrt(n_j n_l) from the n_jl specimens measured for both (the
// covariance of two means of overlapping samples, common practice). With three traits measured on different subsets of
// specimens the pairwise correlations need not fit together. Checked with ml-matrix's eigenvalue decomposition (a
// general-purpose library): a covariance matrix has no negative eigenvalue.

function minimumEigenvalue(values: ArrayLike<number>, k: number): number {
  const matrix = new Matrix(Array.from({ length: k }, (_, j) => Array.from({ length: k }, (_, l) => values[j * k + l])));
  return Math.min(...new EigenvalueDecomposition(matrix).realEigenvalues);
}

function groupsOf(rows: string[]): { groups: ReturnType<typeof jointGroups>; warnings: WarningLog } {
  const table = readTable(['section,trait,age,specimen,value', ...rows].join('\n'), 'partly-paired.csv');
  const samples = readSamples(table);
  const warnings = new WarningLog();
  const groups = jointGroups(buildLineages(samples), 'partly-paired.csv', warnings, readSpecimens(table, samples, {}));
  return { groups, warnings };
}

// Ages 0, 2 and 3: every specimen measured for all three traits (a lineage needs three horizons).
const fullyPaired = ['0,t1,1,2,4', '0,t2,2,1,5', '0,t3,4,3,5', '0,t4,3,5,7', '2,u1,2,2,3', '2,u2,3,4,4', '2,u3,1,2,2', '3,v1,2,3,3', '3,v2,3,4,4'].flatMap((line) => {
  const [age, id, a, b, c] = line.split(',');
  return [`X,a,${age},${id},${a}`, `X,b,${age},${id},${b}`, `X,c,${age},${id},${c}`];
});

// Age 1: specimens measured for some of the traits only (found by a random search of small designs): the pairwise
// correlations, each from the specimens measured for both traits, cannot hold together.
const partlyPaired = ['p1,,4,1', 'p2,4,5,2', 'p3,4,5,2', 'p4,,2,5', 'p5,2,4,1', 'p6,,,1'].flatMap((line) => {
  const [id, ...values] = line.split(',');
  return values.flatMap((value, j) => (value === '' ? [] : [`X,${'abc'[j]},1,${id},${value}`]));
});

/** The covariance of the means of the specimens of two traits at age 1 by the formula above, from its definitions. */
function partlyPairedCovariance(): number[] {
  const table = [[NaN, 4, 1], [4, 5, 2], [4, 5, 2], [NaN, 2, 5], [2, 4, 1], [NaN, NaN, 1]];
  const column = (j: number): number[] => table.map((row) => row[j]).filter((value) => !Number.isNaN(value));
  const variance = (values: number[]): number => {
    const mean = values.reduce((sum, value) => sum + value, 0) / values.length;
    return values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (values.length - 1);
  };
  const n = [0, 1, 2].map((j) => column(j).length);
  const e = [0, 1, 2].map((j) => variance(column(j)) / n[j]);
  const result = new Array<number>(9).fill(0);
  for (let j = 0; j < 3; j++) {
    result[j * 3 + j] = e[j];
    for (let l = 0; l < j; l++) {
      const both = table.filter((row) => !Number.isNaN(row[j]) && !Number.isNaN(row[l]));
      const x = both.map((row) => row[j]);
      const y = both.map((row) => row[l]);
      const mx = x.reduce((sum, value) => sum + value, 0) / x.length;
      const my = y.reduce((sum, value) => sum + value, 0) / y.length;
      let sxy = 0;
      let sxx = 0;
      let syy = 0;
      x.forEach((value, i) => {
        sxy += (value - mx) * (y[i] - my);
        sxx += (value - mx) ** 2;
        syy += (y[i] - my) ** 2;
      });
      const value = (sxy / Math.sqrt(sxx * syy)) * Math.sqrt(e[j] * e[l]) * both.length / Math.sqrt(n[j] * n[l]);
      result[j * 3 + l] = value;
      result[l * 3 + j] = value;
    }
  }
  return result;
}

describe('joint sampling covariance from specimens measured for only some traits', () => {
  it('fully paired specimens: the sample covariance over n (closed form), no warning', () => {
    const { groups, warnings } = groupsOf(fullyPaired);
    const [group] = groups;
    const row = Array.from(group.position).indexOf(0);
    const block = group.data.sampling.subarray(row * 9, row * 9 + 9);
    // a = 1, 2, 4, 3 and c = 4, 5, 5, 7: means 2.5 and 5.25, cross-products (-1.5)(-1.25) + (-0.5)(-0.25) + (1.5)(-0.25) + (0.5)(1.75) = 2.5, over 3, over n = 4.
    expect(block[0 * 3 + 2]).toBeCloseTo(2.5 / 3 / 4, 12);
    expect(warnings.has('input')).toBe(false);
  });

  it('partly paired specimens whose correlations cannot hold together: scaled to the largest valid share, with a warning', () => {
    const { groups, warnings } = groupsOf([...fullyPaired, ...partlyPaired]);
    const [group] = groups;
    const row = Array.from(group.position).indexOf(1);
    const block = Array.from(group.data.sampling.subarray(row * 9, row * 9 + 9));
    const unscaled = partlyPairedCovariance();
    expect(minimumEigenvalue(unscaled, 3)).toBeLessThan(0);
    expect(minimumEigenvalue(block, 3)).toBeGreaterThan(-1e-12);
    const share = block[1] / unscaled[1];
    expect(share).toBeGreaterThan(0);
    expect(share).toBeLessThan(1);
    for (let index = 0; index < 9; index++) expect(block[index]).toBeCloseTo(index % 4 === 0 ? unscaled[index] : share * unscaled[index], 14);
    // The largest valid share: a little more and an eigenvalue is negative.
    const more = unscaled.map((value, index) => (index % 4 === 0 ? value : value * share * 1.0001));
    expect(minimumEigenvalue(more, 3)).toBeLessThan(0);
    expect(warnings.list().some((warning) => warning.category === 'input' && warning.message.includes('age 1') && warning.message.includes('do not form a valid covariance matrix'))).toBe(true);
  });

  it('validCovarianceShare: 1 for a valid matrix, 1/2 for correlations (1, 1, -1) (smallest eigenvalue 1 - 2s, closed form)', () => {
    expect(validCovarianceShare([2, 1, 1, 2], 2)).toBe(1);
    expect(validCovarianceShare([1, 1, -1, 1, 1, 1, -1, 1, 1], 3)).toBeCloseTo(0.5, 9);
  });
});
