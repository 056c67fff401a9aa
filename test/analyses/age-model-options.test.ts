import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readAgeModel } from '../../src/data/age-model.js';
import { readTable } from '../../src/data/read-table.js';
import { WarningLog } from '../../src/data/warnings.js';
import { warnImplausibleRates } from '../../src/analyses/age-model-options.js';
import { runPower } from '../../src/analyses/power-run.js';
import { runFitStreamed, type FitRun } from '../../src/analyses/fit-run.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

// Issue 19: every command that reads samples takes the age-model options
// through one set (commands/shared.ts addAgeModelOptions, analyses/age-model-options.ts).

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-age-options-'));
const heights = join(root, 'sample-data', 'locality-heights.csv');
const ties = join(root, 'sample-data', 'locality-ties.csv');
afterAll(() => rmSync(folder, { recursive: true, force: true }));

function write(name: string, text: string): string {
  const path = join(folder, name);
  writeFileSync(path, text);
  return path;
}

// Hand-made design by depth: 6 horizons at depths 10..60 m, ties at depths 0 and 100 m with ages 1 and 2 Ma,
// so age = 1 + depth / 100 (linear interpolation, closed form).
const depthSamples = write('depths.csv', ['depth,n,mean,sd', '10,10,5.0,0.3', '20,12,5.1,0.3', '30,11,5.3,0.4', '40,10,5.2,0.3', '50,9,5.5,0.3', '60,10,5.6,0.35'].join('\n') + '\n');
const depthTies = write('depth-ties.csv', 'depth,age\n0,1\n100,2\n');
const heightTies = write('height-ties.csv', 'height,age\n0,1\n100,2\n');

describe('--age-model and --extrapolate on every samples-reading command', () => {
  it('--help of fit, compare, report, power, bootstrap and simulate lists both; --age-draws only where draws are run (fit, compare)', async () => {
    for (const command of ['fit', 'compare', 'report', 'power', 'bootstrap', 'simulate']) {
      const help = (await runCliHere([command, '--help'], folder)).stdout;
      expect(help, command).toContain('--age-model <file>');
      expect(help, command).toContain('--extrapolate');
      expect(help.includes('--age-draws'), command).toBe(command === 'fit' || command === 'compare');
    }
  });

  it('power runs on a design given by height once the age model is given (the report --power blocker)', async () => {
    const run = await runPower(heights, { ageModel: ties, lineage: 'Quarrel Hollow / whorl width', replicates: '20', stepVariance: '0.02', coverage: false, threads: '1' });
    expect(run.lineage.positionKind).toBe('height');
    // Elapsed time runs from the oldest horizon: t_i = firstAge - age_i, all finite and increasing.
    expect(Array.from(run.lineage.time).every((t, i, all) => i === 0 || t > all[i - 1])).toBe(true);
    expect(run.report.grid.length).toBeGreaterThan(0);
  });

  it('report --power on heights with --age-model runs the power analysis for every lineage', async () => {
    // One lineage of the bundled data and one assumed step variance (one power run keeps the test short).
    const rows = readFileSync(heights, 'utf8').trim().split('\n');
    const one = write('one-lineage.csv', [rows[0], ...rows.filter((row) => row.startsWith('Quarrel Hollow,whorl width,'))].join('\n') + '\n');
    const out = join(folder, 'power.html');
    const run = await runCliHere(['report', one, '--age-model', ties, '--power', '--power-replicates', '20', '--power-step-variance', '0.02', '--no-intervals', '--out', out], folder);
    expect(run.status, run.stderr).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html).not.toContain('power not run');
    expect(html).not.toContain('no age model was given');
  });

  it('simulate on a depth design writes the ages of the age model (age = 1 + depth/100), which fit reads back without ties', async () => {
    const out = join(folder, 'simulated.csv');
    const run = await runCliHere(['simulate', depthSamples, '--age-model', depthTies, '--model', 'random-walk', '--parameters', 'ancestral_mean=5,step_variance=0.1', '--out', out], folder);
    expect(run.status, run.stderr).toBe(0);
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('section,trait,age,n,mean,sd');
    expect(lines.slice(1).map((line) => Number(line.split(',')[2]))).toEqual([1.6, 1.5, 1.4, 1.3, 1.2, 1.1]); // oldest (deepest) first
    // --no-trend-test: only the exit status is checked, not the verdict (issue 22).
    expect((await runCliHere(['fit', out, '--no-intervals', '--quiet', '--no-trend-test'], folder)).status).toBe(0);
  });

  it('bootstrap places depths with the age model; without it the message names --age-model, which it now takes', async () => {
    const without = await runCliHere(['bootstrap', depthSamples, '--replicates', '19', '--threads', '1', '--quiet'], folder);
    expect(without.status).toBe(1);
    expect(without.stderr).toContain('--age-model FILE');
    const withTies = await runCliHere(['bootstrap', depthSamples, '--age-model', depthTies, '--replicates', '19', '--threads', '1', '--json'], folder);
    expect(withTies.status, withTies.stderr).toBe(0);
    expect(JSON.parse(withTies.stdout).lineages).toHaveLength(1);
  });

  it('--extrapolate without --age-model is a usage error on the new commands too', async () => {
    for (const command of ['power', 'bootstrap', 'simulate']) {
      const run = await runCliHere([command, depthSamples, '--extrapolate'], folder);
      expect(run.status, command).toBe(2);
      expect(run.stderr, command).toContain('--extrapolate extends an age model');
    }
  });
});

