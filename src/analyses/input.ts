import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { InputError } from '../data/errors.js';
import { firstControlCharacter, invisibleFormatWords } from '../data/names.js';
import { readSamples, type SampleOptions, type SampleSet } from '../data/samples.js';
import { decodeText, readTable } from '../data/read-table.js';
import { streamSampleFile, type StreamProgress } from '../data/stream-samples.js';
import type { WarningLog } from '../data/warnings.js';
import { buildLineages, timeUnit, type Lineage, type LineageOptions } from '../lineage.js';

/** A file read from disk or stdin, with its checksum for provenance. */
export interface InputText {
  readonly name: string;
  readonly text: string;
  readonly sha256: string;
}

/**
 * Read a file (or stdin for "-") as UTF-8 text.
 *
 * @example
 * const input = readInput('sample-data/shell-length.csv');
 * input.text.split('\n')[0]; // 'section,trait,age,n,mean,sd'
 * input.sha256.length; // 64 (hexadecimal SHA-256)
 * readInput('no-such-file.csv');
 * // throws: no such file
 */
export function readInput(path: string): InputText {
  let buffer: Buffer;
  try {
    buffer = readFileSync(path === '-' ? 0 : path);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder, expected a CSV file' : String((error as Error).message);
    throw new InputError(reason, { file: path });
  }
  const name = path === '-' ? 'stdin' : path;
  return { name, text: decodeText(buffer, name), sha256: createHash('sha256').update(buffer).digest('hex') };
}

/**
 * The `--delimiter` value as a character: "tab" or "\t" for a tab, the words
 * comma / semicolon, or one character.
 *
 * @throws InputError (usage) for anything else.
 *
 * @example
 * delimiterOption('tab'); // '\t'
 * delimiterOption('semicolon'); // ';'
 * delimiterOption('ab');
 * // throws: --delimiter must be one character, "tab", "comma" or "semicolon", got "ab"
 */
export function delimiterOption(value: string | undefined): string | undefined {
  if (value === undefined) return undefined;
  const words: Record<string, string> = { tab: '\t', '\\t': '\t', '\t': '\t', comma: ',', semicolon: ';', ',': ',', ';': ';' };
  const known = words[value.trim().toLowerCase()] ?? words[value];
  if (known !== undefined) return known;
  if ([...value].length === 1 && value !== '"' && value !== '\n' && value !== '\r') return value;
  throw new InputError(`--delimiter must be one character, "tab", "comma" or "semicolon", got "${value}"`, { kind: 'usage' });
}

/**
 * The `--time-unit` value as a unit (default Myr).
 *
 * @throws InputError (usage) for an empty label or one holding a control character (it is printed with every rate).
 *
 * @example
 * timeUnitOption('ka'); // { label: 'kyr', years: 1000 }
 * timeUnitOption('');
 * // throws: --time-unit must name a unit (Ma, ka, yr or any label), got ""
 */
export function timeUnitOption(value: string | undefined): ReturnType<typeof timeUnit> {
  if (value !== undefined && value.trim() === '') {
    throw new InputError('--time-unit must name a unit (Ma, ka, yr or any label), got ""', { kind: 'usage' });
  }
  if (value !== undefined && firstControlCharacter(value) !== null) {
    throw new InputError(`--time-unit must be one line of text without control characters, got ${JSON.stringify(value)}`, { kind: 'usage' });
  }
  const hiddenInTime = value === undefined ? null : invisibleFormatWords(value);
  if (hiddenInTime !== null) throw new InputError(`--time-unit must be visible text; it holds ${hiddenInTime}, got ${JSON.stringify(value)}`, { kind: 'usage' });
  return timeUnit(value ?? 'Myr');
}

/**
 * The `--trait-unit` values: one plain label for every trait ("mm") and/or
 * `TRAIT=LABEL` entries for single traits ("rib density=ribs per cm"; trait
 * names compared without case and surrounding spaces), the option repeated
 * for several. A label only — the tool converts nothing.
 */
export interface TraitUnits {
  /** Label of every trait not named in `byTrait`, or null. */
  readonly all: string | null;
  /** Labels of named traits, keyed by the trimmed, lower-case trait name. */
  readonly byTrait: ReadonlyMap<string, { readonly trait: string; readonly label: string }>;
}

