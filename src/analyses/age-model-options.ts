/**
 * The age model as every samples-reading command takes it (`fit`, `compare`,
 * `report`, `power`, `bootstrap`, `simulate`): one set of options, one reader,
 * one hook that places heights and depths in time. The option definitions
 * live in `commands/shared.ts` (`addAgeModelOptions`); this module is what the
 * actions run, so the commands cannot drift apart.
 */
import { ageFunction, readAgeModel, sedimentationRates, type AgeModel } from '../data/age-model.js';
import { usageError } from '../data/errors.js';
import { readTable } from '../data/read-table.js';
import type { SampleSet, TimeKind } from '../data/samples.js';
import type { WarningLog } from '../data/warnings.js';
import { plausibleUnit, type Lineage, type LineageOptions } from '../lineage.js';
import { delimiterOption, lineagesOf, readInput, timeUnitOption, type InputText, type SampleFileOptions } from './input.js';

/** The age-model options (`--age-draws` and `--seed` only where the command takes them: fit and compare). */
export interface AgeModelOptions {
  ageModel?: string;
  extrapolate?: boolean;
  ageDraws?: string;
  seed?: string;
}

/** An age-model file as read: its text record (name, checksum) and the validated ties. */
export interface LoadedAgeModel {
  readonly model: AgeModel;
  readonly input: InputText;
}

/**
 * Read and validate an age-model file (tie points).
 *
 * @param samplesKind the position column of the samples ("height" or "depth"), when known: a tie
 *   file in the other one is refused with a message saying so (before its ages are checked).
 *
 * @example
 * const { input, model } = loadAgeModel('sample-data/locality-ties.csv', {}, 'height');
 * input.name; // 'sample-data/locality-ties.csv'
 * [...model.sections.keys()]; // ['Quarrel Hollow', 'Brisk Fen Cut', 'Ostry Scarp']
 */
export function loadAgeModel(path: string, options: SampleFileOptions, samplesKind?: TimeKind): LoadedAgeModel {
  const input = readInput(path);
  const positionKind = samplesKind === 'height' || samplesKind === 'depth' ? samplesKind : undefined;
  const model = readAgeModel(readTable(input.text, input.name, { delimiter: delimiterOption(options.delimiter) }), { decimalComma: options.decimalComma, positionKind });
  return { input, model };
}

/**
 * Parse `--age-draws` and `--seed` (absent on commands without age draws: 0 draws, seed 1).
 *
 * @example
 * parseDrawOptions({}); // { draws: 0, seed: 1 }
 * parseDrawOptions({ ageModel: 'ties.csv', ageDraws: '20', seed: '7' }); // { draws: 20, seed: 7 }
 * parseDrawOptions({ ageDraws: '5' });
 * // throws: --age-draws redraws the ages of an age model: give one with --age-model FILE
 */
export function parseDrawOptions(options: AgeModelOptions): { draws: number; seed: number } {
  const draws = options.ageDraws === undefined ? 0 : Number(options.ageDraws);
  if (!Number.isInteger(draws) || draws < 0 || draws > 100_000) throw usageError(`--age-draws must be a whole number from 0 to 100000, got "${options.ageDraws}"`);
  const seed = options.seed === undefined ? 1 : Number(options.seed);
  if (!Number.isInteger(seed) || seed < 0 || seed > 2 ** 32 - 1) throw usageError(`--seed must be a whole number from 0 to 4294967295, got "${options.seed}"`);
  if (draws > 0 && options.ageModel === undefined) throw usageError('--age-draws redraws the ages of an age model: give one with --age-model FILE');
  return { draws, seed };
}

/**
 * Usage checks of the age-model options that need no file (run before reading a large samples file).
 *
 * @throws InputError (usage) for --extrapolate without --age-model.
 *
 * @example
 * checkAgeModelUsage({ ageModel: 'ties.csv', extrapolate: true }); // undefined
 * checkAgeModelUsage({ extrapolate: true });
 * // throws: --extrapolate extends an age model: give one with --age-model FILE
 */
export function checkAgeModelUsage(options: AgeModelOptions): void {
  if (!options.ageModel && options.extrapolate) throw usageError('--extrapolate extends an age model: give one with --age-model FILE');
}

/**
 * The `ageOf` hook for {@link lineagesOf} when `--age-model` is given (and the
 * age model itself), or nothing. With `samplesKind` the tie file must use the
 * same position column as the samples; with `warnings` the sedimentation
 * rates are checked for plausibility in the stated time unit
 * ({@link warnImplausibleRates}).
 *
 * @throws InputError (usage) for --extrapolate without --age-model; the tie reader's errors.
 *
 * @example
 * const { age, extra } = ageModelHook('heights.csv', { ageModel: 'sample-data/locality-ties.csv' }, 'height', new WarningLog());
 * age.input.name; // 'sample-data/locality-ties.csv'
 * extra.ageOf('Quarrel Hollow', 35, 3); // { age: 8.1, extrapolated: false } (the tie at 35 m)
 * ageModelHook('heights.csv', {}); // { age: null, extra: {} }
 */
