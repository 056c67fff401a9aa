/**
 * Output safety, issue 24: temporary files created exclusively (never through
 * a link planted at their name), the report protected like every other output
 * name, a set of outputs put in place only once every file was written (a full
 * disk is simulated by an injected file system), stale temporary files removed
 * and one run at a time per output folder (a lock naming the other run).
 *
 * Expected behaviour is from POSIX open(2) (O_CREAT | O_EXCL fails with EEXIST
 * on an existing name, a symbolic link included, without following it) and
 * the requirements; nothing here is a computed number.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  lockFileName,
  nodeFileSystem,
  ownFilesList,
  OutputSet,
  prepareOutputFolder,
  releaseOutputFolder,
  releaseOutputLocks,
  removeStaleTemporaryFiles,
  writeAtomically,
  type OutputFileSystem,
} from '../../src/io/write-output.js';
import { corpus, runCli } from './cli.js';
import { runCliHere } from '../support/cli-in-process.js';

function freshFolder(): string {
  return mkdtempSync(join(tmpdir(), 'stratotrend-sets-'));
}

/** A process id that is certainly not running: a child that has already ended. */
function endedPid(): number {
  const child = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(child.stdout);
}

/** The real file system, but the disk is full once `capacity` bytes have been written. */
function fullDisk(capacity: number): OutputFileSystem {
  let used = 0;
  return {
    ...nodeFileSystem,
    write(descriptor, bytes, offset, length) {
      if (used + length > capacity) throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
      used += length;
      return nodeFileSystem.write(descriptor, bytes, offset, length);
    },
  };
}

const temporaryFiles = (folder: string): string[] => readdirSync(folder).filter((name) => name.endsWith('.tmp'));

describe('temporary files are created exclusively', () => {
  it('a symbolic link planted at the temporary name is neither followed nor overwritten (POSIX O_EXCL)', () => {
    const folder = freshFolder();
    const victim = join(folder, 'victim.csv');
    writeFileSync(victim, 'precious input\n');
    const planted: string[] = [];
    // Plant a link at the very name the writer is about to create, as an attacker racing it would.
    const racing: OutputFileSystem = {
      ...nodeFileSystem,
      createExclusive(path) {
        if (planted.length === 0) {
          symlinkSync(victim, path);
          planted.push(path);
        }
        return nodeFileSystem.createExclusive(path);
      },
    };
    writeAtomically(join(folder, 'models.csv'), 'new table\n', racing);
    expect(readFileSync(victim, 'utf8')).toBe('precious input\n');
    expect(readFileSync(join(folder, 'models.csv'), 'utf8')).toBe('new table\n');
    // The planted link is left as it was (it is not ours to remove), no temporary file of ours remains.
    expect(readdirSync(folder).filter((name) => name.endsWith('.tmp'))).toEqual(planted.map((path) => path.slice(folder.length + 1)));
  });

  it('createExclusive refuses an existing link with EEXIST (POSIX open(2), O_CREAT | O_EXCL)', () => {
    const folder = freshFolder();
    writeFileSync(join(folder, 'target'), 'keep');
    symlinkSync(join(folder, 'target'), join(folder, 'link'));
    symlinkSync(join(folder, 'nowhere'), join(folder, 'dangling'));
    expect(() => nodeFileSystem.createExclusive(join(folder, 'link'))).toThrow(expect.objectContaining({ code: 'EEXIST' }));
    expect(() => nodeFileSystem.createExclusive(join(folder, 'dangling'))).toThrow(expect.objectContaining({ code: 'EEXIST' }));
    expect(readFileSync(join(folder, 'target'), 'utf8')).toBe('keep');
    expect(existsSync(join(folder, 'nowhere'))).toBe(false);
  });
});

