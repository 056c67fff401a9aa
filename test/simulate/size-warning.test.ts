import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { measuredNotes, runBootstrap } from '../../src/analyses/bootstrap-run.js';
import { createRandom } from '../../src/random/random.js';
import type { NestingTest } from '../../src/simulate/bootstrap-test.js';
import { bootstrapTable } from '../../src/cli/bootstrap-command.js';
import type { BootstrapTestReport } from '../../src/simulate/bootstrap-test.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

// `bootstrap --models` p-values whose size a seeded simulation measured above
// 5% (README.md, "Measured size and power of the `--models` tests",
// bench/nested-test-calibration.ts): moving-optimum and optimum-shift on
// fewer than 50 horizons, and optimum-shift's chi-square(1) p always. The
// output must say so beside the p (text, JSON) and as a `test-size` warning.
// Replicates run on the worker pool, which loads dist/: build first.

const shellLength = join(root, 'sample-data', 'shell-length.csv'); // invented demo data: lineages of 24 and 16 horizons
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-size-'));
const base = { replicates: '19', seed: '5', threads: '1', quiet: true };

// An invented lineage of 52 horizons (a seeded random walk): long enough that
// the measured size of the moving-optimum test is 5% (README: 5.0% at 50).
const long = join(folder, 'long.csv');
{
  const random = createRandom(31);
  let mean = 10;
  const rows = ['section,trait,time,n,mean,sd'];
  for (let i = 0; i < 52; i++) {
    if (i > 0) mean += 0.3 * random.normal();
    rows.push(`Long Cut,width,${(0.5 * i).toFixed(1)},15,${mean.toFixed(3)},0.8`);
  }
  writeFileSync(long, rows.join('\n') + '\n');
}

type Entry = { nested_models?: (NestingTest & { size_note: string | null; chi_square_measured: string | null })[] };
const testsOf = (document: Record<string, unknown>) => (document.lineages as Entry[]).map((lineage) => lineage.nested_models ?? []);

/** The README row of a `--models` id under its null: the bootstrap and chi-square(1) shares per horizons. */
function readmeSize(id: string): Map<number, { bootstrap: string; chiSquare: string }> {
  const readme = readFileSync(join(root, 'README.md'), 'utf8');
  const section = readme.slice(readme.indexOf('**Measured size and power of the `--models` tests**'));
  const rows = new Map<number, { bootstrap: string; chiSquare: string }>();
  for (const line of section.split('\n').slice(0, 60)) {
    const cells = line.split('|').map((cell) => cell.trim());
    if (cells[1] !== `\`${id}\`` || !cells[2].startsWith('null')) continue;
    // Percent with one decimal (0.050 → "5.0%"); the chi-square share of optimum-shift is written whole in the notes (0.510 → "51%").
    const share = (cell: string): string => `${(100 * Number(/0\.\d+/.exec(cell)![0])).toFixed(1)}%`;
    rows.set(Number(cells[3]), { bootstrap: share(cells[5]), chiSquare: share(cells[6]).replace('.0%', '%') });
  }
  return rows;
}