describe('the tie reader', () => {
  it('a tie file in height against samples in depth says so, instead of an age reversal', async () => {
    const run = await runCliHere(['fit', depthSamples, '--age-model', heightTies, '--no-intervals'], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('the ties give "height" but the samples give "depth"');
    expect(run.stderr).not.toContain('age reversal');
    // Depth ties named "height" (ages growing with "height") were the misleading case: still a clear message.
    const misnamed = write('misnamed-ties.csv', 'height,age\n0,1\n100,2\n');
    expect((await runCliHere(['fit', depthSamples, '--age-model', misnamed, '--no-intervals'], folder)).stderr).toContain('the samples give "depth"');
  });

  it('hints --decimal-comma for "8,10" as the samples reader does', async () => {
    const table = readTable('section;height;age\nA;0;9\nA;35;"8,10"\n', 'ties.csv', { delimiter: ';' });
    expect(() => readAgeModel(table)).toThrow('ties.csv line 3, column "age": must be a finite number, got "8,10" (for a decimal comma use --decimal-comma)');
    expect(readAgeModel(table, { decimalComma: true }).sections.get('A')?.[1].age).toBe(8.1);
  });
});

describe('plausibility of the time axis (thresholds: common practice, see README)', () => {
  it('sedimentation rates of ka ages read as Ma are 1000 times too small: warned, with --time-unit ka named', async () => {
    // Ties 0 m at 1000 and 20 m at 0 in "Myr": 0.02 m/Myr; read as ka, 20 m/Myr.
    const model = readAgeModel(readTable('height,age\n0,1000\n20,0\n', 'ka-ties.csv'));
    const log = new WarningLog();
    warnImplausibleRates(model, { label: 'Myr', years: 1e6 }, log);
    expect(log.list().map((warning) => [warning.category, warning.message])).toEqual([
      ['time-axis', 'the ties of ka-ties.csv: median sedimentation rate 0.02 m per Myr (0.02 m/Myr) lies outside the plausible 0.1 to 10000 m/Myr; if the ages are in kyr, give --time-unit ka'],
    ]);
    const right = new WarningLog();
    warnImplausibleRates(model, { label: 'kyr', years: 1e3 }, right);
    expect(right.list()).toEqual([]);
  });

  it('the bundled ties (22 to 39 m/Myr) raise nothing; the CLI prints a rate warning on stderr and into the JSON warnings', async () => {
    // --no-trend-test on both fits: the checks read the time-axis warnings only, never the verdict (issue 22).
    const fine = await runCliHere(['fit', heights, '--age-model', ties, '--no-intervals', '--json', '--no-trend-test'], folder);
    expect(fine.stderr).not.toContain('time-axis');
    // 100 m over 10000 "Myr": 0.01 m/Myr (10 m/Myr in ka); the horizons at 10..60 m span 5000 "Myr" (5 Myr in ka).
    const kaTies = write('ka-ties.csv', 'depth,age\n0,1000\n100,11000\n');
    const run = await runCliHere(['fit', depthSamples, '--age-model', kaTies, '--no-intervals', '--json', '--no-trend-test'], folder);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stderr).toContain('warning (time-axis)');
    const warnings = (JSON.parse(run.stdout) as { warnings: { category: string; message: string }[] }).warnings.filter((warning) => warning.category === 'time-axis');
    // One for the rates, one for the lineage span.
    expect(warnings.map((warning) => warning.message.includes('--time-unit ka'))).toEqual([true, true]);
  });
});

describe('power reports the same time-axis warnings in its JSON', () => {
  it('ka ties read as Ma: the power document carries the time-axis warnings', async () => {
    const kaTies = write('ka-ties-power.csv', 'depth,age\n0,1000\n100,11000\n');
    const run = await runPower(depthSamples, { ageModel: kaTies, replicates: '20', coverage: false, threads: '1', drifts: '0,1' });
    const warnings = (run.document.warnings as { category: string; message: string }[]).filter((warning) => warning.category === 'time-axis');
    expect(warnings).toHaveLength(2);
    for (const warning of warnings) expect(warning.message).toContain('--time-unit ka');
  });
});

