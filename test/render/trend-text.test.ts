import { describe, expect, it } from 'vitest';
import type { LineageFit } from '../../src/fit/fit-lineage.js';
import { lineageFromArrays } from '../../src/lineage.js';
import { formatPValue, trendText, weakOuWin } from '../../src/render/trend-text.js';
import type { TrendTest } from '../../src/trend/trend-test.js';

// The trend verdict's sentences (issue 15) from hand-made results: which lines appear when.
const lineage = lineageFromArrays({ time: [0, 1, 2, 3, 4, 5], mean: [1, 2, 1, 2, 3, 2], samplingVariance: [0.1, 0.1, 0.1, 0.1, 0.1, 0.1] });
const estimate = (value: number | null, upper: number | null = value) => ({ estimate: value, lower: value, upper, atBound: null, lowerAtBound: false, upperAtBound: upper === null });
const fitWith = (best: string, halfLife: number, optimumOpen: boolean): LineageFit => ({
  lineage,
  best,
  smoothed: null,
  models: [{ id: 'ou', parameters: { optimum: estimate(3, optimumOpen ? null : 4) }, derived: { half_life: estimate(halfLife) } }],
} as unknown as LineageFit);
const test = (p: number, supported: boolean): TrendTest => ({
  method: 'm', statistic: 1, p_value: p, level: 0.05, supported, direction: supported ? 'increase' : null, replicates: 40, seed: 1,
  aicc_false_trend_rate: 0.2, aicc_ou_rate: 0.15, rate_replicates: 99, null_model: 'random-walk', p_by_null: {}, note: null,
});

describe('trend sentences', () => {
  it('p-values print with two significant digits, "< 0.001" below', () => {
    expect(formatPValue(0.01234)).toBe('= 0.012');
    expect(formatPValue(0.0004)).toBe('< 0.001');
  });
  it('ou first with a half-life beyond the span (5 time units) or an open optimum: the warning with the design\'s rate', () => {
    expect(weakOuWin(fitWith('ou', 8, false))).toMatch(/half-life \(8 Myr\) exceeds the span of the sequence \(5 Myr\)/);
    expect(weakOuWin(fitWith('ou', 2, true))).toMatch(/optimum's 95% interval is open/);
    expect(weakOuWin(fitWith('ou', 2, false))).toBeNull();
    const lines = trendText(fitWith('ou', 8, false), test(0.3, false));
    expect(lines[1]).toMatch(/ou often wins on short unbiased walks; on this design AICc picks ou in 15% of sequences/);
  });
  it('directional walk first without support: the AICc false-trend rate; supported: the caution', () => {
    expect(trendText(fitWith('directional-walk', 2, false), test(0.2, false))[1]).toMatch(/AICc alone picks the directional walk in 20% of sequences/);
    const supported = trendText(fitWith('directional-walk', 2, false), test(0.01, true));
    expect(supported[0]).toMatch(/a directional trend \(increase\) is supported at the 5% level/);
    expect(supported[1]).toMatch(/says nothing about selection versus drift/);
  });
});
