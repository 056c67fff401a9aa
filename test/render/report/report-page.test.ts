import { describe, expect, it } from 'vitest';
import { runFit } from '../../../src/analyses/fit-run.js';
import { asFitDocument } from '../../../src/render/report/document-view.js';
import { escapeHtml } from '../../../src/render/report/html.js';
import { reportPage } from '../../../src/render/report/report-page.js';
import { sketchTrajectory } from '../../../src/render/report/sketch-figure.js';

// Structure of the page without a browser: self-contained (no scripts, no
// external references), optional blocks only when their results are given,
// and the interpretive cautions beside every conclusion.

const document = asFitDocument(runFit('sample-data/shell-length.csv', { intervals: false }).document);
const run = { date: '2026-01-01T00:00:00.000Z' };

describe('report page', () => {
  const html = reportPage({ document, run });

  it('is one self-contained document: no script, no external URL, a restrictive content policy', () => {
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/(src|href)="(https?:)?\/\//i);
    expect(html).not.toMatch(/url\(/i);
    expect(html).toContain("default-src 'none'");
  });

  it('has a section per lineage with its support table and a conclusion with cautions', () => {
    for (const lineage of document.lineages) expect(html).toContain(`<h2>${escapeHtml(`${lineage.section} / ${lineage.trait}`)}</h2>`);
    expect(html.match(/<table class="support"/g)?.length).toBe(document.lineages.length);
    expect(html.match(/class="conclusion"/g)?.length).toBe(document.lineages.length);
    // Each conclusion is followed by the cautions its result calls for (here a trend, and a variance at its bound);
    // the general cautions, the random-walk one among them, stand once with the overview.
    expect(html.match(/<div class="conclusion">[\s\S]*?<\/div>\n<div class="cautions">/g)?.length).toBe(document.lineages.length);
    expect(html).toContain('says nothing by itself about drift versus selection');
  });

  it('shows the date only in the report, with provenance of inputs and options', () => {
    expect(html).toContain('2026-01-01T00:00:00.000Z');
    expect(html).toContain(document.provenance.inputs[0].sha256);
    expect(html).toContain('fit option: pool');
    expect(JSON.stringify(document)).not.toContain('2026-01-01');
  });

  it('optional blocks appear only when their results are given', () => {
    expect(html).not.toContain('id="comparison"');
    expect(html).not.toContain('id="power"');
    expect(html).not.toContain('id="adequacy"');
    const comparison = { traits: [{ trait: 'shell length', best: { id: 'shared', model: 'directional-walk' }, hypotheses: [{ id: 'separate', model: 'directional-walk', k: 6, logLik: 31.2, aicc: -48.1, weight: 0.7 }, { id: 'shared', model: 'directional-walk', k: 4, logLik: 29.0, aicc: -48.9, weight: 0.3 }] }] };
    const power = { grid: [{ drift: 0, p_best: 0.04, p_weight: 0.02, p_lrt: 0.05 }, { drift: 0.2, p_best: 0.6, p_weight: 0.5, p_lrt: 0.7 }], seed: 5 };
    const full = reportPage({ document, run, comparison, power, analyses: { power: { seed: 5, replicates: 100 } } });
    expect(full).toContain('id="comparison"');
    expect(full).toContain('data-hypothesis="shared" data-model="directional-walk" class="best"');
    expect(full).toContain('id="power"');
    expect(full).toContain('data-field="p_best" data-value="0.6"');
    expect(full).toContain('power of this sampling design');
    expect(full).toContain('random seed 5');
  });

  it('escapes names from the data', () => {
    const copy = JSON.parse(JSON.stringify(document));
    copy.lineages[0].section = '<b>Draw & "Co"</b>';
    const tricky = asFitDocument(copy);
    const page = reportPage({ document: tricky, run });
    expect(page).not.toContain('<b>Draw');
    expect(page).toContain('&lt;b&gt;Draw &amp; &quot;Co&quot;&lt;/b&gt;');
  });

  it('the stand-in sketch draws one marker and one interval per horizon', () => {
    const lineage = document.lineages[0];
    const { svg } = sketchTrajectory(lineage);
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.match(/<circle /g)?.length).toBe(lineage.horizons);
  });
});
