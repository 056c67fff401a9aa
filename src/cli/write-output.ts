import { mkdirSync, realpathSync, renameSync, writeFileSync, existsSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { InputError } from '../data/errors.js';

/**
 * Write a file atomically: into a temporary file beside it, then rename, so a
 * reader never sees half a file and a crash never leaves one.
 */
export function writeAtomically(path: string, contents: string | Uint8Array): void {
  const temporary = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  writeFileSync(temporary, contents);
  renameSync(temporary, path);
}

/**
 * Prepare an output folder: create it, refuse a path that is an input file,
 * and refuse an existing non-folder.
 */
export function prepareOutputFolder(folder: string, inputs: readonly string[]): string {
  const target = resolve(folder);
  for (const input of inputs) {
    if (input === '-') continue;
    if (existsSync(input) && existsSync(target) && realpathSync(input) === realpathSync(target)) {
      throw new InputError(`output folder "${folder}" is an input file`, { kind: 'usage' });
    }
  }
  if (existsSync(target) && !statSync(target).isDirectory()) {
    throw new InputError(`output path "${folder}" exists and is not a folder`, { kind: 'usage' });
  }
  mkdirSync(target, { recursive: true });
  return target;
}

/** Refuse to write an output file over one of the inputs. */
export function refuseInputPath(path: string, inputs: readonly string[]): void {
  for (const input of inputs) {
    if (input !== '-' && existsSync(input) && existsSync(path) && realpathSync(input) === realpathSync(path)) {
      throw new InputError(`refusing to write "${path}": it is an input file`, { kind: 'usage' });
    }
  }
}
