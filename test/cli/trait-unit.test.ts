import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { WarningLog } from '../../src/data/warnings.js';
import { readSamples } from '../../src/data/samples.js';
import { readTable } from '../../src/data/read-table.js';
import { lineagesOf, traitUnitFor, traitUnitOption } from '../../src/analyses/input.js';
import { svgText } from '../render/figures/figure-probes.js';
import { root, type CliRun } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

// --trait-unit end to end: the label reaches the table, fit.json, the figures
// drawn at once and those redrawn later from fit.json, and the report of a
// saved fit.json. The unit is a label only, so every number must be the same
// with and without it (checked on the JSON). Units follow common practice
// (dimensional analysis: variance in the unit squared, drift per time).

const shellLength = join(root, 'sample-data', 'shell-length.csv');
const localities = join(root, 'sample-data', 'locality-heights.csv');
const ties = join(root, 'sample-data', 'locality-ties.csv');
type Json = Record<string, any>;

async function usageFailure(args: string[]): Promise<string> {
  const run = await runCliHere(args, root);
  expect(run.status, run.stderr).toBe(2);
  expect(run.stderr.trim().split('\n')).toHaveLength(1);
  return run.stderr;
}

describe('--trait-unit values', () => {
  it('one label for every trait, or TRAIT=LABEL per trait (names without case or surrounding spaces)', async () => {
    expect(traitUnitOption(undefined)).toEqual({ all: null, byTrait: new Map() });
    expect(traitUnitOption(' mm ').all).toBe('mm');
    const units = traitUnitOption(['mm', ' Rib Density = ribs per cm ']);
    expect(traitUnitFor(units, 'rib density')).toBe('ribs per cm');
    expect(traitUnitFor(units, 'whorl width')).toBe('mm');
    expect(traitUnitFor(traitUnitOption(['whorl width=mm']), 'rib density')).toBeNull();
  });

  it('refuses an empty label, an unnamed trait, control characters, two plain labels and a trait named twice', async () => {
    expect(() => traitUnitOption('  ')).toThrow('--trait-unit must name a unit');
    expect(() => traitUnitOption('whorl width=')).toThrow('--trait-unit must name a unit');
    expect(() => traitUnitOption('=mm')).toThrow('name the trait before "="');
    expect(() => traitUnitOption('m\nm')).toThrow('without control characters');
    expect(() => traitUnitOption(['mm', 'cm'])).toThrow('got both "mm" and "cm"');
    expect(() => traitUnitOption(['a=mm', 'A=cm'])).toThrow('trait "A" is given a unit twice');
  });

  it('gives each lineage its trait unit; a trait not in the file is a usage error naming the traits', async () => {
    const samples = readSamples(readTable(readFileSync(localities, 'utf8'), 'locality-heights.csv'), {});
    const noAges = () => ({ age: 0, extrapolated: false });
    const ageOf = (_section: string, position: number) => ({ ...noAges(), age: 20 - position / 100 });
    const lineages = lineagesOf(samples, { traitUnit: ['whorl width=mm', 'rib density=ribs per cm'] }, new WarningLog(), { ageOf });
    expect(new Set(lineages.map((lineage) => `${lineage.trait}: ${lineage.traitUnit}`))).toEqual(new Set(['whorl width: mm', 'rib density: ribs per cm']));
    expect(() => lineagesOf(samples, { traitUnit: ['whorl with=mm'] }, new WarningLog(), { ageOf })).toThrow('--trait-unit: no trait "whorl with" in locality-heights.csv; its traits are "whorl width", "rib density"');
    expect(lineagesOf(samples, {}, new WarningLog(), { ageOf }).every((lineage) => lineage.traitUnit === null)).toBe(true);
  });

  it('usage errors reach the command line as one line, exit 2', async () => {
    expect(await usageFailure(['fit', shellLength, '--trait-unit', 'mm', '--trait-unit', 'cm'])).toContain('got both "mm" and "cm"');
    expect(await usageFailure(['fit', shellLength, '--trait-unit', 'shel length=mm'])).toContain('no trait "shel length"');
  });
});