function unitLabelText(label: string, given: string): string {
  const trimmed = label.trim();
  if (trimmed === '') throw new InputError(`--trait-unit must name a unit (e.g. mm, µm² or "whorl width=mm"), got ${JSON.stringify(given)}`, { kind: 'usage' });
  if (firstControlCharacter(trimmed) !== null) throw new InputError(`--trait-unit must be one line of text without control characters, got ${JSON.stringify(given)}`, { kind: 'usage' });
  const hidden = invisibleFormatWords(trimmed);
  if (hidden !== null) throw new InputError(`--trait-unit must be visible text; it holds ${hidden}, got ${JSON.stringify(given)}`, { kind: 'usage' });
  return trimmed;
}

/**
 * Parse the `--trait-unit` values (absent: no unit anywhere).
 *
 * @throws InputError (usage) for an empty label or trait name, control characters, two plain labels, or one trait named twice.
 * @example
 * traitUnitOption(['mm', 'rib density=ribs per cm']).byTrait.get('rib density')?.label; // "ribs per cm"
 * traitUnitOption(' mm ').all; // "mm"
 */
export function traitUnitOption(value: string | readonly string[] | undefined): TraitUnits {
  const values = value === undefined ? [] : typeof value === 'string' ? [value] : value;
  let all: string | null = null;
  const byTrait = new Map<string, { trait: string; label: string }>();
  for (const given of values) {
    const equals = given.indexOf('=');
    if (equals < 0) {
      if (all !== null) throw new InputError(`--trait-unit: give one label for all traits, or TRAIT=LABEL per trait; got both "${all}" and "${given.trim()}"`, { kind: 'usage' });
      all = unitLabelText(given, given);
      continue;
    }
    const trait = given.slice(0, equals).trim();
    if (trait === '') throw new InputError(`--trait-unit: name the trait before "=", got ${JSON.stringify(given)}`, { kind: 'usage' });
    const label = unitLabelText(given.slice(equals + 1), given);
    // NFC like the names read from the file (src/data/samples.ts), so either Unicode form of a name matches.
    const key = trait.normalize('NFC').toLowerCase();
    if (byTrait.has(key)) throw new InputError(`--trait-unit: trait "${trait}" is given a unit twice`, { kind: 'usage' });
    byTrait.set(key, { trait, label });
  }
  return { all, byTrait };
}

/**
 * The unit of one trait under parsed `--trait-unit` values: its own entry, else the label for all, else null.
 *
 * @example
 * const units = traitUnitOption(['mm', 'shell width=cm']);
 * traitUnitFor(units, 'Shell Width'); // 'cm' (trait names compared without case)
 * traitUnitFor(units, 'shell length'); // 'mm' (the label for every other trait)
 */
export function traitUnitFor(units: TraitUnits, trait: string): string | null {
  return units.byTrait.get(trait.trim().normalize('NFC').toLowerCase())?.label ?? units.all;
}

/** Options shared by every command that reads samples. */
export interface SampleFileOptions {
  log?: boolean;
  pool?: boolean;
  timeUnit?: string;
  /**
   * `--trait-unit`: one label for every trait and/or TRAIT=LABEL entries (the
   * option repeated; commander collects an array). Absent: outputs say "trait units" as before.
   */
  traitUnit?: string | string[];
  delimiter?: string;
  decimalComma?: boolean;
}

/**
 * Read, validate and assemble the lineages of a samples file.
 *
 * @example
 * const lineages = loadLineages(readInput('sample-data/shell-length.csv'), {}, new WarningLog());
 * lineages.map((lineage) => lineage.section); // ['Varnek Draw', 'Tolloway Bluff']
 */
export function loadLineages(
  input: InputText,
  options: SampleFileOptions,
  warnings: WarningLog,
  extra: Pick<LineageOptions, 'ageOf'> = {},
): Lineage[] {
  const delimiter = delimiterOption(options.delimiter);
  const table = readTable(input.text, input.name, { delimiter });
  const sampleOptions: SampleOptions = { log: options.log, decimalComma: options.decimalComma };
  return lineagesOf(readSamples(table, sampleOptions), options, warnings, extra);
}

