import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { corpus, root, runCli } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

// The in-process runner (test/support/cli-in-process.ts) stands in for a child
// `node bin/stratotrend` in most CLI tests, so it must report what a child
// reports: the reference here is the child process itself, byte for byte.
describe('runCliHere reports what a child process reports', () => {
  const lines: Array<[string, string[], string]> = [
    // Two models (issue 22): the trend verdict still runs on worker threads in both, at a fraction of the five models' simulations.
    ['a fit printed as JSON (exit 0)', ['fit', join(root, 'sample-data', 'shell-length.csv'), '--no-intervals', '--models', 'random-walk,directional-walk', '--json'], root],
    ['a data error (exit 1, one line on stderr)', ['fit', 'negative-sd.csv'], corpus],
    ['a usage error from commander (exit 2)', ['fit', 'clean.csv', '--no-such-option'], corpus],
    ['--help (exit 0, help on stdout)', ['compare', '--help'], corpus],
  ];
  it.each(lines)('%s', async (_, args, cwd) => {
    const child = runCli(args, cwd);
    const here = await runCliHere(args, cwd);
    expect(here).toEqual(child);
  });

  it('restores the working folder, process.argv and the exit code, and refuses two runs at once', async () => {
    const before = { cwd: process.cwd(), argv: process.argv, exitCode: process.exitCode };
    // --no-trend-test: the check reads what the run restores, not the verdict (issue 22).
    const first = runCliHere(['fit', 'clean.csv', '--no-intervals', '--no-trend-test', '--quiet'], corpus);
    await expect(runCliHere(['--version'], corpus)).rejects.toThrow('one command line at a time');
    expect((await first).status).toBe(0);
    expect({ cwd: process.cwd(), argv: process.argv, exitCode: process.exitCode }).toEqual(before);
  });
});
