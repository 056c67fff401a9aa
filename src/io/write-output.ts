import { randomBytes } from 'node:crypto';
import { closeSync, constants, existsSync, fsyncSync, lstatSync, mkdirSync, openSync, readdirSync, readFileSync, realpathSync, renameSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { InputError } from '../data/errors.js';

/**
 * The file-system calls an output write makes, so tests can put a failing
 * disk in their place (a full disk after so many bytes, a rename refused).
 * Each call behaves like its `node:fs` namesake.
 */
export interface OutputFileSystem {
  /** Create `path` exclusively for writing (fail if any file or link has that name); returns a descriptor. */
  createExclusive(path: string): number;
  write(descriptor: number, bytes: Uint8Array, offset: number, length: number): number;
  fsync(descriptor: number): void;
  close(descriptor: number): void;
  rename(from: string, to: string): void;
  unlink(path: string): void;
}

/** O_NOFOLLOW where the platform has it (POSIX); O_EXCL alone already refuses an existing link. */
const noFollow = (constants as Record<string, number | undefined>).O_NOFOLLOW ?? 0;

/** The real file system. */
export const nodeFileSystem: OutputFileSystem = {
  createExclusive: (path) => openSync(path, constants.O_WRONLY | constants.O_CREAT | constants.O_EXCL | noFollow, 0o666),
  write: (descriptor, bytes, offset, length) => writeSync(descriptor, bytes, offset, length),
  fsync: (descriptor) => fsyncSync(descriptor),
  close: (descriptor) => closeSync(descriptor),
  rename: (from, to) => renameSync(from, to),
  unlink: (path) => unlinkSync(path),
};

/**
 * Temporary files are named `.<target>.<pid>-<random>.tmp`: the process id
 * lets a later run tell a stale file (its process is gone) from one in use.
 */
const temporaryPattern = /^\.(.+)\.(\d+)(-[0-9a-f]{12})?\.tmp$/;

/**
 * Write `contents` into a new temporary file beside `path`, flushed to disk.
 * The temporary file is created exclusively: a file or a symbolic link
 * already at that name is never opened, followed or overwritten (a fresh
 * random name is tried instead).
 *
 * @returns the temporary file's path
 * @throws the file-system error; no temporary file is left behind
 */
function stageFile(path: string, contents: string | Uint8Array, fileSystem: OutputFileSystem): string {
  const bytes = typeof contents === 'string' ? Buffer.from(contents, 'utf8') : contents;
  for (let attempt = 0; ; attempt++) {
    const temporary = join(dirname(path), `.${basename(path)}.${process.pid}-${randomBytes(6).toString('hex')}.tmp`);
    let descriptor: number;
    try {
      descriptor = fileSystem.createExclusive(temporary);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code === 'EEXIST' && attempt < 8) continue;
      throw error;
    }
    try {
      let written = 0;
      while (written < bytes.length) written += fileSystem.write(descriptor, bytes, written, bytes.length - written);
      fileSystem.fsync(descriptor);
    } catch (error) {
      try { fileSystem.close(descriptor); } catch { /* already failing */ }
      try { fileSystem.unlink(temporary); } catch { /* already gone */ }
      throw error;
    }
    try {
      fileSystem.close(descriptor);
    } catch (error) {
      try { fileSystem.unlink(temporary); } catch { /* already gone */ }
      throw error;
    }
    return temporary;
  }
}

/**
 * Write a file atomically: into a temporary file created exclusively beside
 * it (never through a link planted there), flushed to disk, then renamed over
 * the target, so a reader never sees half a file and a crash or a full disk
 * never leaves one (the temporary file is removed on failure and the old
 * file, if any, is untouched).
 *
 * @param fileSystem - the calls to make (tests inject a failing disk)
 * @throws InputError naming the path when the file cannot be written.
 *
 * @example
 * // An in-memory disk (the calls of OutputFileSystem), so nothing is written here.
 * const files = new Map();
 * const open = new Map();
 * const disk = {
 *   createExclusive: (path) => { open.set(open.size + 3, path); files.set(path, ''); return open.size + 2; },
 *   write: (descriptor, bytes, offset, length) => { const path = open.get(descriptor); files.set(path, files.get(path) + Buffer.from(bytes.subarray(offset, offset + length)).toString()); return length; },
 *   fsync: () => {}, close: () => {},
 *   rename: (from, to) => { files.set(to, files.get(from)); files.delete(from); },
 *   unlink: (path) => { files.delete(path); },
 * };
 * writeAtomically('out/fit.json', '{}', disk);
 * [...files]; // [['out/fit.json', '{}']] (the temporary file renamed over the target)
 * const full = { ...disk, write: () => { throw Object.assign(new Error('full'), { code: 'ENOSPC' }); } };
 * writeAtomically('out/models.csv', 'x', full);
 * // throws: cannot write "out/models.csv": no space left on the device; nothing was changed there
 */
