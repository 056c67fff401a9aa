/**
 * Documents read back (issue 23): `report` and `redraw` on a saved fit.json,
 * and `report --attach` of compare.json and power JSON, check the document on
 * reading. Each hand-edited damage below is one message naming the file and
 * the field path, exit 1 — never "internal error: weight.toFixed is not a
 * function" (exit 70) or a page with wrong numbers. The documents are real
 * outputs of the built CLI (npm test builds first), damaged one field at a
 * time; the expected messages are the layout of src/render/fit-document.ts,
 * src/render/comparison-output.ts and src/analyses/power-run.ts written out by hand.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkComparisonDocument, checkFitDocument, checkPowerDocument } from '../../src/data/documents.js';
import { InputError } from '../../src/data/errors.js';
import { figureJobs, figureLineage } from '../../src/render/figures/index.js';
import { asFitDocument } from '../../src/render/report/document-view.js';
import { reportPage } from '../../src/render/report/report-page.js';
import { sketchTrajectory } from '../../src/render/report/sketch-figure.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-documents-'));
const samples = join(root, 'sample-data');

type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

let fit: Json;
let comparison: Json;
let power: Json;

async function written(args: string[]): Promise<Json> {
  const run = await runCliHere(args, folder);
  expect(run.status).toBe(0);
  return JSON.parse(run.stdout) as Json;
}

beforeAll(async () => {
  fit = await written(['fit', join(samples, 'shell-length.csv'), '--json', '--no-intervals']);
  comparison = await written(['compare', join(samples, 'locality-heights.csv'), '--age-model', join(samples, 'locality-ties.csv'), '--json', '--composite', '--no-intervals']);
  power = await written(['power', join(samples, 'shell-length.csv'), '--json', '--replicates', '20', '--drifts', '0,0.5', '--no-coverage', '--threads', '1', '--quiet']);
});

afterAll(() => rmSync(folder, { recursive: true, force: true }));

function messageOf(check: (value: unknown, file: string) => void, document: unknown, file: string): string {
  try {
    check(document, file);
  } catch (error) {
    if (error instanceof InputError) {
      expect(error.kind).toBe('data');
      return error.message;
    }
    throw error;
  }
  return '(accepted)';
}

/** A deep copy with one damage applied. */
function damaged(document: Json, damage: (copy: Json) => void): Json {
  const copy = structuredClone(document);
  damage(copy);
  return copy;
}

describe('documents written by the tool pass', () => {
  it('fit.json (with and without intervals, extended models with rates, heights with an age model), compare.json with composites, power JSON', async () => {
    expect(messageOf(checkFitDocument, fit, 'fit.json')).toBe('(accepted)');
    expect(messageOf(checkComparisonDocument, comparison, 'compare.json')).toBe('(accepted)');
    expect(messageOf(checkPowerDocument, power, 'power.json')).toBe('(accepted)');
    // --no-trend-test: the same data's trend_test is checked in \`fit\` above; this one adds the
    // intervals and a trend_test of null (issue 22).
    const withIntervals = await written(['fit', join(samples, 'shell-length.csv'), '--json', '--no-trend-test']);
    expect(messageOf(checkFitDocument, withIntervals, 'fit.json')).toBe('(accepted)');
    const extended = await written(['fit', join(samples, 'pulsed-width.csv'), '--models', 'extended', '--json', '--rates', '--no-intervals', '--covariate-file', join(samples, 'pulsed-width-proxy.csv')]);
    expect(messageOf(checkFitDocument, extended, 'fit.json')).toBe('(accepted)');
    const heights = await written(['fit', join(samples, 'locality-heights.csv'), '--age-model', join(samples, 'locality-ties.csv'), '--json', '--no-intervals']);
    expect(messageOf(checkFitDocument, heights, 'fit.json')).toBe('(accepted)');
  });

  it('a fit.json written before trait_unit, first_age and extrapolated_horizons existed passes', async () => {
    const older = damaged(fit, (copy) => {
      for (const lineage of copy.lineages) {
        delete lineage.trait_unit;
        delete lineage.first_age;
        delete lineage.extrapolated_horizons;
      }
    });
    expect(messageOf(checkFitDocument, older, 'fit.json')).toBe('(accepted)');
  });
});

