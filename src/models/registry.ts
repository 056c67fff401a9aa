import { directionalWalk } from './directional-walk.js';
import type { EvolutionModel } from './model.js';
import { ornsteinUhlenbeck } from './ou.js';
import { randomWalk } from './random-walk.js';
import { stasis } from './stasis.js';
import { strictStasis } from './strict-stasis.js';

/** The five models of MODELS.md, in the order tables list them. */
export const classicModels: readonly EvolutionModel[] = [strictStasis, stasis, randomWalk, directionalWalk, ornsteinUhlenbeck];

const registry = new Map<string, EvolutionModel>(classicModels.map((model) => [model.id, model]));

/** Named model sets for `--models`. */
export const modelSets: Record<string, () => readonly EvolutionModel[]> = {
  classic: () => classicModels,
};

/** Register a model (extended models call this from their registry module). */
export function registerModel(model: EvolutionModel): void {
  registry.set(model.id, model);
}

/** A model by id, or undefined. */
export function findModel(id: string): EvolutionModel | undefined {
  return registry.get(id);
}

/** Every registered model. */
export function allModels(): EvolutionModel[] {
  return [...registry.values()];
}