export function writeAtomically(path: string, contents: string | Uint8Array, fileSystem: OutputFileSystem = nodeFileSystem): void {
  let temporary: string | null = null;
  try {
    temporary = stageFile(path, contents, fileSystem);
    fileSystem.rename(temporary, path);
  } catch (error) {
    if (temporary !== null) {
      try { fileSystem.unlink(temporary); } catch { /* already gone */ }
    }
    throw writeError(path, error);
  }
}

/**
 * A set of output files put in place together: each `add` writes a
 * temporary file in the folder, and `commit` renames them all over their
 * targets only once every one was written. A failure while writing (a full
 * disk) removes this run's temporary files and leaves every file of the
 * previous run as it was; a failure while renaming (rare: renames within one
 * folder need no space) says exactly which files are new and which are still
 * the previous run's.
 *
 * @example
 * // mkdtempSync, readdirSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * const set = new OutputSet(folder);
 * set.add('fit.json', '{}');
 * set.add('models.csv', 'section,trait\n');
 * readdirSync(folder).filter((name) => !name.endsWith('.tmp')); // [] (nothing in place before commit)
 * set.commit(); // ['fit.json', 'models.csv']
 * readdirSync(folder).sort(); // ['fit.json', 'models.csv']
 * rmSync(folder, { recursive: true });
 */
export class OutputSet {
  private readonly staged: { name: string; temporary: string }[] = [];

  /**
   * @param folder - the output folder (already prepared with {@link prepareOutputFolder})
   * @param label - the folder as the user wrote it, for messages
   * @param fileSystem - the calls to make (tests inject a failing disk)
   */
  constructor(readonly folder: string, readonly label: string = folder, private readonly fileSystem: OutputFileSystem = nodeFileSystem) {}

  /** The names added so far, in order. */
  get names(): string[] {
    return this.staged.map((entry) => entry.name);
  }

  /**
   * Write one file of the set (not yet in place).
   *
   * @throws InputError naming the file when it cannot be written; the whole set is then abandoned
   */
  add(name: string, contents: string | Uint8Array): void {
    const path = join(this.folder, name);
    try {
      this.staged.push({ name, temporary: stageFile(path, contents, this.fileSystem) });
    } catch (error) {
      this.abandon();
      throw new InputError(`cannot write "${join(this.label, name)}": ${failureReason(error)}; nothing was changed in "${this.label}" (the files of this run were not put in place)`);
    }
  }

  /** Remove the temporary files written so far; nothing is put in place. */
  abandon(): void {
    for (const { temporary } of this.staged.splice(0)) {
      try { this.fileSystem.unlink(temporary); } catch { /* already gone */ }
    }
  }

  /**
   * Rename every written file over its target, in the order added.
   *
   * @returns the names put in place
   * @throws InputError naming the file that could not be put in place, the files already new and those still old
   */
  commit(): string[] {
    const done: string[] = [];
    const entries = this.staged.splice(0);
    for (const [index, { name, temporary }] of entries.entries()) {
      try {
        this.fileSystem.rename(temporary, join(this.folder, name));
        done.push(name);
      } catch (error) {
        const rest = entries.slice(index);
        for (const entry of rest) {
          try { this.fileSystem.unlink(entry.temporary); } catch { /* already gone */ }
        }
        const list = (names: readonly string[]): string => (names.length === 0 ? 'none' : names.join(', '));
        throw new InputError(
          `cannot put "${join(this.label, name)}" in place: ${failureReason(error)}; in "${this.label}" these files are new from this run: ${list(done)}; these are not (previous run's or absent): ${list(rest.map((entry) => entry.name))}`,
        );
      }
    }
    return done;
  }
}