describe('a hand-edited fit.json: one message naming the file and the field path', () => {
  // [what was edited, the damage, the message after "fit.json: "]
  const cases: Array<[string, (copy: Json) => void, string]> = [
    ['a weight that is text', (d) => { d.lineages[0].models[0].weight = 'bad'; }, 'lineages[0].models[0].weight: expected a number or null, got "bad"'],
    ['a weight above 1', (d) => { d.lineages[0].models[3].weight = 1.5; }, 'lineages[0].models[3].weight: expected a number from 0 to 1 or null, got 1.5'],
    ['a missing params', (d) => { delete d.lineages[0].models[1].params; }, 'lineages[0].models[1].params: expected an object, got nothing (the field is missing)'],
    ['models not a list', (d) => { d.lineages[1].models = { id: 'stasis' }; }, 'lineages[1].models: expected a list, got {"id":"stasis"}'],
    ['a fractional k', (d) => { d.lineages[1].models[2].k = 2.5; }, 'lineages[1].models[2].k: expected a whole number, got 2.5'],
    ['a logLik written as text', (d) => { d.lineages[0].models[2].logLik = '-3.2'; }, 'lineages[0].models[2].logLik: expected a number or null, got "-3.2"'],
    ['an estimate that is text', (d) => { d.lineages[0].models[1].params.stasis_mean.estimate = 'four'; }, 'lineages[0].models[1].params.stasis_mean.estimate: expected a number or null, got "four"'],
    ['a bound flag that is text', (d) => { d.lineages[0].models[1].params.stasis_variance.lower_at_bound = 'no'; }, 'lineages[0].models[1].params.stasis_variance.lower_at_bound: expected true or false, got "no"'],
    ['flags not a list', (d) => { d.lineages[0].models[4].flags = 'none'; }, 'lineages[0].models[4].flags: expected a list, got "none"'],
    ['converged missing', (d) => { delete d.lineages[0].models[0].converged; }, 'lineages[0].models[0].converged: expected true or false, got nothing (the field is missing)'],
    ['a label that is a number', (d) => { d.lineages[0].models[0].label = 7; }, 'lineages[0].models[0].label: expected text, got 7'],
    ['a mean list one short', (d) => { d.lineages[0].data.mean.pop(); }, 'lineages[0].data.mean: expected 24 entries (one per horizon, "horizons" is 24), got 23'],
    ['horizons that disagree with the data', (d) => { d.lineages[1].horizons = 17; }, 'lineages[1].data.time: expected 17 entries (one per horizon, "horizons" is 17), got 16'],
    ['a time that is text', (d) => { d.lineages[0].data.time[3] = 'x'; }, 'lineages[0].data.time[3]: expected a number, got "x"'],
    ['a time that is null', (d) => { d.lineages[0].data.time[0] = null; }, 'lineages[0].data.time[0]: expected a number, got null'],
    ['a negative sampling variance', (d) => { d.lineages[0].data.sampling_variance[5] = -0.01; }, 'lineages[0].data.sampling_variance[5]: expected a number of at least 0, got -0.01'],
    ['a sample size of 0', (d) => { d.lineages[1].data.n[2] = 0; }, 'lineages[1].data.n[2]: expected a whole number of at least 1, got 0'],
    ['data missing', (d) => { delete d.lineages[0].data; }, 'lineages[0].data: expected an object, got nothing (the field is missing)'],
    ['a smoothed band one short', (d) => { d.lineages[0].smoothed.standard_error.pop(); }, 'lineages[0].smoothed.standard_error: expected 24 entries (one per horizon, "horizons" is 24), got 23'],
    ['a best model that is not among the models', (d) => { d.lineages[0].best_model = 'punctuated-1'; }, 'lineages[0].best_model: expected null or the id of one of the lineage\'s models (strict-stasis, stasis, random-walk, directional-walk, ou), got "punctuated-1"'],
    ['a section name with an escape sequence', (d) => { d.lineages[0].section = '\u001b[31mVarnek'; }, 'lineages[0].section: expected text without control characters, got "\\u001b[31mVarnek" (U+001B (ESC) at character 1)'],
    ['a trait unit with a C1 control', (d) => { d.lineages[1].trait_unit = 'mm\u009b2J'; }, 'lineages[1].trait_unit: expected text without control characters, got "mm\\u009b2J" (U+009B (CSI) at character 3)'],
    ['a parameter name with a control character', (d) => { const params = d.lineages[0].models[1].params; params['mean\u0007'] = params.stasis_mean; }, 'lineages[0].models[1].params key: expected text without control characters, got "mean\\u0007" (U+0007 (BEL) at character 5)'],
    ['lineages empty', (d) => { d.lineages = []; }, 'lineages: expected a non-empty list, got []'],
    ['lineages missing', (d) => { delete d.lineages; }, 'lineages: expected a non-empty list, got nothing (the field is missing)'],
    ['provenance missing', (d) => { delete d.provenance; }, 'provenance: expected an object, got nothing (the field is missing)'],
    ['a provenance input without a checksum', (d) => { delete d.provenance.inputs[0].sha256; }, 'provenance.inputs[0].sha256: expected text, got nothing (the field is missing)'],
    ['a warning count as text', (d) => { d.warnings = [{ category: 'input', message: 'm', count: '2' }]; }, 'warnings[0].count: expected a whole number, got "2"'],
    ['an embedded comparison with a bad weight', (d) => { d.comparison = { traits: [{ trait: 't', horizons: 3, time_unit: 'Myr', sections: [], best: null, hypotheses: [{ id: 'shared', model: 'stasis', k: 2, logLik: 1, aicc: 2, delta_aicc: 0, weight: 'x', compared: true }], tests: [] }] }; }, 'comparison.traits[0].hypotheses[0].weight: expected a number or null, got "x"'],
  ];

  it.each(cases)('%s', async (_what, damage, message) => {
    expect(messageOf(checkFitDocument, damaged(fit, damage), 'fit.json')).toBe(`fit.json: ${message}`);
  });

  it('a compare.json or power JSON given as a fit.json is named for what it is', async () => {
    expect(messageOf(checkFitDocument, comparison, 'compare.json')).toBe('compare.json: is the JSON of "compare" (it has "traits"), not a fit.json; show it in a report with --attach');
    expect(messageOf(checkFitDocument, power, 'power.json')).toBe('power.json: is the JSON of "power" (it has "grid"), not a fit.json; show it in a report with --attach');
  });

  it('the whole document not an object; a long value is cut at 60 characters', async () => {
    expect(messageOf(checkFitDocument, [1, 2], 'fit.json')).toBe('fit.json: the document: expected an object, got [1,2]');
    // ["xxx…"] of 104 characters: the first 59 and an ellipsis.
    expect(messageOf(checkFitDocument, damaged(fit, (d) => { d.provenance.tool = ['x'.repeat(100)]; }), 'fit.json')).toBe(`fit.json: provenance.tool: expected text, got ["${'x'.repeat(57)}…`);
  });
});

