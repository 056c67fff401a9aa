import { InputError } from '../data/errors.js';
import { readTable } from '../data/read-table.js';
import { readSamples } from '../data/samples.js';
import { WarningLog } from '../data/warnings.js';
import { fitJointModelsOnPool } from '../joint/fit-joint-pool.js';
import { jointGroups, readSpecimens, type JointGroup } from '../joint/joint-groups.js';
import { jointModel, jointModels, type JointModel } from '../joint/joint-models.js';
import type { Lineage } from '../lineage.js';
import { jointDocument, type JointGroupFit } from '../render/joint-output.js';
import type { AgeModelOptions } from './age-model-options.js';
import { delimiterOption, lineagesOf, readInput, type SampleFileOptions } from './input.js';
import { toolVersion } from '../io/version.js';
import { jointCoverageNote, stepCovarianceAtBoundary } from '../render/measured-cautions.js';

/** Options of `stratotrend joint`. */
export interface JointOptions extends SampleFileOptions, AgeModelOptions {
  /** Comma-separated trait names to fit together (default: every trait). */
  traits?: string;
  /** "all" (default) or a comma-separated list of joint model ids. */
  models?: string;
  /** false for --no-intervals. */
  intervals?: boolean;
  /** Worker threads, one joint model per task (1 = this thread); default every core with intervals, 1 without. */
  threads?: number;
}

/** Everything `joint` computed, before it is printed or written. */
export interface JointRun {
  readonly fits: JointGroupFit[];
  readonly document: Record<string, unknown>;
  readonly warnings: WarningLog;
}

/**
 * The `--models` value of `joint` as models: "all" (default) or ids
 * separated by commas.
 *
 * @throws InputError (usage) naming an unknown id and the known ones.
 *
 * @example
 * jointModelsOption(undefined).length; // 8 (all)
 * jointModelsOption('correlated-ou, independent-ou').map((model) => model.id); // ['correlated-ou', 'independent-ou']
 * jointModelsOption('ou');
 * // throws: --models: unknown joint model "ou"
 */
export function jointModelsOption(value: string | undefined): JointModel[] {
  if (value === undefined || value.trim() === '' || value.trim() === 'all') return [...jointModels];
  return value.split(',').map((id) => id.trim()).filter((id) => id !== '').map((id) => {
    const model = jointModel(id);
    if (!model) throw new InputError(`--models: unknown joint model "${id}"; the joint models are ${jointModels.map((entry) => entry.id).join(', ')} (or "all")`, { kind: 'usage' });
    return model;
  });
}

/** Keep the lineages of the traits named by `--traits` (every trait when absent), in file order. */
function selectTraits(lineages: readonly Lineage[], traits: string | undefined, file: string): Lineage[] {
  if (traits === undefined) return [...lineages];
  const wanted = traits.split(',').map((name) => name.trim().normalize('NFC')).filter((name) => name !== '');
  const known = [...new Set(lineages.map((lineage) => lineage.trait))];
  for (const name of wanted) {
    if (!known.includes(name)) throw new InputError(`--traits: no trait "${name}" in ${file}; its traits are ${known.map((trait) => `"${trait}"`).join(', ')}`, { kind: 'usage' });
  }
  if (wanted.length < 2) throw new InputError(`--traits must name two or more traits, got "${traits}"`, { kind: 'usage' });
  return lineages.filter((lineage) => wanted.includes(lineage.trait));
}

/**
 * Read the file, group its traits by section and fit the joint models to
 * every group (no output). Summary rows give a diagonal sampling
 * covariance; specimen rows with a `specimen` column an estimated one.
 *
 * @example
 * const run = await runJoint('sample-data/shell-shape.csv', { models: 'independent-random-walks', intervals: false });
 * run.fits[0].group.traits; // ['shell length', 'shell width']
 * run.fits[0].best; // 'independent-random-walks'
 */
export async function runJoint(file: string, options: JointOptions): Promise<JointRun> {
  const models = jointModelsOption(options.models);
  const { input, groups, warnings, age } = await loadJointGroups(file, options);
  const intervals = options.intervals !== false;
  // Intervals are the slow part: then every core by default (one model per task); without them one thread.
  const threads = options.threads ?? (intervals ? undefined : 1);
  const fits: JointGroupFit[] = [];
  for (const group of groups) fits.push(await fitGroup(group, models, warnings, intervals, threads));
  const provenance = {
    tool: 'stratotrend',
    version: toolVersion(),
    inputs: [{ file: input.name, sha256: input.sha256 }, ...(age ? [{ file: age.input.name, sha256: age.input.sha256 }] : [])],
    options: {
      command: 'joint',
      log: options.log === true,
      pool: options.pool === true,
      time_unit: options.timeUnit ?? 'Myr',
      trait_unit: options.traitUnit === undefined ? null : options.traitUnit,
      traits: options.traits ?? null,
      models: models.map((model) => model.id),
      intervals: intervals ? 'profile' : 'none',
      likelihood: 'exact (joint) with known sampling covariances, vector Kalman filter',
      criterion: 'AICc (N = observed trait values)',
      ...(options.ageModel ? { age_model: options.ageModel, extrapolate: options.extrapolate === true } : {}),
    },
  };
  return { fits, document: jointDocument(fits, provenance, warnings.list()), warnings };
}

/**
 * Read a samples file and group its traits by section (no fitting): the
 * input record, the groups, the warnings raised and the age model.
 *
 * @example
 * const { groups } = await loadJointGroups('sample-data/shell-shape.csv', {});
 * groups.map((group) => group.traits); // [['shell length', 'shell width']]
 * groups[0].data.time.length; // 24
 */
export async function loadJointGroups(file: string, options: JointOptions): Promise<{ input: { name: string; sha256: string }; groups: JointGroup[]; warnings: WarningLog; age: { input: { name: string; sha256: string } } | null }> {
  const warnings = new WarningLog();
  const input = readInput(file);
  const table = readTable(input.text, input.name, { delimiter: delimiterOption(options.delimiter) });
  const samples = readSamples(table, { log: options.log, decimalComma: options.decimalComma });
  const { ageModelHook } = await import('./age-model-options.js');
  const { extra, age } = ageModelHook(file, options, samples.timeKind, warnings);
  const lineages = selectTraits(lineagesOf(samples, options, warnings, extra), options.traits, input.name);
  const specimens = readSpecimens(table, samples, { log: options.log, decimalComma: options.decimalComma });
  return { input: { name: input.name, sha256: input.sha256 }, groups: jointGroups(lineages, input.name, warnings, specimens), warnings, age };
}

async function fitGroup(group: JointGroup, models: readonly JointModel[], warnings: WarningLog, intervals: boolean, threads: number | undefined): Promise<JointGroupFit> {
  const { models: ranked, best } = await fitJointModelsOnPool(models, group.data, { intervals, threads });
  const name = group.section === '' ? group.traits.join(' + ') : `${group.section} (${group.traits.join(' + ')})`;
  for (const model of ranked) {
    for (const flag of model.flags) warnings.add('at-bound', `${name}, ${model.id}: ${flag}`);
    if (model.notCompared) warnings.add('not-compared', `${name}, ${model.id}: ${model.notCompared}`);
  }
  // Measured shortfall of the printed intervals: one folded line per model and run, and one per group where the fit is at the boundary.
  for (const model of ranked) {
    if (!model.intervals) continue;
    const atBoundary = stepCovarianceAtBoundary(model.flags);
    const note = jointCoverageNote(model.id, atBoundary);
    if (note !== null) warnings.add('interval-coverage', atBoundary ? `${name}, ${note}` : note);
  }
  return { group, models: ranked, best };
}
