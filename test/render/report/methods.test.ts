import { describe, expect, it } from 'vitest';
import { runFit, runFitStreamed, type FitCommandOptions } from '../../../src/analyses/fit-run.js';
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
    // Only the sources of the models fitted: the OU and strict-stasis sources drop out.
    expect(methodsText(walks).references.map((reference) => reference.key)).not.toContain('huntBellTravis2008');
    expect(methodsText(walks).references.map((reference) => reference.key)).not.toContain('huntHopkinsLidgard2015');
    expect(methodsText(plain).references.map((reference) => reference.key)).toContain('huntBellTravis2008');
  });

  it('intervals: named when computed, "no intervals" when skipped', () => {
    expect(text(plain)).toContain('No intervals were computed');
    const withIntervals = asFitDocument(runFit('sample-data/shell-length.csv', { models: 'random-walk' }).document);
    expect(text(withIntervals)).not.toContain('No intervals');
    // Integrated-likelihood intervals are credible intervals (README, "Intervals that keep their promise"), not confidence intervals.
    expect(text(withIntervals)).toContain('For every model, the 95% intervals are equal-tailed credible intervals of the integrated likelihood');
    expect(text(withIntervals)).not.toContain('confidence interval');
  });

  it('intervals with the default method on the classic set: one sentence per method, naming its models, no clause twice, no capital after a semicolon', () => {
    const classic = asFitDocument(runFit('sample-data/shell-length.csv', {}).document);
    const sentences = methodsText(classic).sentences.filter((sentence) => sentence.text.startsWith("For ") && sentence.text.includes("95%"));
    // The default method hands ou (two process parameters) to the adjusted profile (README): two methods, two sentences.
    expect(sentences.map((sentence) => sentence.text.slice(0, 40))).toEqual([
      'For the models strict stasis, stasis, un',
      'For the Ornstein–Uhlenbeck (approach to ',
    ]);
    expect(sentences[0].text).toContain('credible intervals');
    expect(sentences[1].text).toContain('confidence intervals');
    const all = text(classic);
    // Outside parentheses (where "; " separates citations such as "(Hurvich & Tsai 1989; Burnham & Anderson 2002)").
    expect(all.replace(/\((?:[^()]|\([^()]*\))*\)/g, '')).not.toMatch(/; [A-Z]/);
    expect(all.match(/restricted \(REML-type\) adjusted profile/g)).toHaveLength(1);
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

  it('strict stasis cites the paper that introduced it (Hunt, Hopkins & Lidgard 2015), ou the stickleback paper', () => {
    // Source: the published abstract of Hunt, Hopkins & Lidgard 2015 (PNAS 112:4885) names "a strict
    // version of stasis that entails no real evolutionary changes"; the 2008 Evolution paper fits ou.
    expect(modelReferenceKeys('strict-stasis')).toEqual(['huntHopkinsLidgard2015']);
    expect(modelReferenceKeys('ou')).toEqual(['huntBellTravis2008']);
    const strict = documentFor({ models: 'strict-stasis,stasis' });
    expect(text(strict)).toContain('strict stasis (K = 1; Hunt, Hopkins & Lidgard 2015)');
  });

  it('extended model families are matched to their sources by id', () => {
    expect(modelReferenceKeys('punctuated-1')).toEqual(['hunt2008']);
    expect(modelReferenceKeys('stasis-then-random-walk')).toEqual(['huntHopkinsLidgard2015']);
    expect(modelReferenceKeys('covariate-walk')).toEqual(['huntEtAl2010']);
  });
});

const tiesFile = 'sample-data/locality-ties.csv';
const heightsFile = 'sample-data/locality-heights.csv';
const streamed = async (file: string, options: FitCommandOptions): Promise<FitDocumentView> => asFitDocument((await runFitStreamed(file, { intervals: false, quiet: true, ...options })).document);
const placed = await streamed(heightsFile, { ageModel: tiesFile });
const placedText = text(placed);