/** Every path into a document (lists cut to their first three entries), as key lists from the root. */
function pathsOf(value: unknown, prefix: (string | number)[] = []): (string | number)[][] {
  const paths: (string | number)[][] = prefix.length > 0 ? [prefix] : [];
  if (Array.isArray(value)) value.slice(0, 3).forEach((entry, index) => paths.push(...pathsOf(entry, [...prefix, index])));
  else if (value !== null && typeof value === 'object') for (const [key, entry] of Object.entries(value)) paths.push(...pathsOf(entry, [...prefix, key]));
  return paths;
}

// What a hand edit leaves: text for a number, null, out-of-range and fractional numbers, a list or object for a scalar, a deleted field, an escape sequence.
const replacements: unknown[] = ['bad', null, -1, 0.5, 2.5, 1e6, [], {}, true, undefined, '\u001b[31m', [1, 'x']];

/**
 * Replace one field of `document` at a time (fast-check, seeded) and require
 * that `check` refuses the result with an InputError naming a field, or that
 * `read` (the readers of the page and figures) runs to the end without any error.
 */
function fuzzOneField(document: Json, check: (value: unknown, file: string) => void, read: (value: Json) => void, seed: number): number {
  const paths = pathsOf(document);
  let refused = 0;
  fc.assert(
    fc.property(fc.nat(paths.length - 1), fc.nat(replacements.length - 1), (pathIndex, replacementIndex) => {
      const edited = damaged(document, (copy) => {
        const path = paths[pathIndex];
        let parent: any = copy; // eslint-disable-line @typescript-eslint/no-explicit-any
        for (const key of path.slice(0, -1)) parent = parent[key];
        const last = path[path.length - 1];
        if (replacements[replacementIndex] === undefined && !Array.isArray(parent)) delete parent[last];
        else parent[last] = structuredClone(replacements[replacementIndex]);
      });
      try {
        check(edited, 'edited.json');
      } catch (error) {
        if (!(error instanceof InputError)) throw error;
        expect(error.message).toMatch(/^edited\.json: [^:]+: expected /);
        refused += 1;
        return;
      }
      read(edited);
    }),
    { numRuns: 400, seed },
  );
  return refused;
}

