/**
 * Tolerated variations of one clean file (test/fixtures/malformed/tolerated,
 * written by make_corpus.py): UTF-8 BOM with CRLF, quoted fields, trailing
 * blank lines, surrounding spaces and upper-case names, shuffled rows,
 * semicolon and tab delimiters, a decimal comma with --decimal-comma, and
 * extra columns the tool does not read. Each must give the same fit as
 * clean.csv (common practice: a data reader's output must not depend on
 * the file's dialect) through the real CLI.
 *
 * The dialects are compared without intervals (`--no-intervals`): the whole
 * document — the data block as read, every estimate, logL, AICc and weight —
 * must be equal, and intervals are a function of the same lineage, so
 * computing them 17 more times added time, not checks (issue 22). The clean
 * file is still fitted once with the default intervals.
 */
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { corpus, type CliRun } from './cli.js';
import { runCliHere } from '../support/cli-in-process.js';
import { nonFiniteText } from './finite.js';

type Doc = { lineages: Array<Record<string, unknown> & { data: Record<string, unknown> }>; warnings: unknown[] };

/** The parts of a fit document that must not depend on the file's dialect (input line numbers may). */
function comparable(stdout: string): unknown {
  const document = JSON.parse(stdout) as Doc;
  return {
    lineages: document.lineages.map((lineage) => ({ ...lineage, data: { ...lineage.data, line: undefined } })),
    warnings: document.warnings,
  };
}

describe('tolerated dialects give the same fit as the clean file', () => {
  let clean: CliRun;
  // --no-trend-test in the clean reference and every dialect (issue 22): a dialect is a matter of
  // reading, and the verdict is a seeded function of the data and fits compared here; the clean
  // file's fit with intervals below keeps the trend test on (stderr empty, every number finite).
  beforeAll(async () => {
    clean = await runCliHere(['fit', 'clean.csv', '--json', '--no-intervals', '--no-trend-test'], corpus);
  });

  it('the clean file fits, with and without intervals', async () => {
    const withIntervals = await runCliHere(['fit', 'clean.csv', '--json'], corpus);
    for (const run of [clean, withIntervals]) {
      expect(run.status).toBe(0);
      expect(run.stderr).toBe('');
      expect(run.stdout).not.toMatch(nonFiniteText);
    }
  });

  it.each([
    ['bom-crlf.csv', []],
    ['quoted-fields.csv', []],
    ['trailing-blank-lines.csv', []],
    ['surrounding-spaces.csv', []],
    ['shuffled-rows.csv', []],
    ['semicolon.csv', []],
    ['tab.csv', []],
    ['decimal-comma.csv', ['--decimal-comma']],
    ['decimal-comma.csv', ['--decimal-comma', '--delimiter', ';']],
    ['tab.csv', ['--delimiter', 'tab']],
    ['extra-columns.csv', []],
    ...['core', 'site', 'hole', 'borehole', 'locality', 'outcrop'].map((name): [string, string[]] => [`section-named-${name}.csv`, []]),
  ])('%s %s', async (file, args) => {
    const run = await runCliHere(['fit', join('tolerated', file), '--json', '--no-intervals', '--no-trend-test', ...args], corpus);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(comparable(run.stdout)).toEqual(comparable(clean.stdout));
  });
});