function writeError(path: string, error: unknown): InputError {
  return new InputError(`cannot write "${path}": ${failureReason(error)}; nothing was changed there`);
}

function failureReason(error: unknown): string {
  const code = (error as NodeJS.ErrnoException).code;
  const reasons: Record<string, string> = {
    EACCES: 'permission denied',
    EPERM: 'permission denied',
    ENOSPC: 'no space left on the device',
    EROFS: 'the file system is read-only',
    ENOENT: 'its folder does not exist',
    EISDIR: 'a folder of that name exists',
    ENOTDIR: 'part of the path is a file, not a folder',
  };
  return (code && reasons[code]) ?? String((error as Error)?.message ?? error);
}

/**
 * Name of the list, kept inside an output folder, of the files stratotrend
 * wrote there. An existing folder is reused only for these names: any other
 * file that would be overwritten makes the command refuse.
 */
export const ownFilesList = '.stratotrend-files';

function sameFile(left: string, right: string): boolean {
  if (resolve(left) === resolve(right)) return true;
  try {
    return realpathSync(left) === realpathSync(right);
  } catch {
    return false;
  }
}

/**
 * Check, without changing anything, that the command may write `names` into
 * `folder`: the folder is not an input and not a file, no name is an input,
 * and no name exists there without having been written by stratotrend (listed
 * in {@link ownFilesList}).
 *
 * @param option - the option that chose the place, for the advice in the message
 * @throws InputError (usage) naming the folder and the file.
 *
 * @example
 * checkOutputNames('no-such-folder', [], ['fit.json']); // undefined (a new folder: nothing to refuse)
 * checkOutputNames('sample-data', [], ['README.md']);
 * // throws: output folder "sample-data" already has "README.md", which stratotrend did not write
 * checkOutputNames('sample-data', ['sample-data/shell-length.csv'], ['shell-length.csv']);
 * // throws: refusing to write "sample-data/shell-length.csv": it is an input file; choose another --out folder
 */
export function checkOutputNames(folder: string, inputs: readonly string[], names: readonly string[], option = '--out folder'): void {
  const target = resolve(folder);
  const realInputs = inputs.filter((input) => input !== '-' && existsSync(input));
  for (const input of realInputs) {
    if (existsSync(target) && sameFile(input, target)) {
      throw new InputError(`output folder "${folder}" is an input file`, { kind: 'usage' });
    }
  }
  if (existsSync(target) && !statSync(target).isDirectory()) {
    throw new InputError(`output path "${folder}" exists and is not a folder`, { kind: 'usage' });
  }
  for (const name of names) {
    const path = join(target, name);
    for (const input of realInputs) {
      if (sameFile(input, path)) {
        throw new InputError(`refusing to write "${join(folder, name)}": it is an input file; choose another ${option}`, { kind: 'usage' });
      }
    }
  }
  const listed = readOwnFiles(target);
  for (const name of names) {
    if (pathTaken(join(target, name)) && !listed.has(name)) {
      throw new InputError(
        `output folder "${folder}" already has "${name}", which stratotrend did not write; choose another ${option} or move that file away`,
        { kind: 'usage' },
      );
    }
  }
}

/** Whether anything (a file, a folder, a link, even a dangling one) has this name. */
function pathTaken(path: string): boolean {
  try {
    lstatSync(path);
    return true;
  } catch {
    return false;
  }
}

/**
 * Prepare an output folder: create it, refuse a path that is an input file,
 * and refuse an existing non-folder. With `names` (the files the command is
 * about to write), also refuse when one of them is an input, or already exists
 * in the folder without having been written by stratotrend (it is not listed
 * in {@link ownFilesList}); other files in the folder are never touched.
 * Then take the folder's lock ({@link lockOutputFolder}: another run writing
 * there is refused by name), remove temporary files that interrupted runs
 * left behind, and record the names in that list.
 *
 * @param option - the option that chose the place, for the advice in messages
 * @throws InputError (usage) naming the folder and the file, or the other run.
 *
 * @example
 * // mkdtempSync, readdirSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * const target = prepareOutputFolder(`${folder}/out`, [], ['fit.json']);
 * readdirSync(target).sort(); // ['.stratotrend-files', '.stratotrend-lock'] (the list of its own names, and the run's lock)
 * [...readOwnFiles(target)]; // ['fit.json']
 * releaseOutputFolder(target);
 * rmSync(folder, { recursive: true });
 * prepareOutputFolder('sample-data/shell-length.csv', ['sample-data/shell-length.csv']);
 * // throws: output folder "sample-data/shell-length.csv" is an input file
 */
