/**
 * Every command that reads a samples file gives the same one-line message
 * and exit code as `fit` for malformed files (they share one reader), through
 * the real command line. A representative subset of the corpus keeps this
 * quick; test/robustness/malformed.test.ts holds the full table for `fit`.
 */
import { describe, expect, it } from 'vitest';
import { corpus } from './cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const files: Array<[string, number, string]> = [
  ['empty.csv', 1, 'empty.csv: the file is empty, expected a header line and data rows'],
  ['binary.csv', 1, 'binary.csv: looks like a binary file (contains NUL bytes), expected comma-separated text'],
  ['ragged-short.csv', 1, 'ragged-short.csv line 5: has 5 fields but the header has 6 (ragged row), got "Korrin Gap,rib count,8.60,14,15.10"'],
  ['negative-sd.csv', 1, 'negative-sd.csv line 7, column "sd": must be zero or positive, got "-0.4"'],
  ['n-one-without-pool.csv', 1, 'n-one-without-pool.csv line 8, column "n": n = 1 gives no within-horizon variance; use --pool to pool variances over the lineage'],
  ['ambiguous-delimiter.csv', 2, 'ambiguous-delimiter.csv line 1: cannot tell the delimiter from the header: it has as many commas as semicolons; give --delimiter "," or --delimiter ";"'],
];

const commands: string[][] = [
  ['compare'],
  ['report', '--out', 'never-written.html'],
  ['power'],
  ['simulate'],
  ['bootstrap'],
];

describe('every samples-reading command refuses malformed files like fit', () => {
  for (const command of commands) {
    it.each(files)(`${command[0]} %s`, async (file, exitCode, message) => {
      const run = await runCliHere([command[0], file, ...command.slice(1)], corpus);
      expect(run.stderr).toBe(`stratotrend: ${message}\n`);
      expect(run.status).toBe(exitCode);
    });
  }
});
