import { directionalWalk } from './directional-walk.js';
import { extensionModels } from './extensions.js';
import type { EvolutionModel } from './model.js';
import { ornsteinUhlenbeck } from './ou.js';
import { randomWalk } from './random-walk.js';
import { stasis } from './stasis.js';
import { strictStasis } from './strict-stasis.js';

/** The five models of MODELS.md, in the order tables list them. */
export const classicModels: readonly EvolutionModel[] = [strictStasis, stasis, randomWalk, directionalWalk, ornsteinUhlenbeck];

/**
 * The classic five plus punctuated, mode-shift and covariate-tracking models
 * (issue 5). A command leaves out the models a lineage does not allow
 * (`EvolutionModel.unavailable`, e.g. no covariate).
 */
export const extendedModels: readonly EvolutionModel[] = [...classicModels, ...extensionModels];

/** Every model by id: the classic and extended ones, and any registered later. */
const registry = new Map<string, EvolutionModel>(extendedModels.map((model) => [model.id, model]));

/** Named model sets for `--models`. */
export const modelSets: Record<string, () => readonly EvolutionModel[]> = {
  classic: () => classicModels,
  extended: () => extendedModels,
};

/**
 * Register a model (extended models call this from their registry module).
 *
 * @example
 * registerModel(randomWalk); // undefined (registering a model again under its id changes nothing)
 * findModel('random-walk') === randomWalk; // true
 */
export function registerModel(model: EvolutionModel): void {
  registry.set(model.id, model);
}

/**
 * A model by id, or undefined.
 *
 * @example
 * findModel('directional-walk') === directionalWalk; // true
 * findModel('no-such-model'); // undefined
 */
export function findModel(id: string): EvolutionModel | undefined {
  return registry.get(id);
}

/**
 * Every model, classic and extended, in table order.
 *
 * @example
 * allModels().slice(0, 5).map((model) => model.id); // ['strict-stasis', 'stasis', 'random-walk', 'directional-walk', 'ou'] (the classic five first)
 */
export function allModels(): EvolutionModel[] {
  return [...registry.values()];
}