export function prepareOutputFolder(folder: string, inputs: readonly string[], names: readonly string[] = [], option = '--out folder'): string {
  const target = resolve(folder);
  checkOutputNames(folder, inputs, names, option);
  try {
    makeFolder(target);
  } catch (error) {
    throw new InputError(`cannot create the output folder "${folder}": ${failureReason(error) === 'its folder does not exist' ? 'a folder above it cannot be made here' : failureReason(error)}`);
  }
  const lockedHere = !heldLocks.has(target);
  lockOutputFolder(target, folder);
  try {
    // Another run may have written there between the check and the lock: check again under the lock.
    checkOutputNames(folder, inputs, names, option);
  } catch (error) {
    if (lockedHere) releaseOutputFolder(target);
    throw error;
  }
  removeStaleTemporaryFiles(target);
  const listed = readOwnFiles(target);
  const union = [...new Set([...listed, ...names])].sort();
  if (names.length > 0 && union.length !== listed.size) {
    writeAtomically(join(target, ownFilesList), `# files written here by stratotrend; it overwrites only these\n${union.join('\n')}\n`);
  }
  return target;
}

/**
 * Claim one output file (the report): the rules of {@link prepareOutputFolder}
 * for its folder and its name, so a file of that name that stratotrend did not
 * write is never overwritten.
 *
 * @param option - the option that named the file, for the advice in messages
 * @returns the absolute path to write
 *
 * @example
 * // mkdtempSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * prepareOutputFile(`${folder}/report.html`, [], '--report file') === `${folder}/report.html`; // true
 * releaseOutputFolder(folder);
 * rmSync(folder, { recursive: true });
 * prepareOutputFile('sample-data/shell-length.csv', ['sample-data/shell-length.csv'], '--report file');
 * // throws: refusing to write "sample-data/shell-length.csv": it is an input file
 */
export function prepareOutputFile(path: string, inputs: readonly string[], option: string): string {
  for (const input of inputs) {
    if (input !== '-' && existsSync(input) && sameFile(input, path)) {
      throw new InputError(`refusing to write "${path}": it is an input file`, { kind: 'usage' });
    }
  }
  const folder = prepareOutputFolder(dirname(path), inputs, [basename(path)], option);
  return join(folder, basename(path));
}

/**
 * {@link checkOutputNames} for one file: may the command write `path`?
 *
 * @example
 * checkOutputFile('no-such-folder/report.html', ['sample-data/shell-length.csv'], '--report file'); // undefined
 * checkOutputFile('sample-data/README.md', [], '--report file');
 * // throws: output folder "sample-data" already has "README.md", which stratotrend did not write; choose another --report file
 */
export function checkOutputFile(path: string, inputs: readonly string[], option: string): void {
  for (const input of inputs) {
    if (input !== '-' && existsSync(input) && sameFile(input, path)) {
      throw new InputError(`refusing to write "${path}": it is an input file`, { kind: 'usage' });
    }
  }
  checkOutputNames(dirname(path), inputs, [basename(path)], option);
}

/** Name of the lock file an output folder holds while a run writes there. */
export const lockFileName = '.stratotrend-lock';

/** Folders this process holds the lock of (absolute paths); released when the process exits. */
const heldLocks = new Set<string>();

/**
 * Give up every output-folder lock this process holds. Commands call it when
 * they end, so a process that runs several commands (a test, a library
 * caller) does not keep its folders locked; process exit does it too.
 *
 * @example
 * // mkdtempSync, readdirSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * lockOutputFolder(folder);
 * readdirSync(folder); // ['.stratotrend-lock']
 * releaseOutputLocks();
 * readdirSync(folder); // []
 * rmSync(folder, { recursive: true });
 */
