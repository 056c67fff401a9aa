import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { InputError } from '../data/errors.js';
import { readSamples, type SampleOptions } from '../data/samples.js';
import { readTable } from '../data/read-table.js';
import type { WarningLog } from '../data/warnings.js';
import { buildLineages, timeUnit, type Lineage, type LineageOptions } from '../lineage.js';

/** A file read from disk or stdin, with its checksum for provenance. */
export interface InputText {
  readonly name: string;
  readonly text: string;
  readonly sha256: string;
}

/** Read a file (or stdin for "-") as UTF-8 text. */
export function readInput(path: string): InputText {
  let buffer: Buffer;
  try {
    buffer = readFileSync(path === '-' ? 0 : path);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, expected a CSV file' : String((error as Error).message);
    throw new InputError(reason, { file: path });
  }
  return { name: path === '-' ? 'stdin' : path, text: buffer.toString('utf8'), sha256: createHash('sha256').update(buffer).digest('hex') };
}

/** Options shared by every command that reads samples. */
export interface SampleFileOptions {
  log?: boolean;
  pool?: boolean;
  timeUnit?: string;
  delimiter?: string;
  decimalComma?: boolean;
}

/** Read, validate and assemble the lineages of a samples file. */
export function loadLineages(
  input: InputText,
  options: SampleFileOptions,
  warnings: WarningLog,
  extra: Pick<LineageOptions, 'ageOf'> = {},
): Lineage[] {
  const delimiter = options.delimiter === undefined ? undefined : options.delimiter === 'tab' || options.delimiter === '\\t' ? '\t' : options.delimiter;
  const table = readTable(input.text, input.name, { delimiter });
  const sampleOptions: SampleOptions = { log: options.log, decimalComma: options.decimalComma };
  const samples = readSamples(table, sampleOptions);
  return buildLineages(samples, {
    pool: options.pool,
    timeUnit: timeUnit(options.timeUnit ?? 'Myr'),
    warnings,
    ...extra,
  });
}