describe('fit --trait-unit, fit.json, redraw and report', () => {
  const folder = mkdtempSync(join(tmpdir(), 'stratotrend-trait-unit-'));
  const out = join(folder, 'fit');
  let printed: CliRun;
  let document: Json;
  beforeAll(async () => {
    // --no-trend-test: the checks below read units (table, fit.json, figures, report), never the verdict (issue 22).
    printed = await runCliHere(['fit', shellLength, '--trait-unit', 'mm', '--no-intervals', '--no-trend-test', '--out', out, '--figure-format', 'svg'], root);
    document = JSON.parse(readFileSync(join(out, 'fit.json'), 'utf8')) as Json;
  });

  it('prints estimates in mm and writes trait_unit per lineage', async () => {
    expect(printed.status, printed.stderr).toBe(0);
    expect(printed.stdout).toMatch(/drift [\d.]+ mm per Myr/);
    expect(printed.stdout).toMatch(/step_variance [\d.e-]+ mm² per Myr/);
    expect(document.lineages.map((lineage: Json) => lineage.trait_unit)).toEqual(['mm', 'mm']);
    expect(document.provenance.options.trait_unit).toEqual(['mm']);
  });

  it('the figures written at once carry the unit on the trait axis', async () => {
    const { text } = svgText(readFileSync(join(out, 'varnek-draw_shell-length.trajectory.svg'), 'utf8'));
    expect(text).toContain('Shell length (mm, mean per horizon)');
  });

  it('redraw reads the unit back from fit.json', async () => {
    const again = join(folder, 'again');
    const run = await runCliHere(['redraw', join(out, 'fit.json'), '--out', again, '--figure-format', 'svg', '--only', 'trajectory,sections'], root);
    expect(run.status, run.stderr).toBe(0);
    for (const name of ['tolloway-bluff_shell-length.trajectory.svg', 'shell-length.sections.svg']) {
      expect(svgText(readFileSync(join(again, name), 'utf8')).text, name).toContain('Shell length (mm, mean per horizon)');
    }
  });

  it('report FIT_JSON shows the saved unit and refuses a new one', async () => {
    const page = join(folder, 'report.html');
    const run = await runCliHere(['report', join(out, 'fit.json'), '--out', page], root);
    expect(run.status, run.stderr).toBe(0);
    const html = readFileSync(page, 'utf8');
    expect(html).toContain('<td>mm² per Myr</td>');
    expect(html).toContain('Trait values were measured in mm');
    expect(await usageFailure(['report', join(out, 'fit.json'), '--trait-unit', 'cm', '--out', join(folder, 'other.html')])).toContain('a fit.json keeps the unit it was fitted with');
  });

  it('the unit is a label only: --json numbers are identical with and without it', async () => {
    const withUnit = JSON.parse((await runCliHere(['fit', shellLength, '--trait-unit', 'mm', '--no-intervals', '--json'], root)).stdout) as Json;
    const without = JSON.parse((await runCliHere(['fit', shellLength, '--no-intervals', '--json'], root)).stdout) as Json;
    expect(without.lineages.map((lineage: Json) => lineage.trait_unit)).toEqual([null, null]);
    expect(without.provenance.options.trait_unit).toBeNull();
    for (const lineage of [...withUnit.lineages, ...without.lineages]) delete lineage.trait_unit;
    for (const run of [withUnit, without]) delete run.provenance.options.trait_unit;
    expect(withUnit).toEqual(without);
  });
});

