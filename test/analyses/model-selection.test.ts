import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { modelSetLine, resolveModels } from '../../src/analyses/model-selection.js';

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