export function ageModelHook(
  file: string,
  options: AgeModelOptions & SampleFileOptions,
  samplesKind?: TimeKind,
  warnings?: WarningLog,
): { age: LoadedAgeModel | null; extra: Pick<LineageOptions, 'ageOf'> } {
  checkAgeModelUsage(options);
  if (!options.ageModel) return { age: null, extra: {} };
  const age = loadAgeModel(options.ageModel, options, samplesKind);
  if (warnings && (samplesKind === 'height' || samplesKind === 'depth')) warnImplausibleRates(age.model, timeUnitOption(options.timeUnit), warnings);
  return { age, extra: { ageOf: ageFunction(age.model, { extrapolate: options.extrapolate, samplesFile: file === '-' ? 'stdin' : file }) } };
}

/**
 * Place read samples into lineages under the age-model options: read the tie
 * file (if any) against the samples' position column, then assemble. What
 * `power`, `bootstrap` and `simulate` call; `fit` and `compare` do the same
 * in two steps because they keep the age model for draws and outputs.
 *
 * @example
 * // Ties of Quarrel Hollow: 9.00 at 0 m, 8.10 at 35 m, so 10 m above the base lies 0.9 × 10 / 35 Myr later (linear interpolation).
 * const table = readTable('section,trait,height,n,mean,sd\nQuarrel Hollow,x,0,5,1,0.5\nQuarrel Hollow,x,10,5,2,0.5\nQuarrel Hollow,x,20,5,3,0.5\n', 'h.csv');
 * const { lineages } = lineagesWithAgeModel('h.csv', readSamples(table), { ageModel: 'sample-data/locality-ties.csv' }, new WarningLog());
 * lineages[0].firstAge; // 9
 * lineages[0].time[1]; // 0.2571428571428571 (to 1e-12; 0.9 × 10 / 35)
 */
export function lineagesWithAgeModel(
  file: string,
  samples: SampleSet,
  options: AgeModelOptions & SampleFileOptions,
  warnings: WarningLog,
): { lineages: Lineage[]; age: LoadedAgeModel | null } {
  const { age, extra } = ageModelHook(file, options, samples.timeKind, warnings);
  const lineages = lineagesOf(samples, options, warnings, extra);
  if (age) warnUnusedAgeModel(lineages, age.model, warnings);
  return { lineages, age };
}

/**
 * An age model only places heights and depths: say so when the samples already give ages or times.
 *
 * @example
 * const warnings = new WarningLog();
 * warnUnusedAgeModel([{ positionKind: 'age' }], readAgeModel(readTable('height,age\n0,10\n50,8\n', 'ties.csv')), warnings);
 * warnings.list()[0].message; // 'the samples give "age", so the age model ties.csv is not used (it places heights and depths only)'
 */
export function warnUnusedAgeModel(lineages: readonly Lineage[], model: AgeModel, warnings: { add(category: 'input', message: string): void }): void {
  const kind = lineages[0]?.positionKind;
  if (kind === 'age' || kind === 'time') warnings.add('input', `the samples give "${kind}", so the age model ${model.file} is not used (it places heights and depths only)`);
}

/**
 * Plausible sedimentation rates, in metres per million years (common
 * practice, rough bounds): slow pelagic oozes accumulate at about 1 m/Myr
 * and condensed beds less, fast shelf, deltaic and lake deposits at up to a
 * few km/Myr. Rates from 0.1 to 10,000 m/Myr cover them with room to spare;
 * a median rate outside that range almost always means ages in one unit read
 * as another (ka read as Ma gives rates 1000 times too small).
 */
export const plausibleSedimentationRate = { lowest: 0.1, highest: 10_000 } as const;

/**
 * Warn (category `time-axis`) when a section's median sedimentation rate lies
 * outside {@link plausibleSedimentationRate} in the stated time unit, naming
 * the `--time-unit` that would make it plausible. Silent for a unit the tool
 * cannot convert (a custom label).
 *
 * @example
 * // 50 m in 2 kyr is 25,000 m/Myr: beyond the plausible range, and plausible if the ages were in Myr.
 * const warnings = new WarningLog();
 * warnImplausibleRates(readAgeModel(readTable('height,age\n0,10\n50,8\n', 'ties.csv')), timeUnit('kyr'), warnings);
 * warnings.list()[0].message.endsWith('if the ages are in Myr, give --time-unit Ma'); // true
 */
export function warnImplausibleRates(model: AgeModel, unit: { label: string; years: number | null }, warnings: Pick<WarningLog, 'add'>): void {
  if (unit.years === null) return;
  const perMyr = (rate: number, years: number): number => rate / (years / 1e6);
  const inRange = (value: number): boolean => value >= plausibleSedimentationRate.lowest && value <= plausibleSedimentationRate.highest;
  for (const [section, ties] of model.sections) {
    const rates = sedimentationRates(ties).map((segment) => segment.rate).sort((a, b) => a - b);
    if (rates.length === 0) continue;
    const median = rates[Math.floor((rates.length - 1) / 2)];
    if (inRange(perMyr(median, unit.years))) continue;
    const better = plausibleUnit(unit.years, (years) => inRange(perMyr(median, years)));
    const where = section === '' ? `the ties of ${model.file}` : `section "${section}" of ${model.file}`;
    warnings.add(
      'time-axis',
      `${where}: median sedimentation rate ${Number(median.toPrecision(3))} m per ${unit.label} (${Number(perMyr(median, unit.years).toPrecision(3))} m/Myr) lies outside the plausible ${plausibleSedimentationRate.lowest} to ${plausibleSedimentationRate.highest} m/Myr; ${better ? `if the ages are in ${better.label}, give --time-unit ${better.option}` : 'check the ages and positions of the ties'}`,
    );
  }
}
