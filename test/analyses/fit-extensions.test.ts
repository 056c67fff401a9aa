import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { attachCovariates, extensionSettings, modelsForLineage } from '../../src/analyses/fit-extensions.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { modelSets } from '../../src/models/registry.js';

// Glue of the shift/covariate options: validation, covariate file matched by section and age, set filtering.
describe('fit options for shift and covariate models', () => {
  const lineage = (section: string) => ({
    ...lineageFromArrays({ time: [0, 0.5, 1.25], mean: [1, 2, 3], samplingVariance: [0.1, 0.1, 0.1], section }),
    positionKind: 'age' as const,
    position: Float64Array.of(12, 11.5, 10.75),
  });

  it('matches covariate values by section and age, and names a horizon without one', () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-covariate-'));
    const file = join(folder, 'proxy.csv');
    writeFileSync(file, 'section,age,covariate\nNorth Cut,11.5,2\nNorth Cut,12,1\nSouth Cut,12,9\nNorth Cut,10.75,3.5\n');
    const [north] = attachCovariates([lineage('North Cut')], file);
    expect(Array.from(north.covariate!)).toEqual([1, 2, 3.5]);
    expect(() => attachCovariates([lineage('South Cut')], file)).toThrow(/no covariate for lineage "South Cut" at age 11.5 \(samples line 3\)/);
  });

  it('matches by depth (or height) as the samples give it, with an age model placing them (issue 19)', () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-covariate-'));
    const file = join(folder, 'proxy-by-depth.csv');
    writeFileSync(file, 'section,depth,covariate\nCore 1,30,7\nCore 1,10,5\nCore 1,20,6\n');
    // Depths 30, 20, 10 m (oldest first) with ages from some age model: matching must not need those ages.
    const cored = { ...lineage('Core 1'), positionKind: 'depth' as const, position: Float64Array.of(30, 20, 10), firstAge: 2.3 };
    expect(Array.from(attachCovariates([cored], file)[0].covariate!)).toEqual([7, 6, 5]);
    // A depth file against samples by age says which column to use.
    expect(() => attachCovariates([lineage('Core 1')], file)).toThrow('matches by "depth" but the samples give "age"; use an "age" column');
  });

  it('validates the options and leaves out of a named set what a lineage does not allow', () => {
    expect(() => extensionSettings({ minSegment: '1' })).toThrow(/--min-segment: must be a whole number >= 2, got "1"/);
    expect(() => extensionSettings({ generationTime: '-2' })).toThrow(/--generation-time/);
    expect(extensionSettings({ generationTime: '2' })).toMatchObject({ generationTime: 2, rates: true, adequacyDraws: 199 });
    const noCovariate = lineage('North Cut');
    expect(modelsForLineage(noCovariate, modelSets.extended(), 'extended').leftOut).toEqual(['covariate-stasis', 'covariate-walk']);
    expect(modelsForLineage(noCovariate, modelSets.extended(), 'custom').leftOut).toEqual([]);
  });
});