export function releaseOutputLocks(): void {
  releaseHeldLocks();
}

function releaseHeldLocks(): void {
  for (const folder of heldLocks) {
    try { unlinkSync(join(folder, lockFileName)); } catch { /* already gone */ }
  }
  heldLocks.clear();
}

/**
 * Give up this process's lock of a folder (done for every held lock when the process exits).
 *
 * @example
 * // mkdtempSync, readdirSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * lockOutputFolder(folder);
 * releaseOutputFolder(folder);
 * readdirSync(folder); // [] (the lock file removed)
 * rmSync(folder, { recursive: true });
 */
export function releaseOutputFolder(folder: string): void {
  const target = resolve(folder);
  if (!heldLocks.delete(target)) return;
  try { unlinkSync(join(target, lockFileName)); } catch { /* already gone */ }
}

/**
 * Whether a process of this id is running (EPERM: it runs, under another user).
 *
 * @example
 * processAlive(process.pid); // true
 * processAlive(0); // false (not a process id)
 */
export function processAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Take an output folder's lock: create {@link lockFileName} exclusively,
 * holding this process's id, start time and command line; it is removed when
 * the process exits. A lock left by a process that no longer runs (an
 * interrupted run) is taken over. Taking a lock this process holds does
 * nothing.
 *
 * @param label - the folder as the user wrote it, for messages
 * @throws InputError (usage) naming the other run when one holds the lock.
 *
 * @example
 * // mkdtempSync, readFileSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * lockOutputFolder(folder);
 * readFileSync(`${folder}/.stratotrend-lock`, 'utf8').startsWith(`pid ${process.pid}\n`); // true
 * lockOutputFolder(folder); // undefined (held already: nothing to do)
 * releaseOutputFolder(folder);
 * rmSync(folder, { recursive: true });
 */
export function lockOutputFolder(folder: string, label: string = folder): void {
  const target = resolve(folder);
  if (heldLocks.has(target)) return;
  const path = join(target, lockFileName);
  const text = `pid ${process.pid}\nstarted ${new Date().toISOString()}\ncommand stratotrend ${process.argv.slice(2).join(' ')}\n`;
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      const descriptor = nodeFileSystem.createExclusive(path);
      try {
        writeSync(descriptor, text);
      } finally {
        closeSync(descriptor);
      }
      if (heldLocks.size === 0) process.once('exit', releaseHeldLocks);
      heldLocks.add(target);
      return;
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') {
        throw new InputError(`cannot lock the output folder "${label}": ${failureReason(error)}`);
      }
    }
    const holder = readLock(path);
    if (holder.pid !== null && holder.pid !== process.pid && processAlive(holder.pid)) {
      throw new InputError(
        `output folder "${label}" is in use by another stratotrend run (process ${holder.pid}${holder.started ? `, started ${holder.started}` : ''}${holder.command ? `: ${holder.command}` : ''}); wait for it to finish or choose another folder (if that run is gone, delete ${join(label, lockFileName)})`,
        { kind: 'usage' },
      );
    }
    // The run that held it is gone (or the file is damaged): take it over.
    try { unlinkSync(path); } catch { /* another run took it over first */ }
  }
  throw new InputError(`output folder "${label}" is in use by another stratotrend run; try again`, { kind: 'usage' });
}

/** What a lock file says: process id, start time and command (null or empty when unreadable). */
function readLock(path: string): { pid: number | null; started: string; command: string } {
  let text = '';
  try {
    if (lstatSync(path).isFile()) text = readFileSync(path, 'utf8').slice(0, 4096);
  } catch { /* gone or unreadable */ }
  const field = (key: string): string => text.split('\n').find((line) => line.startsWith(`${key} `))?.slice(key.length + 1).trim() ?? '';
  const pid = Number(field('pid'));
  return { pid: /^\d+$/.test(field('pid')) ? pid : null, started: field('started'), command: field('command') };
}