/** A samples file read as a stream: its name and checksum, and the horizons (no text kept). */
export interface StreamedInput {
  readonly input: Omit<InputText, 'text'>;
  readonly samples: SampleSet;
}

/**
 * Read a samples file as a stream (bounded memory for specimen files of
 * millions of rows; see `streamSampleFile`): the horizons it gives, which
 * {@link lineagesOf} assembles into lineages as often as needed (once per
 * age-model draw in `compare` and `fit --age-draws`). Same messages and line
 * numbers as {@link readInput} + {@link loadLineages}; "-" reads stdin.
 *
 * @example
 * const streamed = await loadSamplesStreamed('sample-data/shell-length.csv', {});
 * streamed.input.sha256 === readInput('sample-data/shell-length.csv').sha256; // true
 * streamed.samples.form; // 'summary'
 */
export async function loadSamplesStreamed(path: string, options: SampleFileOptions, onProgress?: (progress: StreamProgress) => void): Promise<StreamedInput> {
  const name = path === '-' ? 'stdin' : path;
  const delimiter = delimiterOption(options.delimiter);
  let streamed;
  try {
    streamed = await streamSampleFile(path === '-' ? process.stdin : path, name, { delimiter, log: options.log, decimalComma: options.decimalComma, onProgress });
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError('no such file', { file: path });
    if (code === 'EISDIR') throw new InputError('is a folder, expected a CSV file', { file: path });
    if (code === 'EACCES') throw new InputError('cannot be read (permission denied)', { file: path });
    throw error;
  }
  return { input: { name, sha256: streamed.sha256 }, samples: streamed.samples };
}

/**
 * Assemble the lineages of read samples (pooling, time unit, trait unit, the age model's `ageOf`).
 *
 * @example
 * const { samples } = await loadSamplesStreamed('sample-data/shell-length.csv', {});
 * lineagesOf(samples, { timeUnit: 'ka' }, new WarningLog())[0].timeUnit; // { label: 'kyr', years: 1000 }
 */
export function lineagesOf(samples: SampleSet, options: SampleFileOptions, warnings: WarningLog, extra: Pick<LineageOptions, 'ageOf'> = {}): Lineage[] {
  const units = traitUnitOption(options.traitUnit);
  const lineages = buildLineages(samples, {
    pool: options.pool,
    timeUnit: timeUnitOption(options.timeUnit),
    traitUnit: (trait) => traitUnitFor(units, trait),
    warnings,
    ...extra,
  });
  // A misspelt trait name would silently leave that trait without its unit.
  const traits = new Set(lineages.map((lineage) => lineage.trait.trim().normalize('NFC').toLowerCase()));
  for (const [key, { trait }] of units.byTrait) {
    if (!traits.has(key)) {
      const names = [...new Set(lineages.map((lineage) => lineage.trait))].filter((name) => name !== '');
      throw new InputError(`--trait-unit: no trait "${trait}" in ${samples.file}; its traits are ${names.length > 0 ? names.map((name) => `"${name}"`).join(', ') : 'unnamed (no trait column: give the unit alone, e.g. --trait-unit mm)'}`, { kind: 'usage' });
    }
  }
  return lineages;
}

/**
 * {@link loadSamplesStreamed} then {@link lineagesOf}.
 *
 * @example
 * const { lineages } = await loadLineagesStreamed('sample-data/shell-length.csv', { traitUnit: 'mm' }, new WarningLog());
 * lineages.map((lineage) => lineage.traitUnit); // ['mm', 'mm']
 */
export async function loadLineagesStreamed(
  path: string,
  options: SampleFileOptions,
  warnings: WarningLog,
  extra: Pick<LineageOptions, 'ageOf'> = {},
  onProgress?: (progress: StreamProgress) => void,
): Promise<StreamedInput & { lineages: Lineage[] }> {
  const streamed = await loadSamplesStreamed(path, options, onProgress);
  return { ...streamed, lineages: lineagesOf(streamed.samples, options, warnings, extra) };
}

