import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runJoint } from '../../src/analyses/joint-run.js';
import { jointBlock } from '../../src/render/report/joint-block.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

// `joint` prints 95% profile intervals whose coverage a seeded simulation
// measured short of 95% for the correlated walks (README.md, "Measured
// coverage of the joint intervals", bench/joint-coverage.ts). The output must
// say so where the intervals are read: a warning (category
// `interval-coverage`) and `coverage_note` beside the intervals in JSON.

const shellShape = join(root, 'sample-data', 'shell-shape.csv'); // invented demo data: two traits, 24 horizons
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-coverage-'));

// Invented group whose second trait is exactly 0.5 × the first + 1: the steps
// are perfectly correlated, so the fitted step covariance is singular (the
// boundary flag "Cholesky diagonal 2 at 0").
const collinear = join(folder, 'collinear.csv');
{
  const lengths = [10, 10.4, 9.9, 10.8, 11.5, 11.1, 11.9, 12.6, 12.2, 13.1, 13.4, 12.9, 13.8, 14.3];
  const rows = ['section,trait,age,n,mean,sd'];
  lengths.forEach((length, i) => rows.push(`Testbed,length,${14 - i},20,${length},0.5`, `Testbed,width,${14 - i},20,${0.5 * length + 1},0.25`));
  writeFileSync(collinear, rows.join('\n') + '\n');
}

type ModelEntry = { id: string; flags: string[]; intervals: { coverage_note: string | null } | null };
const modelsOf = (document: Record<string, unknown>): ModelEntry[] => (document.groups as { models: ModelEntry[] }[])[0].models;
const coverageWarnings = (run: Awaited<ReturnType<typeof runJoint>>) => run.warnings.list().filter((warning) => warning.category === 'interval-coverage');

/** The README's measured coverage table: model → horizons → the cells, as printed. */
function readmeCoverage(): Map<string, string[][]> {
  const readme = readFileSync(join(root, 'README.md'), 'utf8');
  const section = readme.slice(readme.indexOf('**Measured coverage of the joint intervals**'));
  const table = new Map<string, string[][]>();
  for (const line of section.split('\n').slice(0, 40)) {
    const cells = line.split('|').map((cell) => cell.trim());
    const id = /^`([a-z-]+)`$/.exec(cells[1] ?? '')?.[1];
    if (!id) continue;
    table.set(id, [...(table.get(id) ?? []), cells.slice(4, 8)]);
  }
  return table;
}

/** Every share in the cells (0.895 ± 0.022 → 0.895), as whole percent after rounding half up. */
const percents = (cells: string[]): number[] => cells.flatMap((cell) => [...cell.matchAll(/0\.(\d{3}) ±/g)].map((match) => Math.floor(Number(match[1]) / 10 + 0.5)));

describe('joint: measured coverage of the correlated walks\' intervals is said where they are printed', () => {
  it('warns once (interval-coverage) and puts coverage_note beside the intervals of correlated-random-walk', async () => {
    const run = await runJoint(shellShape, { models: 'correlated-random-walk,independent-random-walks', threads: 1 });
    const warnings = coverageWarnings(run);
    expect(warnings).toHaveLength(1);
    expect(warnings[0].message).toContain('correlated-random-walk');
    expect(warnings[0].message).toContain('Measured coverage of the joint intervals');
    const [walk, independent] = ['correlated-random-walk', 'independent-random-walks'].map((id) => modelsOf(run.document).find((model) => model.id === id)!);
    expect(walk.intervals!.coverage_note).toBe(warnings[0].message);
    // The independent walks were not measured: no note, only null.
    expect(independent.intervals!.coverage_note).toBeNull();
    // The document's warnings carry it for scripts too.
    expect((run.document.warnings as { category: string }[]).some((warning) => warning.category === 'interval-coverage')).toBe(true);
  });

  it('gives the README table\'s measured shares (bench/joint-coverage.ts, seed 2026) and its horizons', async () => {
    const table = readmeCoverage();
    const run = await runJoint(shellShape, { models: 'correlated-random-walk,correlated-directional-walk,independent-random-walks', threads: 1 });
    for (const id of ['correlated-random-walk', 'correlated-directional-walk']) {
      const rows = table.get(id)!;
      expect(rows).toHaveLength(2); // 20 and 30 horizons
      const others = rows.flatMap((row) => percents(row.slice(0, 3)));
      const correlation = rows.flatMap((row) => percents(row.slice(3)));
      const note = modelsOf(run.document).find((model) => model.id === id)!.intervals!.coverage_note!;
      expect(note).toContain(`${Math.min(...others)}–${Math.max(...others)}%`);
      expect(note).toContain(`only ${Math.min(...correlation)}–${Math.max(...correlation)}%`);
      expect(note).toContain('20 and 30 horizons');
    }
  });

  it('says nothing without intervals (--no-intervals), for correlated stasis (near 95%) or for the independent models', async () => {
    const none = await runJoint(shellShape, { models: 'correlated-random-walk', intervals: false });
    expect(coverageWarnings(none)).toEqual([]);
    expect(modelsOf(none.document)[0].intervals).toBeNull();
    const stasis = await runJoint(shellShape, { models: 'correlated-stasis,independent-stasis,independent-directional-walks', threads: 1 });
    expect(coverageWarnings(stasis)).toEqual([]);
    for (const model of modelsOf(stasis.document)) expect(model.intervals!.coverage_note).toBeNull();
  });

  it('words it more strongly, naming the group, when the fitted step covariance is at the boundary', async () => {
    const run = await runJoint(collinear, { models: 'correlated-random-walk', threads: 1 });
    const [walk] = modelsOf(run.document);
    expect(walk.flags.some((flag) => flag.includes('Cholesky diagonal 2 at 0'))).toBe(true);
    const [warning] = coverageWarnings(run);
    expect(warning.message.startsWith('Testbed (length + width), correlated-random-walk:')).toBe(true);
    expect(warning.message).toContain('do not read it as 95%');
    expect(walk.intervals!.coverage_note).toContain('at the boundary');
  });

  it('prints the warning once on stderr after the table; the report\'s joint block shows the note', async () => {
    const run = await runCliHere(['joint', shellShape, '--models', 'correlated-random-walk,correlated-stasis', '--threads', '1'], root);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('Steps of shell length and shell width are correlated');
    expect(run.stderr.split('warning (interval-coverage)').length - 1).toBe(1);
    const quiet = await runCliHere(['joint', shellShape, '--models', 'correlated-random-walk', '--no-intervals'], root);
    expect(quiet.stderr).not.toContain('interval-coverage');
    const document = (await runJoint(shellShape, { models: 'correlated-random-walk', threads: 1 })).document;
    expect(jointBlock(document, () => '')).toContain('data-note="interval-coverage">Measured coverage: correlated-random-walk: nominal 95% intervals');
  });
});
