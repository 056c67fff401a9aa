import { describe, expect, it } from 'vitest';
import { fitLineage } from '../../../src/fit/fit-lineage.js';
import { lineageFromArrays, timeUnit } from '../../../src/lineage.js';
import { findModel } from '../../../src/models/registry.js';
import { lineageDocument } from '../../../src/render/fit-document.js';
import { estimatesTable } from '../../../src/render/report/support-table.js';

// ou at alpha = 0 is the directional walk with drift (optimum − a)·alpha
// (MODELS.md), reported as `limit_drift`: a drift, in trait units per time
// unit — the unit ou's `runaway` declaration gives it. The report's estimates
// table showed it with an empty unit cell.
describe('report estimates table: units of quantities reported at a limit', () => {
  it('gives ou\'s limit_drift the unit of a drift', () => {
    // Straight, evenly rising means: any alpha > 0 would bend them, so ou is best at alpha = 0.
    const time = Array.from({ length: 12 }, (_, i) => i * 0.5);
    const lineage = { ...lineageFromArrays({ time, mean: time.map((t) => 3 + 0.4 * t), samplingVariance: time.map(() => 0.02), section: 'Orlen Gap', trait: 'width' }), timeUnit: timeUnit('Myr') };
    const fit = fitLineage(lineage, [findModel('ou')!], { intervals: false });
    const view = lineageDocument(fit);
    const ou = view.models.find((model) => model.id === 'ou')!;
    expect(ou.params.alpha.estimate).toBe(0);
    expect(ou.derived.limit_drift).toBeDefined();
    const row = estimatesTable(view).split('\n').find((line) => line.includes('limit_drift'));
    expect(row).toBeDefined();
    expect(row).toContain('<td>trait units per Myr</td>');
  });
});
