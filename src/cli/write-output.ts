import { closeSync, existsSync, fsyncSync, mkdirSync, openSync, readFileSync, realpathSync, renameSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { InputError } from '../data/errors.js';

/**
 * Write a file atomically: into a temporary file beside it, flushed to disk,
 * then renamed over the target, so a reader never sees half a file and a
 * crash or a full disk never leaves one (the temporary file is removed on
 * failure and the old file, if any, is untouched).
 *
 * @throws InputError naming the path when the file cannot be written.
 */
export function writeAtomically(path: string, contents: string | Uint8Array): void {
  const temporary = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  let descriptor: number | null = null;
  try {
    descriptor = openSync(temporary, 'w');
    const bytes = typeof contents === 'string' ? Buffer.from(contents, 'utf8') : contents;
    let written = 0;
    while (written < bytes.length) written += writeSync(descriptor, bytes, written, bytes.length - written);
    fsyncSync(descriptor);
    closeSync(descriptor);
    descriptor = null;
    renameSync(temporary, path);
  } catch (error) {
    if (descriptor !== null) {
      try { closeSync(descriptor); } catch { /* already failing */ }
    }
    try { unlinkSync(temporary); } catch { /* never created */ }
    throw writeError(path, error);
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
 * Prepare an output folder: create it, refuse a path that is an input file,
 * and refuse an existing non-folder. With `names` (the files the command is
 * about to write), also refuse when one of them is an input, or already exists
 * in the folder without having been written by stratotrend (it is not listed
 * in {@link ownFilesList}); other files in the folder are never touched. The
 * names are then recorded in that list.
 *
 * @throws InputError (usage) naming the folder and the file.
 */
export function prepareOutputFolder(folder: string, inputs: readonly string[], names: readonly string[] = []): string {
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
        throw new InputError(`refusing to write "${join(folder, name)}": it is an input file; choose another --out folder`, { kind: 'usage' });
      }
    }
  }
  const listed = readOwnFiles(target);
  for (const name of names) {
    if (existsSync(join(target, name)) && !listed.has(name)) {
      throw new InputError(
        `output folder "${folder}" already has "${name}", which stratotrend did not write; choose another --out folder or move that file away`,
        { kind: 'usage' },
      );
    }
  }
  try {
    makeFolder(target);
  } catch (error) {
    throw new InputError(`cannot create the output folder "${folder}": ${failureReason(error) === 'its folder does not exist' ? 'a folder above it cannot be made here' : failureReason(error)}`);
  }
  const union = [...new Set([...listed, ...names])].sort();
  if (names.length > 0 && union.length !== listed.size) {
    writeAtomically(join(target, ownFilesList), `# files written here by stratotrend; it overwrites only these\n${union.join('\n')}\n`);
  }
  return target;
}

/**
 * Create a folder and any missing parents, one level at a time. (Node 20's
 * `mkdirSync(path, { recursive: true })` can spin forever on some special
 * file systems, e.g. under /proc, instead of failing.)
 *
 * @throws the file-system error of the first level that cannot be made.
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

/** The names listed in a folder's {@link ownFilesList} (empty when there is none). */
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
 */
export function inputPaths(file: string, options: { ageModel?: string; covariateFile?: string; attach?: readonly string[] } = {}): string[] {
  return [file, options.ageModel, options.covariateFile, ...(options.attach ?? [])].filter((path): path is string => typeof path === 'string' && path !== '');
}

/** Refuse to write an output file over one of the inputs. */
export function refuseInputPath(path: string, inputs: readonly string[]): void {
  for (const input of inputs) {
    if (input !== '-' && existsSync(input) && sameFile(input, path)) {
      throw new InputError(`refusing to write "${path}": it is an input file`, { kind: 'usage' });
    }
  }
}
