import { mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCompare, sectionDocuments, type CompareRun } from '../../src/analyses/compare-run.js';
import { directionalWalk } from '../../src/models/directional-walk.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const heights = new URL('../../sample-data/locality-heights.csv', import.meta.url).pathname;
const ties = new URL('../../sample-data/locality-ties.csv', import.meta.url).pathname;
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-compare-'));
type Json = Record<string, any>;

describe('stratotrend compare', () => {
  let run: CompareRun;
  let document: Json;
  beforeAll(async () => {
    run = await runCompare(heights, { ageModel: ties, intervals: false });
    document = run.document as Json;
  });

  // The fields the issue names: {"traits": [{"trait", "hypotheses": [{"id", "model", "k", "logLik", "aicc", "weight"}]}]}.
  it('writes the JSON fields the checks read', async () => {
    expect(document.traits.map((trait: Json) => trait.trait)).toEqual(['whorl width', 'rib density']);
    for (const trait of document.traits) {
      expect(trait.hypotheses).toHaveLength(14);
      for (const hypothesis of trait.hypotheses) {
        expect(['separate', 'shared', 'shared-offset']).toContain(hypothesis.id);
        expect(typeof hypothesis.model).toBe('string');
        expect(Number.isInteger(hypothesis.k)).toBe(true);
        expect(typeof hypothesis.logLik).toBe('number');
        expect(typeof hypothesis.aicc).toBe('number');
        expect(typeof hypothesis.weight).toBe('number');
      }
      // Burnham & Anderson (2002): weights over the compared set sum to 1.
      const total = trait.hypotheses.reduce((sum: number, h: Json) => sum + h.weight, 0);
      expect(Math.abs(total - 1)).toBeLessThan(1e-12);
      // AICc (Hurvich & Tsai 1989) with N = all horizons of the trait (38 here).
      for (const h of trait.hypotheses) {
        expect(Math.abs(h.aicc - (-2 * h.logLik + 2 * h.k + (2 * h.k * (h.k + 1)) / (38 - h.k - 1)))).toBeLessThan(1e-9);
      }
    }
    expect(document.provenance.inputs).toHaveLength(2);
  });

  // The demo data were generated with very different rib-density drifts (scripts/make-locality-data.mjs).
  it('on the demo data, rib density favours separate', async () => {
    const rib = document.traits[1];
    const summed = (id: string) => rib.hypotheses.filter((h: Json) => h.id === id).reduce((sum: number, h: Json) => sum + h.weight, 0);
    expect(summed('separate')).toBeGreaterThan(0.9);
  });

  it('refuses heights outside the ties without --extrapolate, and flags them with it', async () => {
    const shortTies = join(folder, 'short-ties.csv');
    writeFileSync(shortTies, readFileSync(ties, 'utf8').replace('Quarrel Hollow,120,5.60,0.04\n', ''));
    const refused = await runCliHere(['compare', heights, '--age-model', shortTies, '--no-intervals'], root);
    expect(refused.status).toBe(1);
    expect(refused.stderr).toMatch(/locality-heights\.csv line \d+: height \S+ in section "Quarrel Hollow" lies outside the age model's ties \(0 to 80\).*--extrapolate/);
    const allowed = await runCompare(heights, { ageModel: shortTies, extrapolate: true, intervals: false, models: 'random-walk' });
    const section = (allowed.document as Json).traits[0].sections[0];
    expect(section.extrapolated_horizons).toBeGreaterThan(0);
    expect(allowed.warnings.has('extrapolated-age')).toBe(true);
  });

  it('writes CSV, JSON and a figure with --out, and the help names the hypotheses', async () => {
    const out = join(folder, 'out');
    const result = await runCliHere(['compare', heights, '--age-model', ties, '--no-intervals', '--models', 'random-walk,directional-walk', '--out', out], root);
    expect(result.status).toBe(0);
    const csv = readFileSync(join(out, 'compare.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toBe('trait,hypothesis,model,k,horizons,logLik,aicc,delta_aicc,weight,best,compared,lrt_statistic,lrt_df,lrt_p_value,extrapolated_horizons,message,same_fit_as');
    expect(csv).toHaveLength(1 + 2 * 6);
    expect(existsSync(join(out, 'whorl-width.sections.png'))).toBe(true);
    const help = await runCliHere(['compare', '--help'], root);
    expect(help.stdout).toMatch(/shared-offset/);
    expect(help.stdout).toMatch(/--age-model <file>/);
    // Issue 20: the help documents the model sets compare accepts and what extended leaves out.
    expect(help.stdout).toMatch(/Model sets \(--models\):\n  classic .*\n  extended /);
    expect(help.stdout).toMatch(/--intervals <method>/);
  });

  // Hand-checkable from the ties: Quarrel Hollow's lowest horizon at 1.0 m lies between (0 m, 9.00 Ma) and
  // (35 m, 8.10 Ma): 9.00 - 1.0 * 0.90 / 35 = 8.974285714... Ma. The figure documents carry these ages.
  it('sections figure documents put every section on the common age axis', async () => {
    const comparison = run.run.comparisons[0];
    const documents = sectionDocuments(comparison, [directionalWalk]);
    expect(documents.map((d) => d.position_kind)).toEqual(['age', 'age', 'age']);
    const first = (documents[0].data as Json).position as number[];
    expect(first[0]).toBeCloseTo(9 - 0.9 / 35, 12);
    documents.forEach((document, s) => {
      const section = comparison.sections[s];
      const positions = (document.data as Json).position as number[];
      positions.forEach((age, i) => expect(age).toBeCloseTo(section.firstAge! - section.time[i], 12));
    });
  });

  it('composite: one lineage per trait on the common timescale, coeval horizons merged when asked', async () => {
    const composite = await runCompare(heights, { ageModel: ties, intervals: false, composite: true, models: 'random-walk' });
    const lineages = (composite.document as Json).composite;
    expect(lineages).toHaveLength(2);
    expect(lineages[0].horizons).toBe(38);
    const times: number[] = lineages[0].data.time;
    expect(times[0]).toBe(0);
    for (let i = 1; i < times.length; i++) expect(times[i]).toBeGreaterThanOrEqual(times[i - 1]);
  });

  it('fit accepts --age-model and reports the age draws in the JSON', async () => {
    // --no-trend-test: the checks read the age draws and the age model, not the verdict (issue 22).
    const result = await runCliHere(['fit', heights, '--age-model', ties, '--no-intervals', '--models', 'random-walk,directional-walk', '--age-draws', '4', '--seed', '9', '--json', '--no-trend-test'], root);
    expect(result.status).toBe(0);
    const fit = JSON.parse(result.stdout);
    expect(fit.age_uncertainty.draws).toBe(4);
    expect(fit.age_uncertainty.lineages).toHaveLength(6);
    expect(fit.age_model.sections).toHaveLength(3);
    const again = JSON.parse((await runCliHere(['fit', heights, '--age-model', ties, '--no-intervals', '--models', 'random-walk,directional-walk', '--age-draws', '4', '--seed', '9', '--json', '--no-trend-test'], root)).stdout);
    expect(again.age_uncertainty).toEqual(fit.age_uncertainty);
  });
});