describe('without --trait-unit the outputs are as before the option', () => {
  it('a fit.json without trait_unit (written before the option) redraws byte for byte like one with trait_unit null', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-trait-unit-'));
    const out = join(folder, 'fit');
    // --no-trend-test: the check compares two redraws of the same fit, not the verdict (issue 22).
    expect((await runCliHere(['fit', shellLength, '--no-intervals', '--no-trend-test', '--quiet', '--no-figures', '--out', out], root)).status).toBe(0);
    const current = JSON.parse(readFileSync(join(out, 'fit.json'), 'utf8')) as Json;
    const old = structuredClone(current);
    for (const lineage of old.lineages) delete lineage.trait_unit;
    writeFileSync(join(folder, 'old.json'), JSON.stringify(old, null, 2));
    for (const [source, target] of [[join(out, 'fit.json'), 'new'], [join(folder, 'old.json'), 'old']]) {
      expect((await runCliHere(['redraw', source, '--out', join(folder, target), '--dpi', '150', '--only', 'trajectory'], root)).status).toBe(0);
    }
    const name = 'varnek-draw_shell-length.trajectory.png';
    expect(readFileSync(join(folder, 'new', name)).equals(readFileSync(join(folder, 'old', name)))).toBe(true);
  });

  it('the table says "trait units" and names no unit', async () => {
    // --no-trend-test: the checks read the estimate lines' units; the verdict line names no unit (issue 22).
    const run = await runCliHere(['fit', shellLength, '--no-intervals', '--no-trend-test'], root);
    expect(run.stdout).toMatch(/drift [\d.]+ trait units per Myr/);
    expect(run.stdout).toMatch(/step_variance [\d.e-]+ \(trait units\)² per Myr/);
    expect(run.stdout).toContain('(per-horizon sampling variance, untransformed trait)\n');
  });
});

describe('compare and power', () => {
  it('compare: each trait its own unit in the heading and compare.json', async () => {
    const run = await runCliHere(['compare', localities, '--age-model', ties, '--no-intervals', '--json', '--trait-unit', 'whorl width=mm', '--trait-unit', 'rib density=ribs per cm'], root);
    expect(run.status, run.stderr).toBe(0);
    const traits = (JSON.parse(run.stdout) as Json).traits as Json[];
    expect(Object.fromEntries(traits.map((trait) => [trait.trait, trait.trait_unit]))).toEqual({ 'whorl width': 'mm', 'rib density': 'ribs per cm' });
    const table = (await runCliHere(['compare', localities, '--age-model', ties, '--no-intervals', '--trait-unit', 'mm'], root)).stdout;
    expect(table).toMatch(/Trait "whorl width": .*time in Myr, trait in mm\n/);
  });

  it('power: table, JSON and the drift axis in mm per Myr', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-trait-unit-'));
    const figure = join(folder, 'power.svg');
    // One assumed step variance (the default assumes two, fitted and upper end; the unit is printed the same way for both).
    const args = ['power', shellLength, '--replicates', '20', '--no-coverage', '--threads', '1', '--step-variance', '0.02', '--trait-unit', 'mm'];
    const run = await runCliHere([...args, '--figure', figure], root);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toContain('drift (mm per Myr)');
    expect(run.stdout).toMatch(/step variance [\d.e-]+ mm² per Myr/);
    expect(run.stdout).toMatch(/Smallest drift with 80% power: LRT [\d.]+ mm per Myr/);
    expect(svgText(readFileSync(figure, 'utf8')).text).toContain('true drift (mm per Myr)');
    const json = JSON.parse((await runCliHere([...args, '--json'], root)).stdout) as Json;
    expect(json.input).toMatchObject({ trait_unit: 'mm', transform: 'none' });
  });

  it('bootstrap and simulate print no trait quantities and take no --trait-unit', async () => {
    for (const command of ['bootstrap', 'simulate']) {
      const run = await runCliHere([command, shellLength, '--trait-unit', 'mm'], root);
      expect(run.status, command).not.toBe(0);
      expect(run.stderr, command).toContain("unknown option '--trait-unit'");
    }
  });
});