describe('fit with an age model', () => {
  it('fit.json data carries each horizon\'s age (age = 1 + depth/100, closed form) and the age model with its tie file in the provenance', async () => {
    // trendTest: false: the checks read the data, age model and provenance, not the verdict (issue 22).
    const run = await runFitStreamed(depthSamples, { ageModel: depthTies, intervals: false, quiet: true, models: 'random-walk', trendTest: false });
    const lineage = (run.document.lineages as { data: { age: number[]; position: number[] } }[])[0];
    expect(lineage.data.position).toEqual([60, 50, 40, 30, 20, 10]);
    lineage.data.age.forEach((age, i) => expect(age).toBeCloseTo(1 + lineage.data.position[i] / 100, 12));
    expect((run.document.age_model as { position_kind: string }).position_kind).toBe('depth');
    expect((run.document.provenance as { inputs: { file: string }[] }).inputs.map((input) => input.file)).toEqual([depthSamples, depthTies]);
  });

  it('prints the sedimentation rates of every section (hand-computed: 35 m over 0.9 Myr = 38.9 m/Myr)', async () => {
    // --no-trend-test: the checks read the sedimentation-rate lines, not the verdict (issue 22).
    const run = await runCliHere(['fit', heights, '--age-model', ties, '--no-intervals', '--no-trend-test'], folder);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toContain('rates in m per Myr');
    expect(run.stdout).toContain('Quarrel Hollow: 4 ties, sedimentation rates 38.9, 37.5, 30.8');
  });
});

describe('progress of long jobs (drawn on a terminal only; here a recorder stands in for the bar)', () => {
  const recorder = () => {
    const stages: { label: string; total: number; ticks: number[] }[] = [];
    return { stages, progress: { stage(label: string, total: number) { const entry = { label, total, ticks: [] as number[] }; stages.push(entry); return (done: number) => { entry.ticks.push(done); }; } } };
  };

  it('fit --age-draws ticks once per draw up to the number of draws', async () => {
    await drawnRun();
    expect(drawnStages.map((stage) => [stage.total, stage.ticks])).toEqual([[4, [1, 2, 3, 4]]]);
  });

  it('compare --age-draws ticks once per draw', async () => {
    const { runCompare } = await import('../../src/analyses/compare-run.js');
    const { stages, progress } = recorder();
    await runCompare(heights, { ageModel: ties, ageDraws: '3', models: 'random-walk', intervals: false }, undefined, progress);
    expect(stages.map((stage) => [stage.total, stage.ticks])).toEqual([[3, [1, 2, 3]]]);
  });
});

// One run shared by the age-draw progress check and the document checks below (fit once per file, issue 22):
// the three blocks `fit` adds to its document, --age-model, --age-draws and --summary (with the trend verdicts it counts).
const drawnStages: { label: string; total: number; ticks: number[] }[] = [];
const drawnProgress = { stage(label: string, total: number) { const entry = { label, total, ticks: [] as number[] }; drawnStages.push(entry); return (done: number) => { entry.ticks.push(done); }; } };
let drawn: Promise<FitRun> | undefined;
const drawnRun = (): Promise<FitRun> => (drawn ??= runFitStreamed(heights, { ageModel: ties, ageDraws: '4', seed: '3', models: 'random-walk', intervals: false, quiet: true, summary: true, threads: 1 }, { ageDraws: drawnProgress }));

describe('the fit document is built once (issue 22)', () => {
  it('holds the age model, the age draws and the summary when the run returns, in the documented order', async () => {
    const { document, fits } = await drawnRun();
    // Key order of fit.json as the README's fit.json section lists it.
    expect(Object.keys(document)).toEqual(['provenance', 'model_set', 'lineages', 'warnings', 'age_model', 'age_uncertainty', 'compilation']);
    expect(document.age_model?.file).toBe(ties);
    expect(document.age_uncertainty?.draws).toBe(4);
    expect(document.age_uncertainty?.seed).toBe(3);
    expect(document.age_uncertainty?.lineages.map((lineage) => `${lineage.section} / ${lineage.trait}`)).toEqual(fits.map((fit) => `${fit.lineage.section} / ${fit.lineage.trait}`));
    // The trend verdicts are counted in the summary block itself, given when it was made (last key, as before).
    expect(document.compilation?.lineages).toBe(fits.length);
    expect(Object.keys(document.compilation ?? {}).at(-1)).toBe('trend_tests');
    expect(document.compilation?.trend_tests?.tested).toBe(document.lineages.filter((lineage) => (lineage.trend_test as { p_value: number | null }).p_value !== null).length);
  });

  it('cannot be patched afterwards: its top level is frozen', async () => {
    const { document } = await drawnRun();
    expect(Object.isFrozen(document)).toBe(true);
    // ES modules run in strict mode, where writing to a frozen object throws (ECMAScript, [[Set]] on a non-writable property).
    expect(() => { (document as Record<string, unknown>).age_uncertainty = null; }).toThrow(TypeError);
  });
});