describe('a set of outputs is put in place together', () => {
  function previousRun(folder: string): void {
    for (const name of ['models.csv', 'fit.json', 'a.trajectory.png']) writeFileSync(join(folder, name), `old ${name}\n`);
  }

  it('a full disk midway leaves every file of the previous run, no temporary file, and says so', () => {
    const folder = freshFolder();
    previousRun(folder);
    // models.csv (10 bytes) fits, fit.json does not.
    const set = new OutputSet(folder, 'out', fullDisk(15));
    set.add('models.csv', 'new table\n');
    expect(() => set.add('fit.json', '{"new": "document"}\n')).toThrow(
      'cannot write "out/fit.json": no space left on the device; nothing was changed in "out" (the files of this run were not put in place)',
    );
    for (const name of ['models.csv', 'fit.json', 'a.trajectory.png']) expect(readFileSync(join(folder, name), 'utf8')).toBe(`old ${name}\n`);
    expect(temporaryFiles(folder)).toEqual([]);
  });

  it('every file written: commit puts all of them in place', () => {
    const folder = freshFolder();
    previousRun(folder);
    const set = new OutputSet(folder, 'out');
    set.add('models.csv', 'new table\n');
    set.add('fit.json', '{}\n');
    expect(readFileSync(join(folder, 'models.csv'), 'utf8')).toBe('old models.csv\n');
    expect(set.commit()).toEqual(['models.csv', 'fit.json']);
    expect(readFileSync(join(folder, 'models.csv'), 'utf8')).toBe('new table\n');
    expect(readFileSync(join(folder, 'fit.json'), 'utf8')).toBe('{}\n');
    expect(readFileSync(join(folder, 'a.trajectory.png'), 'utf8')).toBe('old a.trajectory.png\n');
    expect(temporaryFiles(folder)).toEqual([]);
  });

  it('a rename refused midway names exactly the new files and the others', () => {
    const folder = freshFolder();
    previousRun(folder);
    let renames = 0;
    const refusing: OutputFileSystem = {
      ...nodeFileSystem,
      rename(from, to) {
        renames += 1;
        if (renames === 2) throw Object.assign(new Error('EACCES'), { code: 'EACCES' });
        nodeFileSystem.rename(from, to);
      },
    };
    const set = new OutputSet(folder, 'out', refusing);
    for (const name of ['models.csv', 'fit.json', 'a.trajectory.png']) set.add(name, `new ${name}\n`);
    expect(() => set.commit()).toThrow(
      'cannot put "out/fit.json" in place: permission denied; in "out" these files are new from this run: models.csv; these are not (previous run\'s or absent): fit.json, a.trajectory.png',
    );
    expect(readFileSync(join(folder, 'models.csv'), 'utf8')).toBe('new models.csv\n');
    expect(readFileSync(join(folder, 'fit.json'), 'utf8')).toBe('old fit.json\n');
    expect(temporaryFiles(folder)).toEqual([]);
  });
});

describe('stale temporary files and the folder lock', () => {
  it('removes temporary files of runs that ended, for its own names only; keeps those of running processes and other files', () => {
    const folder = freshFolder();
    const gone = endedPid();
    writeFileSync(join(folder, ownFilesList), '# list\nfit.json\nmodels.csv\nx.csv\n');
    writeFileSync(join(folder, `.fit.json.${gone}-0a1b2c3d4e5f.tmp`), 'half');
    writeFileSync(join(folder, `.models.csv.${gone}.tmp`), 'half');
    writeFileSync(join(folder, `.${ownFilesList}.${gone}-0a1b2c3d4e5f.tmp`), 'half');
    symlinkSync(join(folder, 'keep.txt'), join(folder, `.x.csv.${gone}.tmp`));
    writeFileSync(join(folder, 'keep.txt'), 'keep');
    // A user's file that merely looks like a temporary name (not one of the tool's names) stays.
    writeFileSync(join(folder, `.notes.${gone}.tmp`), 'mine');
    writeFileSync(join(folder, `.fit.json.${process.ppid}-0a1b2c3d4e5f.tmp`), 'in use');
    expect(removeStaleTemporaryFiles(folder).sort()).toEqual(
      [`.fit.json.${gone}-0a1b2c3d4e5f.tmp`, `.models.csv.${gone}.tmp`, `.${ownFilesList}.${gone}-0a1b2c3d4e5f.tmp`, `.x.csv.${gone}.tmp`].sort(),
    );
    expect(readdirSync(folder).sort()).toEqual([`.fit.json.${process.ppid}-0a1b2c3d4e5f.tmp`, `.notes.${gone}.tmp`, ownFilesList, 'keep.txt'].sort());
    expect(readFileSync(join(folder, 'keep.txt'), 'utf8')).toBe('keep');
  });

  it('prepareOutputFolder takes the lock; a lock of a running process is refused naming it', () => {
    const folder = freshFolder();
    prepareOutputFolder(folder, [], ['fit.json']);
    expect(readFileSync(join(folder, lockFileName), 'utf8')).toMatch(new RegExp(`^pid ${process.pid}\\n`));
    // Re-entrant within one process (fit --out o --report o/report.html).
    expect(() => prepareOutputFolder(folder, [], ['report.html'])).not.toThrow();
    releaseOutputFolder(folder);
    expect(existsSync(join(folder, lockFileName))).toBe(false);
    // Commands give up every lock they took when they end (releaseOutputLocks), so one process can run several.
    prepareOutputFolder(folder, [], ['fit.json']);
    prepareOutputFolder(join(folder, 'second'), [], ['fit.json']);
    releaseOutputLocks();
    expect(existsSync(join(folder, lockFileName))).toBe(false);
    expect(existsSync(join(folder, 'second', lockFileName))).toBe(false);
  });

  it('fit refuses a folder another running stratotrend holds (exit 2, naming it) and takes over a stale lock', () => {
    const folder = freshFolder();
    mkdirSync(join(folder, 'out'));
    // The vitest process stands for the other run: it is certainly running (so this run must be a child process, runCli).
    writeFileSync(join(folder, 'out', lockFileName), `pid ${process.pid}\nstarted 2026-01-02T03:04:05.000Z\ncommand stratotrend fit other.csv --out out\n`);
    const refused = runCli(['fit', join(corpus, 'clean.csv'), '--out', 'out', '--no-intervals', '--quiet'], folder);
    expect(refused.status).toBe(2);
    expect(refused.stderr).toBe(
      `stratotrend: output folder "out" is in use by another stratotrend run (process ${process.pid}, started 2026-01-02T03:04:05.000Z: stratotrend fit other.csv --out out); wait for it to finish or choose another folder (if that run is gone, delete out/${lockFileName})\n`,
    );
    expect(existsSync(join(folder, 'out', 'fit.json'))).toBe(false);

    const gone = endedPid();
    writeFileSync(join(folder, 'out', lockFileName), `pid ${gone}\nstarted 2026-01-02T03:04:05.000Z\n`);
    writeFileSync(join(folder, 'out', ownFilesList), '# list\nfit.json\nmodels.csv\n');
    writeFileSync(join(folder, 'out', `.fit.json.${gone}-00ff00ff00ff.tmp`), 'interrupted');
    // --no-trend-test: the checks read the lock, the exit and the files written, not the verdict (issue 22).
    const run = runCli(['fit', join(corpus, 'clean.csv'), '--out', 'out', '--no-intervals', '--no-figures', '--no-trend-test', '--quiet'], folder);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(readdirSync(join(folder, 'out')).sort()).toEqual(['.stratotrend-files', 'fit.json', 'models.csv']);
  });
});

