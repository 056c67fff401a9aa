import { describe, expect, it } from 'vitest';
import { allModels, classicModels, findModel, modelSets } from '../../src/models/registry.js';

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