describe('fuzz: one field replaced by a value of another kind', () => {
  it('fit.json: refused naming the field, or the report page, the figure input and the sketches read it to the end', async () => {
    const refused = fuzzOneField(fit, checkFitDocument, (edited) => {
      const view = asFitDocument(edited);
      reportPage({ document: view, run: { date: '2026-01-01T00:00:00Z' } });
      view.lineages.forEach((lineage, index) => {
        figureLineage(lineage);
        sketchTrajectory(lineage);
      });
      figureJobs(view.lineages);
    }, 20261204);
    // Most single edits break the layout; the rest (a label edited to other text, a weight moved within 0..1) are accepted.
    expect(refused).toBeGreaterThan(200);
  });

  it('compare.json and power JSON attached to a report: refused naming the field, or shown to the end', async () => {
    const view = asFitDocument(fit);
    const comparisonRefused = fuzzOneField(comparison, checkComparisonDocument, (edited) => {
      reportPage({ document: view, comparison: edited, run: { date: '2026-01-01T00:00:00Z' } });
    }, 11);
    const powerRefused = fuzzOneField(power, checkPowerDocument, (edited) => {
      reportPage({ document: view, power: [edited], run: { date: '2026-01-01T00:00:00Z' } });
    }, 12);
    expect(comparisonRefused).toBeGreaterThan(0);
    expect(powerRefused).toBeGreaterThan(0);
  });
});

describe('a hand-edited compare.json or power JSON', () => {
  const comparisonCases: Array<[string, (copy: Json) => void, string]> = [
    ['a hypothesis weight as text', (d) => { d.traits[0].hypotheses[2].weight = 'high'; }, 'traits[0].hypotheses[2].weight: expected a number or null, got "high"'],
    ['a p-value above 1', (d) => { d.traits[0].tests[0].p_value = 2; }, 'traits[0].tests[0].p_value: expected a number from 0 to 1 or null, got 2'],
    ['hypotheses not a list', (d) => { d.traits[1].hypotheses = 'none'; }, 'traits[1].hypotheses: expected a list, got "none"'],
    ['a composite lineage whose models are not a list', (d) => { d.composite[0].models = 5; }, 'composite[0].models: expected a list, got 5'],
    ['a section count as text', (d) => { d.traits[0].sections[1].horizons = '12'; }, 'traits[0].sections[1].horizons: expected a whole number, got "12"'],
  ];
  it.each(comparisonCases)('compare.json: %s', async (_what, damage, message) => {
    expect(messageOf(checkComparisonDocument, damaged(comparison, damage), 'compare.json')).toBe(`compare.json: ${message}`);
  });

  const powerCases: Array<[string, (copy: Json) => void, string]> = [
    ['a probability as text', (d) => { d.grid[1].p_best = 'x'; }, 'grid[1].p_best: expected a number, got "x"'],
    ['a probability above 1', (d) => { d.grid[0].p_lrt = 1.2; }, 'grid[0].p_lrt: expected a number from 0 to 1, got 1.2'],
    ['settings without horizons', (d) => { delete d.settings.horizons; }, 'settings.horizons: expected a whole number, got nothing (the field is missing)'],
    ['an empty grid', (d) => { d.grid = []; }, 'grid: expected a non-empty list, got []'],
    ['a lineage name with an escape', (d) => { d.input.lineage = 'A\u001b]0;x\u0007'; }, 'input.lineage: expected text without control characters, got "A\\u001b]0;x\\u0007" (U+001B (ESC) at character 2)'],
  ];
  it.each(powerCases)('power JSON: %s', async (_what, damage, message) => {
    expect(messageOf(checkPowerDocument, damaged(power, damage), 'power.json')).toBe(`power.json: ${message}`);
  });
});