describe('the report is protected like every other output name', () => {
  it('fit --out o --report o/report.html refuses a report.html stratotrend did not write, before fitting (exit 2)', async () => {
    const folder = freshFolder();
    copyFileSync(join(corpus, 'clean.csv'), join(folder, 'clean.csv'));
    mkdirSync(join(folder, 'o'));
    writeFileSync(join(folder, 'o', 'report.html'), '<p>my own notes</p>\n');
    const run = await runCliHere(['fit', 'clean.csv', '--out', 'o', '--report', 'o/report.html', '--no-intervals', '--no-figures'], folder);
    expect(run.status).toBe(2);
    expect(run.stderr).toBe('stratotrend: output folder "o" already has "report.html", which stratotrend did not write; choose another --report file or move that file away\n');
    expect(readFileSync(join(folder, 'o', 'report.html'), 'utf8')).toBe('<p>my own notes</p>\n');
    expect(existsSync(join(folder, 'o', 'fit.json'))).toBe(false);
  });

  it('report --out refuses a foreign file, and rewrites its own report on a re-run', async () => {
    const folder = freshFolder();
    copyFileSync(join(corpus, 'clean.csv'), join(folder, 'clean.csv'));
    writeFileSync(join(folder, 'mine.html'), 'mine\n');
    const refused = await runCliHere(['report', 'clean.csv', '--out', 'mine.html', '--no-intervals'], folder);
    expect(refused.status).toBe(2);
    expect(refused.stderr).toBe('stratotrend: output folder "." already has "mine.html", which stratotrend did not write; choose another --out file or move that file away\n');
    expect(readFileSync(join(folder, 'mine.html'), 'utf8')).toBe('mine\n');
    // --no-trend-test: the checks read the exit, stderr and that a page is written, not the verdict (issue 22).
    for (let run = 0; run < 2; run++) {
      const written = await runCliHere(['report', 'clean.csv', '--out', 'ours.html', '--no-intervals', '--no-trend-test', '--quiet'], folder);
      expect(written.stderr).toBe('');
      expect(written.status).toBe(0);
    }
    expect(readFileSync(join(folder, 'ours.html'), 'utf8')).toMatch(/^<!DOCTYPE html>/i);
  });
});
