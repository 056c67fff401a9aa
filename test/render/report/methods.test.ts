import { describe, expect, it } from 'vitest';
import { runFit, type FitCommandOptions } from '../../../src/cli/fit-command.js';
import { classicModels, extendedModels } from '../../../src/models/registry.js';
import { asFitDocument, type FitDocumentView } from '../../../src/render/report/document-view.js';
import { methodsPlainText, methodsText, sentenceKeys } from '../../../src/render/report/methods.js';
import { reportPage } from '../../../src/render/report/report-page.js';
import { findReference, modelReferenceKeys, referenceCatalogue } from '../../../src/render/report/references.js';

// The methods text is written from what was run: these tests change one
// option at a time on the demo file and check the sentence that describes
// it, and that every method used is cited and every reference is cited.
// Intervals are skipped (--no-intervals) except where the test is about them,
// to keep the run short.

function documentFor(options: FitCommandOptions): FitDocumentView {
  return asFitDocument(runFit('sample-data/shell-length.csv', { intervals: false, ...options }).document);
}

const plain = documentFor({});
const logged = documentFor({ log: true });
const pooled = documentFor({ pool: true });
const walks = documentFor({ models: 'random-walk,directional-walk' });

function text(document: FitDocumentView): string {
  return methodsPlainText(methodsText(document));
}

describe('methods text follows the options of the run', () => {
  it('transform: original scale by default, natural log with --log', () => {
    expect(text(plain)).toContain('analysed on its original scale');
    expect(text(plain)).not.toContain('natural-log');
    expect(text(logged)).toContain('natural-log scale');
    expect(text(logged)).toContain('delta method');
    expect(text(logged)).not.toContain('original scale');
  });

  it('sampling variance: per horizon by default, pooled with --pool', () => {
    expect(text(plain)).toContain('eᵢ = vᵢ / nᵢ');
    expect(text(plain)).not.toContain('pooled');
    expect(text(pooled)).toContain('pooled over the horizons of each lineage');
    expect(text(pooled)).toContain('eᵢ = v / nᵢ');
  });

  it('model set: names exactly the models fitted, with their K', () => {
    const all = text(plain);
    for (const model of classicModels) expect(all).toContain(model.label);
    expect(all).toContain('Five models of phyletic evolution (the classic set)');
    const two = text(walks);
    expect(two).toContain('Two models of phyletic evolution (a set chosen by the user)');
    expect(two).toContain('unbiased random walk (K = 2');
    expect(two).toContain('directional walk (random walk with drift) (K = 3');
    expect(two).not.toContain('strict stasis');
    expect(two).not.toContain('Ornstein');
    // Only the sources of the models fitted: the OU / strict-stasis source drops out.
    expect(methodsText(walks).references.map((reference) => reference.key)).not.toContain('huntBellTravis2008');
    expect(methodsText(plain).references.map((reference) => reference.key)).toContain('huntBellTravis2008');
  });

  it('intervals: named when computed, "no confidence intervals" when skipped', () => {
    expect(text(plain)).toContain('No confidence intervals were computed');
    const withIntervals = asFitDocument(runFit('sample-data/shell-length.csv', { models: 'random-walk' }).document);
    expect(text(withIntervals)).not.toContain('No confidence intervals');
    expect(text(withIntervals)).toMatch(/95% confidence intervals/);
  });

  it('time unit and software version come from the document', () => {
    const kyr = documentFor({ timeUnit: 'kyr' });
    expect(text(kyr)).toContain('in kyr; every rate is per kyr');
    expect(text(plain)).toContain(`stratotrend ${plain.provenance.version}`);
  });

  it('adequacy checks and rates computed by fit are described, with their draws, seed and sources', () => {
    const checked = documentFor({ models: 'random-walk,directional-walk', adequacy: true, adequacyDraws: '19', adequacySeed: '7', rates: true } as FitCommandOptions);
    // Through the page itself, which infers the analyses from the lineage documents.
    const html = reportPage({ document: checked, run: { date: '2026-01-01T00:00:00Z' } });
    const page = html.slice(html.indexOf('data-block="methods-plain"'));
    expect(page).toContain('19 replicates, random seed 7');
    expect(page).toContain('Voje, Starrfelt &amp; Liow 2018');
    expect(page).toContain('darwins');
    expect(page).toContain('Haldane 1949');
    expect(text(plain)).not.toContain('adequacy');
    expect(text(plain)).not.toContain('darwins');
  });

  it('optional analyses add their sentences only when they were run', () => {
    expect(text(plain)).not.toContain('power of this sampling design');
    const withPower = methodsPlainText(methodsText(plain, { power: { replicates: 200, seed: 17 } }));
    expect(withPower).toContain('power of this sampling design');
    expect(withPower).toContain('200 replicates per drift value, random seed 17');
    expect(methodsPlainText(methodsText(plain, { comparison: true }))).toContain('share one evolutionary process');
  });
});