/**
 * Remove the temporary files (`.<name>.<pid>-<random>.tmp`, or the older
 * `.<name>.<pid>.tmp`) that runs no longer running left in a folder, for the
 * names stratotrend writes there (listed in {@link ownFilesList}, and the list
 * itself; a run records its names before writing, so an interrupted run's
 * files are covered); those of running processes and every other file are
 * left alone. A link at such a name is removed itself, never followed.
 *
 * @returns the names removed
 *
 * @example
 * // A temporary file of an interrupted run (process 999999999, not running) for a name stratotrend wrote there.
 * // mkdtempSync, writeFileSync, readdirSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * writeFileSync(`${folder}/.stratotrend-files`, 'fit.json\n');
 * writeFileSync(`${folder}/.fit.json.999999999-0123456789ab.tmp`, '{');
 * writeFileSync(`${folder}/.notes.txt.999999999-0123456789ab.tmp`, 'x');
 * removeStaleTemporaryFiles(folder); // ['.fit.json.999999999-0123456789ab.tmp'] (notes.txt is not stratotrend's: left alone)
 * readdirSync(folder).sort(); // ['.notes.txt.999999999-0123456789ab.tmp', '.stratotrend-files']
 * rmSync(folder, { recursive: true });
 */
export function removeStaleTemporaryFiles(folder: string): string[] {
  const removed: string[] = [];
  let entries: string[];
  try {
    entries = readdirSync(folder);
  } catch {
    return removed;
  }
  const own = readOwnFiles(folder);
  own.add(ownFilesList);
  for (const name of entries) {
    const match = temporaryPattern.exec(name);
    if (!match || !own.has(match[1])) continue;
    const pid = Number(match[2]);
    if (pid === process.pid || processAlive(pid)) continue;
    try {
      unlinkSync(join(folder, name));
      removed.push(name);
    } catch { /* gone already, or a folder: leave it */ }
  }
  return removed;
}

/**
 * Create a folder and any missing parents, one level at a time. (Node 20's
 * `mkdirSync(path, { recursive: true })` can spin forever on some special
 * file systems, e.g. under /proc, instead of failing.)
 *
 * @throws the file-system error of the first level that cannot be made.
 *
 * @example
 * // mkdtempSync, existsSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * makeFolder(`${folder}/a/b/c`);
 * existsSync(`${folder}/a/b/c`); // true
 * rmSync(folder, { recursive: true });
 */
export function makeFolder(path: string): void {
  const missing: string[] = [];
  let current = resolve(path);
  while (!existsSync(current)) {
    missing.push(current);
    const parent = dirname(current);
    if (parent === current) break;
    current = parent;
  }
  for (const folder of missing.reverse()) mkdirSync(folder);
}

/**
 * The names listed in a folder's {@link ownFilesList} (empty when there is none).
 *
 * @example
 * readOwnFiles('sample-data'); // new Set() (no list there: stratotrend wrote nothing in it)
 */
export function readOwnFiles(folder: string): Set<string> {
  try {
    const text = readFileSync(join(folder, ownFilesList), 'utf8');
    return new Set(text.split('\n').map((line) => line.trim()).filter((line) => line !== '' && !line.startsWith('#')));
  } catch {
    return new Set();
  }
}

/**
 * Every file a command reads: the samples file and, when given, the age
 * model and the covariate file, which outputs must never overwrite.
 *
 * @example
 * inputPaths('samples.csv', { ageModel: 'ties.csv', attach: ['power.json'] }); // ['samples.csv', 'ties.csv', 'power.json']
 */
export function inputPaths(file: string, options: { ageModel?: string; covariateFile?: string; attach?: readonly string[] } = {}): string[] {
  return [file, options.ageModel, options.covariateFile, ...(options.attach ?? [])].filter((path): path is string => typeof path === 'string' && path !== '');
}

/**
 * Refuse to write an output file over one of the inputs.
 *
 * @example
 * refuseInputPath('out/fit.json', ['sample-data/shell-length.csv']); // undefined
 * refuseInputPath('sample-data/./shell-length.csv', ['sample-data/shell-length.csv']);
 * // throws: refusing to write "sample-data/./shell-length.csv": it is an input file
 */
export function refuseInputPath(path: string, inputs: readonly string[]): void {
  for (const input of inputs) {
    if (input !== '-' && existsSync(input) && sameFile(input, path)) {
      throw new InputError(`refusing to write "${path}": it is an input file`, { kind: 'usage' });
    }
  }
}
