import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { modelSetLine, resolveModels } from '../../src/analyses/model-selection.js';
import { allModels, classicModels, findModel, modelSets } from '../../src/models/registry.js';

// `--models` is resolved once per run (issue 22); the expected sets are the
// ones the README documents under "Model sets".
describe('--models', () => {
  it('classic is the default and holds the five classic models', () => {
    const selection = resolveModels(undefined);
    expect(selection.name).toBe('classic');
    expect(selection.models.map((model) => model.id)).toEqual(['strict-stasis', 'stasis', 'random-walk', 'directional-walk', 'ou']);
    expect(modelSetLine(selection)).toBe('Model set: classic (the five classic models)\n');
  });

  it('a list of ids is a custom set, spaces and empty items ignored', () => {
    const selection = resolveModels(' random-walk, ,ou ');
    expect(selection.name).toBe('custom');
    expect(selection.models.map((model) => model.id)).toEqual(['random-walk', 'ou']);
    expect(modelSetLine(selection)).toBe('Model set: custom (random-walk, ou)\n');
  });

  it('an unknown id or an empty list is a usage error naming the option', () => {
    expect(() => resolveModels('random-walk,no-such-model')).toThrow(InputError);
    expect(() => resolveModels('random-walk,no-such-model')).toThrow(/--models: unknown model "no-such-model"/);
    expect(() => resolveModels(' , ')).toThrow(/--models: no model named/);
  });

  it('a selection already resolved passes through unchanged (the report hands fit\'s to compare)', () => {
    const selection = resolveModels('extended');
    expect(resolveModels(selection)).toBe(selection);
  });
});

// The registry's extended set (was test/models/extended-set.test.ts; one file fewer to load, issue 22).
describe('the extended model set', () => {
  it('is the classic five plus 4 punctuated, 6 mode-shift, 2 covariate and 3 changing-landscape models (issue 16), each found by id', () => {
    const extended = modelSets.extended();
    expect(extended.slice(0, 5)).toEqual([...classicModels]);
    expect(extended.length).toBe(5 + 4 + 6 + 2 + 3);
    expect(new Set(extended.map((model) => model.id)).size).toBe(extended.length);
    for (const model of extended) expect(findModel(model.id)).toBe(model);
    // One registry (issue 22): allModels() lists every model, classic and extended, in table order.
    expect(allModels().map((model) => model.id)).toEqual(extended.map((model) => model.id));
  });
});
