/**
 * Output safety: atomic writes, refusals to overwrite inputs or files the
 * tool did not write, the input never modified, and byte-identical outputs
 * for the same input and options (determinism across separate runs).
 */
import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { ownFilesList, prepareOutputFolder, writeAtomically } from '../../src/io/write-output.js';
import { corpus } from './cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const sha = (path: string): string => createHash('sha256').update(readFileSync(path)).digest('hex');

function freshFolder(): string {
  return mkdtempSync(join(tmpdir(), 'stratotrend-output-'));
}

describe('writeAtomically', () => {
  it('writes the contents and leaves no temporary file', async () => {
    const folder = freshFolder();
    writeAtomically(join(folder, 'a.txt'), 'first\n');
    writeAtomically(join(folder, 'a.txt'), 'second\n');
    expect(readFileSync(join(folder, 'a.txt'), 'utf8')).toBe('second\n');
    expect(readdirSync(folder)).toEqual(['a.txt']);
  });

  it('a failed write is an InputError naming the path, and leaves the old file and no temporary file', async () => {
    const folder = freshFolder();
    mkdirSync(join(folder, 'taken'));
    writeFileSync(join(folder, 'taken', 'keep.txt'), 'keep');
    expect(() => writeAtomically(join(folder, 'taken'), 'x')).toThrow(InputError);
    expect(() => writeAtomically(join(folder, 'taken'), 'x')).toThrow(/cannot write ".*taken": a folder of that name exists; nothing was changed there/);
    expect(readFileSync(join(folder, 'taken', 'keep.txt'), 'utf8')).toBe('keep');
    expect(readdirSync(folder)).toEqual(['taken']);
    expect(() => writeAtomically(join(folder, 'missing', 'a.txt'), 'x')).toThrow(/its folder does not exist/);
  });
});

describe('prepareOutputFolder', () => {
  it('creates the folder, records the names it will write, and reuses it for those names', async () => {
    const folder = join(freshFolder(), 'out');
    prepareOutputFolder(folder, [], ['fit.json', 'models.csv']);
    expect(readFileSync(join(folder, ownFilesList), 'utf8')).toBe('# files written here by stratotrend; it overwrites only these\nfit.json\nmodels.csv\n');
    writeFileSync(join(folder, 'fit.json'), '{}');
    expect(() => prepareOutputFolder(folder, [], ['fit.json', 'models.csv'])).not.toThrow();
  });

  it('refuses to overwrite a file it did not write, and touches nothing else', async () => {
    const folder = freshFolder();
    writeFileSync(join(folder, 'models.csv'), 'my own table');
    writeFileSync(join(folder, 'notes.txt'), 'notes');
    expect(() => prepareOutputFolder(folder, [], ['models.csv', 'fit.json'])).toThrow(
      `output folder "${folder}" already has "models.csv", which stratotrend did not write; choose another --out folder or move that file away`,
    );
    expect(readFileSync(join(folder, 'models.csv'), 'utf8')).toBe('my own table');
    expect(readdirSync(folder).sort()).toEqual(['models.csv', 'notes.txt']);
    // A folder with foreign files but none of the tool's names is used (the foreign files stay).
    expect(() => prepareOutputFolder(folder, [], ['fit.json'])).not.toThrow();
    expect(readFileSync(join(folder, 'notes.txt'), 'utf8')).toBe('notes');
  });

  it.runIf(existsSync('/proc/self'))('fails with a message, not a hang, where a folder cannot be made (/proc)', () => {
    // Node 20's recursive mkdirSync spins forever here; the folder is made one level at a time instead.
    expect(() => prepareOutputFolder('/proc/stratotrend-nope/out', [], ['fit.json'])).toThrow(
      'cannot create the output folder "/proc/stratotrend-nope/out": a folder above it cannot be made here',
    );
  });

  it('refuses an output file that is an input, and an input file as the folder', async () => {
    const folder = freshFolder();
    const input = join(folder, 'models.csv');
    writeFileSync(input, 'age,n,mean,sd\n');
    expect(() => prepareOutputFolder(folder, [input], ['models.csv'])).toThrow(/it is an input file; choose another --out folder/);
    expect(() => prepareOutputFolder(input, [input], ['models.csv'])).toThrow(/is an input file/);
    expect(readFileSync(input, 'utf8')).toBe('age,n,mean,sd\n');
  });
});

