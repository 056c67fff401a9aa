import { describe, expect, it } from 'vitest';
import { runFitStreamed } from '../../../src/analyses/fit-run.js';
import { supportCautions } from '../../../src/render/report/cautions.js';
import { asFitDocument } from '../../../src/render/report/document-view.js';
import { reportPage } from '../../../src/render/report/report-page.js';

// Issue 19: what the report shows of a lineage placed by an age model — ages beside
// heights, one row per horizon, the age-model table, shifts as age and horizon, rates
// with units, the general cautions once, and a short plain summary per lineage.

const run = await runFitStreamed('sample-data/locality-heights.csv', {
  ageModel: 'sample-data/locality-ties.csv', models: 'punctuated-1,random-walk,directional-walk', rates: true, intervals: false, quiet: true,
});
const document = asFitDocument(run.document);
const html = reportPage({ document, run: { date: '2026-01-01T00:00:00Z' } });
const text = (fragment: string): string => fragment.replace(/<[^>]+>/g, ' ').replace(/&amp;/g, '&').replace(/\s+/g, ' ');
const lineageBlock = (index: number): string => {
  const start = html.indexOf(`data-lineage="${index}">`, html.indexOf('<section class="lineage"'));
  return html.slice(start, html.indexOf('</section>', start));
};

describe('report of heights placed by an age model', () => {
  it('the time span names heights in m and ages in Ma (not "depth … Myr")', () => {
    const first = document.lineages[0];
    // Ages by linear interpolation of locality-ties.csv (Quarrel Hollow: 0 m at 9.00, 35 m at 8.10 Ma): 1.0 m → 9 - 0.9/35 = 8.974 Ma (closed form).
    expect(first.data.age?.[0]).toBeCloseTo(9 - 0.9 / 35, 12);
    expect(text(lineageBlock(0))).toContain('(height 1 to 119 m; age 8.974 to 5.632 Ma)');
    expect(html).not.toMatch(/height [\d.]+ to [\d.]+ Myr/);
  });

  it('one row per horizon: position, age, n, mean and sd = √(within variance) from fit.json', () => {
    const first = document.lineages[0];
    const block = lineageBlock(0);
    const rows = block.match(/<tr data-horizon="\d+">[\s\S]*?<\/tr>/g) ?? [];
    expect(rows).toHaveLength(first.horizons);
    rows.forEach((row, i) => {
      const value = (field: string): number => Number(row.match(new RegExp(`data-field="${field}" data-value="([^"]*)"`))![1]);
      expect(value('position')).toBe(first.data.position[i]);
      expect(value('age')).toBe(first.data.age![i]);
      expect(value('n')).toBe(first.data.n[i]);
      expect(value('mean')).toBe(first.data.mean[i]);
      expect(value('sd')).toBe(Math.sqrt(first.data.within_variance[i]!));
    });
  });

  it('the age-model table lists every tie with its rate to the next (hand-computed: 35 m over 0.9 Myr)', () => {
    const block = html.slice(html.indexOf('<section id="age-model">'), html.indexOf('</section>', html.indexOf('<section id="age-model">')));
    expect(block.match(/data-field="age" /g)).toHaveLength(11);
    expect(Number(block.match(/data-field="rate" data-value="([^"]*)"/)![1])).toBeCloseTo(35 / 0.9, 12);
    expect(text(block)).toContain('rate to the next tie (m per Myr)');
  });

  it('shifts read as horizon, age and height, never as raw JSON or as estimates with "[—, —]"', () => {
    const block = text(lineageBlock(0));
    const shift = (document.lineages[0].models.find((model) => model.id === 'punctuated-1')!.shifts as { index: number; age: number; height: number }[])[0];
    expect(block).toContain(`shift 1 at horizon ${shift.index + 1} of the sequence, counted from the oldest (age ${Number(shift.age.toPrecision(4))} Ma, height ${shift.height} m)`);
    expect(html).not.toContain('shifts: [');
    expect(html).not.toContain('data-parameter="shift_1_time"');
  });

  it('rates: whole sequence and model-based rates in tables whose headers carry the units', () => {
    const block = text(lineageBlock(0));
    expect(block).toContain('interval (Myr)');
    expect(block).toContain('darwins (ln units per Myr)');
    expect(block).toContain('haldanes (sd per generation)');
    // Model-based: the step variance of the random walk is in trait units² per Myr.
    expect(block).toMatch(/random-walk step_variance [\d.e-]+ \(trait units\)² per Myr/);
  });

  it('the general cautions appear once (with the overview), each lineage keeps a plain summary', () => {
    for (const caution of supportCautions) expect(html.split(caution.replace(/'/g, '&#39;')).length - 1).toBe(1);
    expect(html.match(/data-block="plain-summary"/g)).toHaveLength(document.lineages.length);
    expect(text(lineageBlock(0))).toMatch(/Of the models fitted, the data (clearly|moderately|only weakly) favour /);
  });
});
