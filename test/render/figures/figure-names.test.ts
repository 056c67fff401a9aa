/**
 * One naming rule for figure files across fit, redraw and compare
 * (`figureJobs`): names that coincide after cleaning are numbered in
 * document order on the lineage's (or trait's) name, and a redraw of some
 * lineages keeps the names fit gave, so it never overwrites another
 * lineage's figure.
 */
import { mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { figureJobs } from '../../../src/render/figures/figure-set.js';
import { runCliHere } from '../../support/cli-in-process.js';

const root = resolve(import.meta.dirname, '../../..');

describe('figure file names', () => {
  const documents = [
    { section: 'A/B', trait: 'x' },
    { section: 'A-B', trait: 'x' },
    { section: 'C', trait: 'y/z' },
    { section: 'D', trait: 'y-z' },
    { section: 'E', trait: 'y-z' },
  ];

  it('numbers the second of two names that coincide after cleaning, on the lineage name, in document order', () => {
    const stems = figureJobs(documents).map((job) => `${job.kind} ${job.stem}`);
    expect(stems).toEqual([
      'trajectory a-b_x.trajectory',
      'model-support a-b_x.model-support',
      'trajectory a-b_x-2.trajectory',
      'model-support a-b_x-2.model-support',
      'trajectory c_y-z.trajectory',
      'model-support c_y-z.model-support',
      'trajectory d_y-z.trajectory',
      'model-support d_y-z.model-support',
      'trajectory e_y-z.trajectory',
      'model-support e_y-z.model-support',
      // Trait "x" has two sections; "y/z" one; "y-z" two, numbered after "y/z" took "y-z".
      'sections x.sections',
      'sections y-z-2.sections',
    ]);
  });

  it('a subset (by lineage or by kind) keeps the names of the whole set', () => {
    const whole = new Map(figureJobs(documents).map((job) => [`${job.kind} ${job.lineages.join(',')}`, job.stem]));
    const subset = figureJobs(documents, ['trajectory', 'sections'], (index) => index === 1 || index >= 3);
    expect(subset.map((job) => job.stem)).toEqual(['a-b_x-2.trajectory', 'd_y-z.trajectory', 'e_y-z.trajectory', 'y-z-2.sections']);
    for (const job of subset.filter((job) => job.kind === 'trajectory')) expect(job.stem).toBe(whole.get(`trajectory ${job.lineages[0]}`));
    // A sections figure left with one selected section is not drawn.
    expect(figureJobs(documents, ['sections'], (index) => index !== 0).map((job) => job.stem)).toEqual(['y-z-2.sections']);
  });

  it('redraw --lineage "A-B" rewrites the file fit gave A-B and leaves A/B\'s file alone', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-names-'));
    const samples = join(folder, 'samples.csv');
    // Invented numbers: two sections of one trait whose names clean to the same file name.
    const rows = ['section,trait,age,n,mean,sd'];
    ['A/B', 'A-B'].forEach((section, s) => {
      for (let i = 0; i < 8; i++) rows.push(`${section},x,${(10 - 0.5 * i).toFixed(1)},10,${(4 + 0.1 * i + 0.05 * s * (i % 3)).toFixed(3)},0.4`);
    });
    writeFileSync(samples, rows.join('\n') + '\n');
    const out = join(folder, 'out');
    // --no-trend-test: the checks read figure names and sizes; no figure draws the verdict (issue 22).
    const fitted = await runCliHere(['fit', samples, '--models', 'random-walk,stasis', '--no-intervals', '--no-trend-test', '--out', out, '--figure-format', 'svg'], root);
    expect(fitted.status, fitted.stderr).toBe(0);
    const files = readdirSync(out).filter((file) => file.endsWith('.svg')).sort();
    expect(files).toEqual(['a-b_x-2.model-support.svg', 'a-b_x-2.trajectory.svg', 'a-b_x.model-support.svg', 'a-b_x.trajectory.svg', 'x.sections.svg']);
    const before = readFileSync(join(out, 'a-b_x.trajectory.svg'), 'utf8');
    const redrawn = await runCliHere(['redraw', join(out, 'fit.json'), '--lineage', 'A-B', '--only', 'trajectory', '--figure-format', 'svg', '--figure-width', '12cm'], root);
    expect(redrawn.status, redrawn.stderr).toBe(0);
    const printed = redrawn.stdout;
    expect(printed.trim()).toBe(join(out, 'a-b_x-2.trajectory.svg'));
    expect(readFileSync(join(out, 'a-b_x.trajectory.svg'), 'utf8')).toBe(before);
    // Redrawn at 12 cm: 12 / 2.54 × 72 = 340 pt wide (the definition of the point).
    expect(readFileSync(join(out, 'a-b_x-2.trajectory.svg'), 'utf8')).toMatch(/<svg[^>]* width="340pt"/);
    expect(before).toMatch(/<svg[^>]* width="255pt"/);
  });
});
