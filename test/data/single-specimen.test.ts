/**
 * Issue 18 item 4: a horizon with one specimen and an empty sd (what a
 * spreadsheet exports where n = 1). With --pool it is accepted and adds
 * nothing to the pooled variance; without --pool the refusal names the sd
 * column and says that --pool handles it (the exact message is in
 * test/robustness/malformed.test.ts, file n-one-empty-sd-without-pool.csv).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadLineages, readInput } from '../../src/analyses/input.js';
import { InputError } from '../../src/data/errors.js';
import { WarningLog } from '../../src/data/warnings.js';
import { root } from '../robustness/cli.js';

const folder = join(root, 'test', 'fixtures', 'brindle');
// The two ties (0 m = 1.0 Myr, 70 m = 4.4 Myr), interpolated here by hand: age = 1 + depth × 3.4 / 70.
const ageOf = (_section: string, signed: number) => ({ age: 1 + (-signed * 3.4) / 70, extrapolated: false });

function lineageOf(file: string, pool: boolean) {
  const input = readInput(join(folder, file));
  return loadLineages(input, { pool, decimalComma: true }, new WarningLog(), { ageOf })[0];
}

describe('an empty sd where n = 1 (issue 18 item 4)', () => {
  it('is accepted with --pool and gives the pooled variance sum((n-1) sd²) / sum(n-1) of the other rows', () => {
    const lineage = lineageOf('brindle-empty-sd.csv', true);
    // Closed form (MODELS.md pooled variance) computed here from the file's own cells; rows with n = 1 carry weight 0.
    const rows = readFileSync(join(folder, 'brindle-empty-sd.csv'), 'utf8').trim().split('\n').slice(1).map((line) => line.split(';'));
    let weighted = 0;
    let degrees = 0;
    for (const row of rows) {
      const n = Number(row[3]);
      if (n === 1) {
        expect(row[5]).toBe('');
        continue;
      }
      const sd = Number(row[5].replace(',', '.'));
      weighted += (n - 1) * sd * sd;
      degrees += n - 1;
    }
    expect(lineage.mean.length).toBe(22);
    for (const value of lineage.withinVariance) expect(value).toBeCloseTo(weighted / degrees, 9);
    for (let i = 0; i < 22; i++) expect(lineage.samplingVariance[i]).toBeCloseTo(weighted / degrees / lineage.count[i], 9);
  });

  it('gives the same lineage as the file that writes sd 0 where n = 1 (one specimen adds nothing to the pool)', () => {
    const empty = lineageOf('brindle-empty-sd.csv', true);
    const zero = lineageOf('brindle.csv', true);
    expect(Array.from(empty.samplingVariance)).toEqual(Array.from(zero.samplingVariance));
    expect(Array.from(empty.mean)).toEqual(Array.from(zero.mean));
    expect(Array.from(empty.time)).toEqual(Array.from(zero.time));
  });

  it('is refused without --pool, naming the sd column and --pool', () => {
    let caught: unknown;
    try {
      lineageOf('brindle-empty-sd.csv', false);
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(InputError);
    const message = (caught as InputError).message;
    // The oldest such horizon (depth 55.66 m, line 21) is named: lineages are checked oldest first.
    expect(message).toContain('brindle-empty-sd.csv line 21, column "sd"');
    expect(message).toContain('--pool');
    expect(message).toContain('got ""');
  });

  it('an empty sd where n > 1 is still refused as a missing number', () => {
    const input = { name: 'wider.csv', sha256: '', text: 'trait;age;n;mean;sd\nx;3;5;1,0;\nx;2;5;1,2;0,5\nx;1;5;1,1;0,5\n' };
    expect(() => loadLineages(input, { pool: true, decimalComma: true }, new WarningLog())).toThrow('wider.csv line 2, column "sd": is empty, expected a number');
  });
});