describe('fit through the real CLI', () => {
  it('writes byte-identical fit.json and models.csv on separate runs, and never modifies the input', async () => {
    const folder = freshFolder();
    copyFileSync(join(corpus, 'clean.csv'), join(folder, 'clean.csv'));
    const before = sha(join(folder, 'clean.csv'));
    const first = await runCliHere(['fit', 'clean.csv', '--out', 'first', '--quiet'], folder);
    const second = await runCliHere(['fit', 'clean.csv', '--out', 'second', '--quiet'], folder);
    const again = await runCliHere(['fit', 'clean.csv', '--out', 'first', '--quiet'], folder);
    for (const run of [first, second, again]) expect(run.status).toBe(0);
    for (const name of ['fit.json', 'models.csv']) {
      expect(existsSync(join(folder, 'first', name))).toBe(true);
      expect(readFileSync(join(folder, 'second', name))).toEqual(readFileSync(join(folder, 'first', name)));
    }
    expect(sha(join(folder, 'clean.csv'))).toBe(before);
    expect(readdirSync(join(folder, 'first')).filter((name) => name.endsWith('.tmp'))).toEqual([]);
  });

  it('refuses --out that would overwrite the input file (exit 2), leaving it unchanged', async () => {
    const folder = freshFolder();
    copyFileSync(join(corpus, 'clean.csv'), join(folder, 'models.csv'));
    const before = sha(join(folder, 'models.csv'));
    const run = await runCliHere(['fit', 'models.csv', '--out', '.'], folder);
    expect(run.status).toBe(2);
    expect(run.stderr).toBe('stratotrend: refusing to write "models.csv": it is an input file; choose another --out folder\n');
    expect(sha(join(folder, 'models.csv'))).toBe(before);
  });

  it('refuses a folder holding a file of the same name that it did not write (exit 2)', async () => {
    const folder = freshFolder();
    copyFileSync(join(corpus, 'clean.csv'), join(folder, 'clean.csv'));
    mkdirSync(join(folder, 'results'));
    writeFileSync(join(folder, 'results', 'fit.json'), 'precious');
    const run = await runCliHere(['fit', 'clean.csv', '--out', 'results'], folder);
    expect(run.status).toBe(2);
    expect(run.stderr).toBe('stratotrend: output folder "results" already has "fit.json", which stratotrend did not write; choose another --out folder or move that file away\n');
    expect(readFileSync(join(folder, 'results', 'fit.json'), 'utf8')).toBe('precious');
  });

  it('never overwrites the age model or covariate file, even in a folder it wrote before (exit 2)', async () => {
    // The folder was written by stratotrend (models.csv and fit.json are its own names there), then the
    // user put an input under one of those names: the input wins, whichever command would write it.
    // (That first run draws no figures: none of the names below is a figure's.)
    const folder = freshFolder();
    const samples = join(process.cwd(), 'sample-data');
    // --no-trend-test: this run only makes the folder; its contents are not compared (issue 22).
    expect((await runCliHere(['fit', join(samples, 'locality-heights.csv'), '--age-model', join(samples, 'locality-ties.csv'), '--out', 'results', '--no-intervals', '--no-figures', '--no-trend-test', '--quiet'], folder)).status).toBe(0);
    const cases: Array<[string, string, string[]]> = [
      ['models.csv', 'locality-ties.csv', ['fit', join(samples, 'locality-heights.csv'), '--age-model', 'results/models.csv', '--out', 'results']],
      ['fit.json', 'pulsed-width-proxy.csv', ['fit', join(samples, 'pulsed-width.csv'), '--models', 'extended', '--covariate-file', 'results/fit.json', '--out', 'results']],
      ['models.html', 'pulsed-width-proxy.csv', ['report', join(samples, 'pulsed-width.csv'), '--covariate-file', 'results/models.html', '--out', 'results/models.html']],
    ];
    for (const [name, source, args] of cases) {
      copyFileSync(join(samples, source), join(folder, 'results', name));
      const before = sha(join(folder, 'results', name));
      const run = await runCliHere([...args, '--no-intervals', '--quiet'], folder);
      expect(run.stderr, args.join(' ')).toMatch(new RegExp(`^stratotrend: refusing to write "results/${name.replace('.', '\\.')}": it is an input file`));
      expect(run.status).toBe(2);
      expect(sha(join(folder, 'results', name))).toBe(before);
    }
  });

  it('JSON on stdout is byte-identical across runs', async () => {
    const first = await runCliHere(['fit', 'clean.csv', '--json'], corpus);
    const second = await runCliHere(['fit', 'clean.csv', '--json'], corpus);
    expect(first.status).toBe(0);
    expect(second.stdout).toBe(first.stdout);
  });
});