describe('methods text: every option of the run changes it, and nothing that did not run is described (issue 19)', () => {

  it('the age model: ties, sections, interpolation and the range of sedimentation rates (hand-computed from the tie file)', () => {
    // locality-ties.csv: 11 ties in 3 sections; rates 22.2 (Ostry Scarp, 20 m over 0.9 Myr) to 38.9 m/Myr (Quarrel Hollow, 35 m over 0.9 Myr).
    expect(placedText).toContain('Stratigraphic heights were converted to ages with an age model of 11 tie points in 3 sections, interpolating linearly between consecutive ties, that is, assuming a constant sedimentation rate between them (rates from 22.2 to 38.9 m per Myr).');
    expect(placedText).not.toContain('extrapolated');
    expect(placedText).not.toContain('redrawn');
    expect(text(plain)).not.toContain('age model');
  });

  it('extrapolated horizons and age draws are described only when they happened', async () => {
    // Ties of one section cut to its lower two: the horizons above 35 m are extrapolated.
    const { mkdtempSync, writeFileSync } = await import('node:fs');
    const { join } = await import('node:path');
    const { tmpdir } = await import('node:os');
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-methods-'));
    const shortTies = join(folder, 'short-ties.csv');
    writeFileSync(shortTies, 'section,height,age,age_sd\nQuarrel Hollow,0,9.00,0.05\nQuarrel Hollow,35,8.10,0.08\n');
    const rows = (await import('node:fs')).readFileSync(heightsFile, 'utf8').trim().split('\n');
    const oneSection = join(folder, 'one-section.csv');
    writeFileSync(oneSection, [rows[0], ...rows.filter((row) => row.startsWith('Quarrel Hollow,whorl width,'))].join('\n') + '\n');
    const extrapolated = await streamed(oneSection, { ageModel: shortTies, extrapolate: true, models: 'random-walk' });
    const count = extrapolated.lineages[0].data.extrapolated.filter(Boolean).length;
    expect(count).toBeGreaterThan(0);
    expect(text(extrapolated)).toContain(`${count} horizons lay beyond the outermost ties`);
    // The run draws the ages itself and gives their block to the document when it builds it (issue 22).
    const run = await runFitStreamed(oneSection, { intervals: false, quiet: true, ageModel: tiesFile, ageDraws: '3', seed: '5', models: 'random-walk' });
    expect(text(asFitDocument(run.document))).toContain('the tie ages were redrawn 3 times from normal distributions with their standard errors (each draw kept in stratigraphic order; random seed 5)');
  });

  it('the smoothed mean is described only when the figures draw it (--smoothed-band)', () => {
    expect(plain.lineages[0].smoothed).not.toBeNull();
    expect(text(plain)).not.toContain('smoothed');
    expect(methodsPlainText(methodsText(plain, { smoothedBand: true }))).toContain('The lineage mean drawn in the figures was smoothed under the best-supported model');
  });

  it('the generation time behind haldanes, and the adequacy statistics by name', () => {
    const rates = documentFor({ rates: true, models: 'random-walk' } as FitCommandOptions);
    const generations = documentFor({ generationTime: '2', models: 'random-walk' } as FitCommandOptions);
    const page = (document: FitDocumentView): string => {
      const html = reportPage({ document, run: { date: '2026-01-01T00:00:00Z' } });
      return html.slice(html.indexOf('data-block="methods-plain"'));
    };
    expect(page(rates)).not.toContain('generation time');
    expect(page(generations)).toContain('for an assumed generation time of 2 years');
    const checked = documentFor({ models: 'random-walk', adequacy: true, adequacyDraws: '19' } as FitCommandOptions);
    // The four checks of README "Model adequacy".
    expect(page(checked)).toContain('(lag-1 autocorrelation, runs above/below zero, trend in spread over time and normality (Shapiro–Francia W&#39;))');
  });

  it('power: described with its grid, replicates, seed and step variance when it ran; never when it did not', () => {
    const ran = { input: { lineage: 'North Cut / shell length' }, grid: [{ drift: 0 }, { drift: 0.5 }, { drift: 1.25 }], settings: { replicates: 40, seed: 9, time_unit: 'Myr', weight_threshold: 0.5 }, generator: { step_variance_source: 'fitted' } };
    const failed = { lineage: 'South Cut / shell length', power_not_run: 'gives "depth" but no age model was given' };
    const page = (power: unknown[]): string => {
      const html = reportPage({ document: plain, power, run: { date: '2026-01-01T00:00:00Z' } });
      return html.slice(html.indexOf('data-block="methods-plain"'));
    };
    expect(page([failed])).not.toContain('power');
    const both = page([ran, failed]);
    expect(both).toContain('The power of the sampling design of &quot;North Cut / shell length&quot; to detect a directional trend');
    expect(both).toContain('with the step variance of the fitted directional walk');
    expect(both).toContain('over a grid of 3 drift values from 0 to 1.25 per Myr');
    expect(both).toContain('(40 replicates per drift value, random seed 9)');
    expect(page([{ ...ran, generator: { step_variance_source: 'given' } }])).toContain('with a step variance given by the analyst');
  });

  it('comparison: the shared-offset hypothesis is named when it was fitted', () => {
    const comparison = (ids: string[]) => methodsPlainText(methodsText(plain, { comparison: true, comparisonHypotheses: ids }));
    expect(comparison(['separate', 'shared'])).not.toContain('offset');
    expect(comparison(['separate', 'shared', 'shared-offset'])).toContain('or record one lineage on the common timescale with a constant offset per section (shared offset)');
  });

  it('each option of the run changes the text', async () => {
    const baseline = text(plain);
    const variants: [string, FitDocumentView][] = [
      ['--log', logged],
      ['--pool', pooled],
      ['--models', walks],
      ['--time-unit ka', documentFor({ timeUnit: 'ka' })],
      ['--trait-unit mm', documentFor({ traitUnit: 'mm' })],
      ['--intervals profile', documentFor({ intervals: 'profile', models: 'random-walk' })],
      ['--min-segment', documentFor({ models: 'punctuated-1', minSegment: '6' } as FitCommandOptions)],
    ];
    for (const [option, document] of variants) expect(text(document), option).not.toBe(baseline);
    expect(text(documentFor({ models: 'punctuated-1', minSegment: '7' } as FitCommandOptions))).not.toBe(text(documentFor({ models: 'punctuated-1', minSegment: '6' } as FitCommandOptions)));
    const pageText = (analyses: Parameters<typeof methodsText>[1]): string => methodsPlainText(methodsText(plain, analyses));
    for (const [option, analyses] of [['--smoothed-band', { smoothedBand: true }], ['--compare', { comparison: true }], ['--power', { power: { replicates: 20 } }], ['--rates', { rates: true }]] as const) {
      expect(pageText(analyses), option).not.toBe(baseline);
    }
    expect(placedText).not.toBe(text(await streamed(heightsFile, { ageModel: tiesFile, timeUnit: 'ka' })));
  });
});
