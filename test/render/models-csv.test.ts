/**
 * models.csv as `fit --out` writes it: the `extrapolated_horizons` column
 * (right after `horizons`) counts the horizons whose age the age model
 * extrapolated beyond its outermost ties. The expected count is worked out
 * here from the input files themselves (closed form: a horizon is
 * extrapolated exactly when its height lies outside the range of its
 * section's ties), and must also equal fit.json's count and per-horizon flags.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { lineageFromArrays } from '../../src/lineage.js';
import { fitLineage } from '../../src/fit/fit-lineage.js';
import { findModel } from '../../src/models/registry.js';
import { modelsCsv } from '../../src/render/models-csv.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const heights = new URL('../../sample-data/locality-heights.csv', import.meta.url).pathname;
const ties = new URL('../../sample-data/locality-ties.csv', import.meta.url).pathname;
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-models-csv-'));

type Json = Record<string, any>;

/** Rows of a small CSV without quoted fields, as objects keyed by header. */
function table(text: string): Record<string, string>[] {
  const [header, ...rows] = text.trim().split('\n').map((line) => line.split(','));
  return rows.map((cells) => Object.fromEntries(header.map((name, i) => [name, cells[i]])));
}

describe('models.csv: extrapolated_horizons', () => {
  it('with a shortened age model and --extrapolate, counts the horizons outside the ties, as fit.json does', async () => {
    // Quarrel Hollow loses its top tie (120 m), so its ties end at 80 m and higher horizons are extrapolated.
    const shortTies = join(folder, 'short-ties.csv');
    writeFileSync(shortTies, readFileSync(ties, 'utf8').replace('Quarrel Hollow,120,5.60,0.04\n', ''));
    const out = join(folder, 'out');
    // --no-trend-test: the checks count extrapolated horizons, not the verdict (issue 22).
    const run = await runCliHere(['fit', heights, '--age-model', shortTies, '--extrapolate', '--no-intervals', '--no-trend-test', '--models', 'random-walk', '--no-figures', '--out', out], root);
    expect(run.status, run.stderr).toBe(0);

    // Expected counts from the inputs: per section × trait, heights outside [lowest tie, highest tie].
    const tieRange = new Map<string, { low: number; high: number }>();
    for (const tie of table(readFileSync(shortTies, 'utf8'))) {
      const height = Number(tie.height);
      const range = tieRange.get(tie.section) ?? { low: Infinity, high: -Infinity };
      tieRange.set(tie.section, { low: Math.min(range.low, height), high: Math.max(range.high, height) });
    }
    const expected = new Map<string, number>();
    for (const sample of table(readFileSync(heights, 'utf8'))) {
      const key = `${sample.section}|${sample.trait}`;
      const range = tieRange.get(sample.section)!;
      const height = Number(sample.height);
      expected.set(key, (expected.get(key) ?? 0) + (height < range.low || height > range.high ? 1 : 0));
    }
    expect(expected.get('Quarrel Hollow|whorl width')).toBeGreaterThan(0);
    expect(expected.get('Brisk Fen Cut|whorl width')).toBe(0);

    const document = JSON.parse(readFileSync(join(out, 'fit.json'), 'utf8')) as Json;
    const csvText = readFileSync(join(out, 'models.csv'), 'utf8');
    const header = csvText.split('\n')[0].split(',');
    expect(header.slice(0, 5)).toEqual(['section', 'trait', 'horizons', 'extrapolated_horizons', 'time_unit']);
    const rows = table(csvText);
    // One model (random-walk) per lineage.
    expect(rows).toHaveLength(document.lineages.length);
    for (const lineage of document.lineages as Json[]) {
      const key = `${lineage.section}|${lineage.trait}`;
      const flagged = (lineage.data.extrapolated as boolean[]).filter(Boolean).length;
      expect(lineage.extrapolated_horizons, key).toBe(expected.get(key));
      expect(flagged, key).toBe(expected.get(key));
      const lineageRows = rows.filter((row) => row.section === lineage.section && row.trait === lineage.trait);
      expect(lineageRows, key).toHaveLength(1);
      for (const row of lineageRows) {
        expect(row.extrapolated_horizons, key).toBe(String(expected.get(key)));
        expect(row.horizons, key).toBe(String(lineage.horizons));
      }
    }
  });

  it('is 0 for a lineage placed without an age model', async () => {
    // Invented lineage: ages given directly, nothing extrapolated.
    const time = [0, 0.5, 1.1, 1.4, 2.0, 2.6];
    const lineage = lineageFromArrays({ time, mean: [1, 1.1, 1.05, 1.2, 1.3, 1.25], samplingVariance: time.map(() => 0.01), section: 'Tarn Spur', trait: 'rib count' });
    const fit = fitLineage(lineage, [findModel('random-walk')!], { intervals: false });
    const rows = table(modelsCsv([fit]));
    expect(rows).toHaveLength(1);
    expect(rows[0].extrapolated_horizons).toBe('0');
    expect(rows[0].horizons).toBe('6');
  });
});