describe('methods text cites every method used, and only those', () => {
  for (const [name, document] of [['classic', plain], ['walks', walks], ['logged', logged]] as const) {
    it(`${name}: every model's source, the filter, AICc and Akaike weights are cited; every reference is cited`, () => {
      const methods = methodsText(document);
      const cited = new Set(methods.sentences.flatMap(sentenceKeys));
      const models = new Set(document.lineages.flatMap((lineage) => lineage.models.map((model) => model.id)));
      for (const id of models) for (const key of modelReferenceKeys(id)) expect(cited.has(key)).toBe(true);
      for (const key of ['hurvichTsai1989', 'burnhamAnderson2002', 'kalman1960', 'deJong1991', 'brent1973']) expect(cited.has(key)).toBe(true);
      expect(new Set(methods.references.map((reference) => reference.key))).toEqual(cited);
      // Every citation in the plain text resolves to an entry of the reference list.
      const plainText = methodsPlainText(methods);
      for (const reference of methods.references) expect(plainText).toContain(reference.cite);
    });
  }

  it('the source cited for each model is the one its model file gives', () => {
    // Every registered model's file names its source with journal,
    // volume:first page; the report's reference entry for it must name the
    // same publication (same first author, same volume and first page).
    for (const model of extendedModels) {
      const published = model.citation.replace(/^After\s+/, '');
      const volumePage = published.match(/(\d+(?:-A)?):(\d+)/)!;
      const entries = modelReferenceKeys(model.id).map((key) => findReference(key).entry);
      expect(entries.some((entry) => entry.includes(`${volumePage[1]}:${volumePage[2]}`) && entry.slice(0, 8) === published.slice(0, 8))).toBe(true);
    }
  });

  it('reference entries carry the published journal, volume and pages', () => {
    // Source: the project's model specification and its issue text (journal,
    // volume and pages of each method's publication).
    const entries = Object.values(referenceCatalogue).map((reference) => reference.entry);
    const expected = [
      ['Hunt, G. (2006)', 'Paleobiology 32:578–601'],
      ['Hunt, G. (2008)', 'Paleobiology 34:360–377'],
      ['Hunt, G., Bell, M. A. & Travis, M. P. (2008)', 'Evolution 62:700–710'],
      ['Hurvich, C. M. & Tsai, C.-L. (1989)', 'Biometrika 76:297–307'],
      ['Burnham, K. P. & Anderson, D. R. (2002)', 'Model Selection and Multimodel Inference'],
      ['de Jong, P. (1991)', 'Annals of Statistics 19:1073'],
      ['Haldane, J. B. S. (1949)', 'Evolution 3:51'],
      ['Gingerich, P. D. (1993)', 'American Journal of Science 293-A:453'],
      ['Lynch, M. (1990)', 'American Naturalist 136:727'],
    ];
    for (const [authors, where] of expected) expect(entries.some((entry) => entry.startsWith(authors) && entry.includes(where))).toBe(true);
  });

  it('extended model families are matched to their sources by id', () => {
    expect(modelReferenceKeys('punctuated-1')).toEqual(['hunt2008']);
    expect(modelReferenceKeys('stasis-then-random-walk')).toEqual(['huntHopkinsLidgard2015']);
    expect(modelReferenceKeys('covariate-walk')).toEqual(['huntEtAl2010']);
  });
});
