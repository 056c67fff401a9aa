import { describe, expect, it } from 'vitest';
import { aicc, akaikeWeights, lowestCriterion } from '../../src/fit/model-choice.js';

// AICc = -2 logL + 2K + 2K(K+1)/(N-K-1) (Hurvich & Tsai 1989, Biometrika
// 76:297) and Akaike weights (Burnham & Anderson 2002), on numbers worked by
// hand below.
describe('AICc and Akaike weights on hand-computed numbers', () => {
  it('AICc for logL = -10, K = 2, N = 10 is 20 + 4 + 12/7', () => {
    expect(aicc(-10, 2, 10)).toBeCloseTo(24 + 12 / 7, 12);
  });
  it('AICc for logL = 3.5, K = 4, N = 20 is -7 + 8 + 40/15', () => {
    expect(aicc(3.5, 4, 20)).toBeCloseTo(-7 + 8 + 40 / 15, 12);
  });
  it('AICc is not defined (null) when N - K - 1 <= 0', () => {
    expect(aicc(-1, 4, 5)).toBeNull();
    expect(aicc(-1, 4, 6)).not.toBeNull();
  });
  it('weights: AICc 10 and 12 give 1/(1 + e^-1) and e^-1/(1 + e^-1); a model not compared gets null', () => {
    const { delta, weight } = akaikeWeights([10, 12, null]);
    expect(delta).toEqual([0, 2, null]);
    expect(weight[0]).toBeCloseTo(1 / (1 + Math.exp(-1)), 14);
    expect(weight[1]).toBeCloseTo(Math.exp(-1) / (1 + Math.exp(-1)), 14);
    expect(weight[2]).toBeNull();
  });
  it('three equal AICc values share the weight equally', () => {
    const { weight } = akaikeWeights([5, 5, 5]);
    for (const value of weight) expect(value).toBeCloseTo(1 / 3, 14);
  });
});

describe('the best-supported candidate', () => {
  // Common practice: the lowest AICc is best; not-compared candidates (null) never are; on an exact tie the first listed is taken (and compare names the tie separately).
  it('lowest AICc, nulls skipped, first of an exact tie, -1 when none is compared', () => {
    expect(lowestCriterion([12, 10, null, 10])).toBe(1);
    expect(lowestCriterion([null, 25.7, 24.1])).toBe(2);
    expect(lowestCriterion([null, null])).toBe(-1);
    expect(lowestCriterion([])).toBe(-1);
  });
});