describe('the commands: exit 1 with the one message, nothing written', () => {
  function save(name: string, document: unknown): string {
    const path = join(folder, name);
    writeFileSync(path, JSON.stringify(document, null, 2));
    return path;
  }

  it('report and redraw on a fit.json with a weight "bad" (today an internal error, exit 70)', async () => {
    const path = save('weight-bad.json', damaged(fit, (d) => { d.lineages[0].models[0].weight = 'bad'; }));
    const page = join(folder, 'weight-bad.html');
    const report = await runCliHere(['report', path, '--out', page], folder);
    expect(report.stderr).toBe(`stratotrend: ${path}: lineages[0].models[0].weight: expected a number or null, got "bad"\n`);
    expect(report.status).toBe(1);
    expect(() => readFileSync(page)).toThrow();
    const redraw = await runCliHere(['redraw', path, '--out', join(folder, 'weight-bad-figures')], folder);
    expect(redraw.stderr).toBe(`stratotrend: ${path}: lineages[0].models[0].weight: expected a number or null, got "bad"\n`);
    expect(redraw.status).toBe(1);
  });

  it('report on a fit.json whose models are not a list, and one with a number beyond double precision', async () => {
    const path = save('models-object.json', damaged(fit, (d) => { d.lineages[0].models = {}; }));
    const run = await runCliHere(['report', path, '--out', join(folder, 'models-object.html')], folder);
    expect(run.stderr).toBe(`stratotrend: ${path}: lineages[0].models: expected a list, got {}\n`);
    expect(run.status).toBe(1);
    // JSON.parse reads 1e999 as Infinity: refused with what it became.
    const text = JSON.stringify(fit).replace(/"aicc":[^,]+,/, '"aicc":1e999,');
    const huge = join(folder, 'huge.json');
    writeFileSync(huge, text);
    const second = await runCliHere(['report', huge, '--out', join(folder, 'huge.html')], folder);
    expect(second.stderr).toBe(`stratotrend: ${huge}: lineages[0].models[0].aicc: expected a number or null, got Infinity (a number beyond double precision)\n`);
    expect(second.status).toBe(1);
  });

  it('a fit.json that is not JSON names the file', async () => {
    const path = join(folder, 'cut.json');
    writeFileSync(path, JSON.stringify(fit).slice(0, 200));
    const run = await runCliHere(['redraw', path], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(new RegExp(`^stratotrend: ${path.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: is not JSON \\(.*\\); expected the fit.json written by "fit --out"\\n$`));
  });

  it('report --attach of a damaged compare.json and power JSON', async () => {
    const good = save('fit-good.json', fit);
    const badComparison = save('compare-bad.json', damaged(comparison, (d) => { d.traits[0].hypotheses[0].weight = 'x'; }));
    const first = await runCliHere(['report', good, '--attach', badComparison, '--out', join(folder, 'attach-1.html')], folder);
    expect(first.stderr).toBe(`stratotrend: ${badComparison}: traits[0].hypotheses[0].weight: expected a number or null, got "x"\n`);
    expect(first.status).toBe(1);
    const badPower = save('power-bad.json', damaged(power, (d) => { d.settings.replicates = 'many'; }));
    const second = await runCliHere(['report', good, '--attach', badPower, '--out', join(folder, 'attach-2.html')], folder);
    expect(second.stderr).toBe(`stratotrend: ${badPower}: settings.replicates: expected a whole number, got "many"\n`);
    expect(second.status).toBe(1);
  });
});
