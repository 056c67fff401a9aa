/**
 * The duplicate-time rule (src/lineage.ts mergeSameAge): rows of one lineage
 * at the same age are merged as if their specimens had been listed together.
 * Checked against the specimen form of the same specimens, summarised
 * directly (mean = sum / n, variance = sum of squared deviations / (n - 1):
 * common practice), and the `duplicate-time` warning must fire.
 */
import { describe, expect, it } from 'vitest';
import { readTable } from '../../src/data/read-table.js';
import { readSamples } from '../../src/data/samples.js';
import { WarningLog } from '../../src/data/warnings.js';
import { buildLineages } from '../../src/lineage.js';
import { InputError } from '../../src/data/errors.js';

function summary(values: readonly number[]): { n: number; mean: number; sd: number } {
  const n = values.length;
  const mean = values.reduce((sum, v) => sum + v, 0) / n;
  const variance = values.reduce((sum, v) => sum + (v - mean) ** 2, 0) / (n - 1);
  return { n, mean, sd: Math.sqrt(variance) };
}

describe('rows at the same time are merged like pooled specimens', () => {
  const first = [4.1, 4.4, 3.9, 4.6];
  const second = [5.0, 4.8, 5.3];
  const other = { 3: [4.0, 4.2, 4.5], 1: [4.9, 5.1, 5.2] } as const;

  it('the merged horizon equals the specimen form of the same specimens', () => {
    const a = summary(first);
    const b = summary(second);
    const rows = [
      'age,n,mean,sd',
      `2,${a.n},${a.mean},${a.sd}`,
      `3,3,${summary(other[3]).mean},${summary(other[3]).sd}`,
      `2,${b.n},${b.mean},${b.sd}`,
      `1,3,${summary(other[1]).mean},${summary(other[1]).sd}`,
    ];
    const warnings = new WarningLog();
    const [merged] = buildLineages(readSamples(readTable(rows.join('\n'), 'rows.csv')), { warnings });
    const specimens = ['age,value', ...first.map((v) => `2,${v}`), ...second.map((v) => `2,${v}`), ...other[3].map((v) => `3,${v}`), ...other[1].map((v) => `1,${v}`)];
    const [direct] = buildLineages(readSamples(readTable(specimens.join('\n'), 'specimens.csv')));
    expect(Array.from(merged.count)).toEqual([3, 7, 3]);
    const union = summary([...first, ...second]);
    expect(merged.mean[1]).toBeCloseTo(union.mean, 12);
    expect(merged.withinVariance[1]).toBeCloseTo(union.sd ** 2, 12);
    expect(Array.from(merged.mean).map((m, i) => m - direct.mean[i]).every((d) => Math.abs(d) < 1e-12)).toBe(true);
    expect(Array.from(merged.withinVariance).map((v, i) => v - direct.withinVariance[i]).every((d) => Math.abs(d) < 1e-12)).toBe(true);
    expect(warnings.has('duplicate-time')).toBe(true);
    expect(warnings.list().find((warning) => warning.category === 'duplicate-time')?.message).toBe(
      'lineage: 2 rows at age 2 (lines 2, 4) merged into one horizon (n = 7; mean weighted by n; variance of the combined specimens)',
    );
  });

  it('merging can leave too few horizons, which is refused', () => {
    const rows = ['age,n,mean,sd', '2,5,4,1', '2,6,4.5,1', '1,5,5,1'];
    expect(() => buildLineages(readSamples(readTable(rows.join('\n'), 'few.csv')))).toThrow(InputError);
    expect(() => buildLineages(readSamples(readTable(rows.join('\n'), 'few.csv')))).toThrow('few.csv line 2: lineage "lineage" has 2 horizons; at least 3 are needed to fit any model');
  });

  it('different sections at the same age are separate lineages, not merged', () => {
    const rows = ['section,age,n,mean,sd', 'A,3,5,4,1', 'B,3,5,9,1', 'A,2,5,4.2,1', 'B,2,5,9.1,1', 'A,1,5,4.4,1', 'B,1,5,9.3,1'];
    const warnings = new WarningLog();
    const lineages = buildLineages(readSamples(readTable(rows.join('\n'), 's.csv')), { warnings });
    expect(lineages.map((lineage) => lineage.mean.length)).toEqual([3, 3]);
    expect(warnings.has('duplicate-time')).toBe(false);
  });
});