describe('bootstrap --models: measured size said where the p-values are read', () => {
  it('moving-optimum on lineages under 50 horizons: one folded test-size warning and size_note beside each p', async () => {
    const run = await runBootstrap(shellLength, { ...base, models: 'moving-optimum' });
    expect(run.cautions).toHaveLength(1);
    expect(run.cautions[0].category).toBe('test-size');
    expect(run.cautions[0].count).toBe(2); // both lineages, one line
    for (const [test] of testsOf(run.document)) {
      expect(test.not_tested).toBeNull();
      expect(test.size_note).toBe(run.cautions[0].message);
      expect(test.chi_square_measured).toBeNull();
    }
    // The measured shares and their horizons, as the README table gives them (bench/nested-test-calibration.ts, seed 2026).
    const measured = readmeSize('moving-optimum');
    expect(run.cautions[0].message).toContain(`${measured.get(15)!.bootstrap} of lineages of 15 horizons and ${measured.get(25)!.bootstrap} of 25`);
    expect(run.cautions[0].message).toContain(`(${measured.get(50)!.bootstrap} of 50)`);
    expect(run.cautions[0].message).toContain('weaker evidence than it looks');
    // bootstrap --json lists the run's warnings as fit --json does (it had none before).
    expect(run.document.warnings).toContainEqual(run.cautions[0]);
  });

  it('says nothing for accelerating-walk (keeps its size) or without --models; the text shows the caution under the p', async () => {
    const walk = await runBootstrap(shellLength, { ...base, models: 'accelerating-walk' });
    expect(walk.cautions).toEqual([]);
    for (const [test] of testsOf(walk.document)) expect(test.size_note).toBeNull();
    expect((await runBootstrap(shellLength, base)).cautions).toEqual([]);
    const cli = await runCliHere(['bootstrap', shellLength, '--models', 'moving-optimum,accelerating-walk', '--replicates', '19', '--threads', '1'], root);
    expect(cli.status).toBe(0);
    expect(cli.stdout.split('    caution: moving-optimum vs ou, lineages of fewer than 50 horizons').length - 1).toBe(2);
    expect(cli.stdout).not.toContain('caution: accelerating-walk');
    expect(cli.stderr.split('warning (test-size)').length - 1).toBe(1);
  });

  it('says nothing for moving-optimum on 52 horizons (measured 5%)', async () => {
    const run = await runBootstrap(long, { ...base, models: 'moving-optimum' });
    const [[test]] = testsOf(run.document);
    expect(test.not_tested).toBeNull();
    expect(test.size_note).toBeNull();
    expect(run.cautions).toEqual([]);
  });

  it('optimum-shift: its size and its chi-square(1) p never to be read (51%), on any length', () => {
    const measured = readmeSize('optimum-shift');
    const short = measuredNotes({ full: 'optimum-shift', not_tested: null }, 16);
    expect(short.size_note).toContain(`${measured.get(15)!.bootstrap} of lineages of 15 horizons`);
    expect(short.size_note).toContain(`and ${measured.get(25)!.bootstrap} of 25`);
    expect(short.chi_square_measured).toContain(`on 25 in ${measured.get(25)!.chiSquare}`);
    expect(short.chi_square_measured).toContain(`rejected at 5% in ${measured.get(15)!.chiSquare}`);
    // Its size grew from 15 to 25 horizons and was not measured beyond: the note stays on longer lineages.
    const longer = measuredNotes({ full: 'optimum-shift', not_tested: null }, 80);
    expect(longer.size_note).toContain('optimum-shift vs ou, any lineage:');
    expect(longer.chi_square_measured).toContain('do not read the chi-square(1) p of optimum-shift');
    // Not tested (no shift position on a short lineage): no p, so no note.
    expect(measuredNotes({ full: 'optimum-shift', not_tested: 'too short' }, 8)).toEqual({ size_note: null, chi_square_measured: null });
  });

  it('optimum-shift in the text: the chi-square(1) p marked "not valid" with what was measured, on any length', () => {
    // A test entry as bootstrapTests returns it (numbers invented; only the words are checked).
    const test: NestingTest = { full: 'optimum-shift', reduced: 'ou', condition: 'optimum_before = optimum_after', not_tested: null, generator: 'ou', statistic: 4.8, p_bootstrap: 0.15, p_chi_square: 0.028, chi_square_exact: false, chi_square_note: 'not exact: searched', critical_value: 5.7, null_distribution: null };
    const report = { nested: null, non_nested: null, nested_models: [test], replicates: 19, seed: 5 } as unknown as BootstrapTestReport;
    for (const horizons of [16, 80]) {
      const text = bootstrapTable('Long Cut / width', report, horizons);
      expect(text).toContain('chi-square(1) p = 0.028 (not valid)');
      expect(text).toContain(`chi-square(1) reference not valid: under a true ou on 15 horizons it rejected at 5% in ${readmeSize('optimum-shift').get(15)!.chiSquare}`);
      expect(text).not.toContain('not exact: searched');
      expect(text).toContain('caution: optimum-shift vs ou');
    }
  });
});
