/**
 * Issue 24: the cost of the shift searches is stated before it bites. A model
 * placing k shifts searches every placement — C(N − (k+1)m + k, k) of them
 * (stars and bars, common practice), checked here against enumerating them —
 * so a lineage too long for it is refused before fitting, with a --models
 * list that leaves it out, and a long run is announced with an estimate.
 */
import { writeFileSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkShiftSearchCost, durationWords, placementCount, placementLimit, shiftSearchSeconds } from '../../src/analyses/run-cost.js';
import { WarningLog } from '../../src/data/warnings.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { shiftPlacements } from '../../src/models/punctuated-shifts.js';
import { modelSets } from '../../src/models/registry.js';
import { runCliHere } from '../support/cli-in-process.js';

/** An invented lineage of `size` horizons (only its length matters here). */
function lineageOf(size: number, section = 'Orrin Flat') {
  return lineageFromArrays({
    time: Float64Array.from({ length: size }, (_, i) => i),
    mean: Float64Array.from({ length: size }, (_, i) => Math.sin(i)),
    samplingVariance: new Float64Array(size).fill(0.01),
    section,
  });
}

describe('placement counts', () => {
  it('equal the number of placements the search enumerates (stars and bars)', async () => {
    for (const [size, shifts, minimum] of [[6, 1, 2], [20, 2, 5], [31, 2, 3], [40, 1, 5], [14, 2, 5], [15, 2, 5], [9, 3, 2]] as const) {
      expect(placementCount(size, shifts, minimum), `${size} ${shifts} ${minimum}`).toBe(shiftPlacements(size, shifts, minimum).length);
    }
    // Hand-computed: 3,000 horizons, two shifts, segments of 5: C(2987, 2) = 2987 · 2986 / 2.
    expect(placementCount(3000, 2, 5)).toBe(4_459_591);
  });
});

describe('checkShiftSearchCost', () => {
  const extended = modelSets.extended();

  it('refuses a lineage whose two-shift placements exceed the limit, naming it and a --models list without them', async () => {
    const warnings = new WarningLog();
    expect(() => checkShiftSearchCost([lineageOf(20), lineageOf(3000, 'Brisk Ledge')], extended, { warnings, write: () => {} })).toThrow(
      /^--models: lineage "Brisk Ledge" has 3,000 horizons; punctuated-2, punctuated-2-separate would search 4,459,591 placements of their shifts, more than the 2,000,000 this tool searches .*Leave them out: --models strict-stasis,stasis,random-walk,directional-walk,ou,punctuated-1,punctuated-1-separate,/,
    );
    // The suggestion leaves out the covariate models, which this lineage (no covariate) does not allow.
    let message = '';
    try {
      checkShiftSearchCost([lineageOf(3000)], extended, { warnings, write: () => {} });
    } catch (error) {
      message = (error as Error).message;
    }
    expect(message).toMatch(/Leave them out: --models strict-stasis,/);
    expect(message).not.toMatch(/covariate/);
    // The limit is on placements: just under it passes (two shifts, segments of 5: C(N − 13, 2) ≤ 2,000,000 up to N = 2,013).
    expect(placementCount(2013, 2, 5)).toBeLessThanOrEqual(placementLimit);
    expect(placementCount(2014, 2, 5)).toBeGreaterThan(placementLimit);
    expect(() => checkShiftSearchCost([lineageOf(2013)], extended, { warnings, write: () => {} })).not.toThrow();
    // A larger --min-segment leaves fewer placements.
    expect(() => checkShiftSearchCost([lineageOf(3000)], extended, { minimumSegment: 600, warnings, write: () => {} })).not.toThrow();
  });

  it('announces a long run with its estimate before fitting, once, and says nothing for short ones or the classic set', async () => {
    const printed: string[] = [];
    const warnings = new WarningLog();
    checkShiftSearchCost([lineageOf(1800)], extended, { warnings, write: (text) => printed.push(text) });
    expect(printed).toHaveLength(1);
    expect(printed[0]).toMatch(/^warning \(long-run\): the shift and mode-shift models \(11 of them\) search every placement of their shifts, .*\(longest lineage: 1,800\); this run will take roughly \d+ (seconds|minutes) .*--models classic\n$/);
    expect(warnings.has('long-run')).toBe(true);
    // The estimate is the stated formula (our own measurement, see run-cost.ts), in words.
    expect(printed[0]).toContain(`roughly ${durationWords(shiftSearchSeconds(1800, 11))}`);

    const quiet: string[] = [];
    const none = new WarningLog();
    checkShiftSearchCost([lineageOf(200)], extended, { warnings: none, write: (text) => quiet.push(text) });
    checkShiftSearchCost([lineageOf(100_000)], modelSets.classic(), { warnings: none, write: (text) => quiet.push(text) });
    expect(quiet).toEqual([]);
    expect(none.has('long-run')).toBe(false);
  });

  it('duration words', async () => {
    expect(durationWords(12.4)).toBe('12 seconds');
    expect(durationWords(600)).toBe('10 minutes');
    expect(durationWords(36_000)).toBe('10 hours');
  });
});

describe('fit --models extended on a very long lineage (real CLI)', () => {
  it('is refused before fitting with exit 2 and one message, never "internal error: Invalid typed array length"', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-cost-'));
    // Invented: 100,000 horizons of a slow sine, 20 specimens each.
    const rows = ['age,n,mean,sd', ...Array.from({ length: 100_000 }, (_, i) => `${(100_000 - i) / 1000},20,${(5 + Math.sin(i / 50)).toFixed(4)},0.5`)];
    writeFileSync(join(folder, 'long.csv'), rows.join('\n') + '\n');
    const run = await runCliHere(['fit', 'long.csv', '--models', 'extended'], folder);
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/^stratotrend: --models: lineage "lineage" has 100,000 horizons; punctuated-2, punctuated-2-separate would search [\d,]+ placements .*Leave them out: --models [a-z0-9,-]+\n$/);
  });

  it('compare applies the same check to each section', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-cost-'));
    // Invented: two sections of 2,100 horizons; C(2100 − 13, 2) = 2,176,741 placements for two shifts.
    const rows = ['section,age,n,mean,sd'];
    for (const section of ['Ash Ledge', 'Brisk Ledge']) for (let i = 0; i < 2100; i++) rows.push(`${section},${(2100 - i) / 100},20,${(5 + Math.sin(i / 30)).toFixed(4)},0.5`);
    writeFileSync(join(folder, 'two.csv'), rows.join('\n') + '\n');
    const run = await runCliHere(['compare', 'two.csv', '--models', 'extended'], folder);
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/^stratotrend: --models: lineage "Ash Ledge" has 2,100 horizons; punctuated-2, punctuated-2-separate would search 2,176,741 placements /);
  });
});
