import type { EvolutionModel } from '../models/model.js';
import { findModel, modelSets } from '../models/registry.js';
import { usageError } from '../data/errors.js';

/** What `--models` asked for, resolved once per run: the set's name and its models. */
export interface ModelSelection {
  /** The option's text as given ("classic", "extended", "random-walk,ou"). */
  readonly request: string;
  /** The set's name, or "custom" for a list of ids (what fit.json and compare.json record as `models`). */
  readonly name: string;
  readonly models: readonly EvolutionModel[];
}

/** `--models` as commands receive it: the text from the command line, or a selection already resolved by the caller (the report resolves once for fit, compare and power). */
export type ModelsOption = string | ModelSelection;

/**
 * Resolve `--models` (default "classic"): a named set of `modelSets` or a
 * comma-separated list of model ids from the registry. A selection already
 * resolved is returned as it is, so a run resolves the text once at its
 * entry and hands the result on.
 *
 * @throws InputError (usage) naming an unknown id, or when no model is named
 *
 * @example
 * resolveModels('random-walk, ou').models.map((model) => model.id); // ['random-walk', 'ou']
 * resolveModels('random-walk, ou').name; // 'custom'
 * resolveModels(undefined).name; // 'classic'
 * resolveModels('random-walk,brownian');
 * // throws: --models: unknown model "brownian"
 */
export function resolveModels(option: ModelsOption | undefined): ModelSelection {
  if (typeof option === 'object') return option;
  const request = option ?? 'classic';
  const set = modelSets[request];
  if (set) return { request, name: request, models: set() };
  const ids = request.split(',').map((id) => id.trim()).filter((id) => id !== '');
  const models = ids.map((id) => {
    const model = findModel(id);
    if (!model) throw usageError(`--models: unknown model "${id}"; use a set (${Object.keys(modelSets).join(', ')}) or model ids`);
    return model;
  });
  if (models.length === 0) throw usageError('--models: no model named');
  return { request, name: 'custom', models };
}

/**
 * The line naming the model set above `fit`'s tables.
 *
 * @example
 * modelSetLine(resolveModels('classic')); // 'Model set: classic (the five classic models)\n'
 */
export function modelSetLine(selection: ModelSelection): string {
  const words: Record<string, string> = {
    classic: 'the five classic models',
    extended: 'classic plus shift, mode-shift, covariate and changing-landscape models the data allow',
  };
  return `Model set: ${selection.name} (${words[selection.name] ?? selection.models.map((model) => model.id).join(', ')})\n`;
}
