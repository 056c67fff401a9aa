import { describe, expect, it } from 'vitest';
import { runFitStreamed } from '../../src/analyses/fit-run.js';
import { checkFitDocument } from '../../src/data/documents.js';
import { modelsCsv } from '../../src/render/models-csv.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';
import { join } from 'node:path';

// Issue 15: every fit carries a trend verdict; --no-trend-test, --trend-level and --seed steer it.
const sample = join(root, 'sample-data', 'shell-length.csv');

describe('fit with the trend test', () => {
  it('puts trend_test with the issue\'s fields into fit.json, models.csv and the text, and fit.json still passes its check', async () => {
    const run = await runFitStreamed(sample, { intervals: false, quiet: true, threads: 1, trendLevel: '0.1', seed: '5' });
    const lineages = run.document.lineages as { trend_test: Record<string, unknown> }[];
    for (const lineage of lineages) {
      const test = lineage.trend_test;
      for (const key of ['method', 'statistic', 'p_value', 'level', 'supported', 'direction', 'replicates', 'seed', 'aicc_false_trend_rate']) expect(test).toHaveProperty(key);
      expect(test.level).toBe(0.1);
      expect(test.seed).toBe(5);
      // supported is p_value < level (the definition).
      expect(test.supported).toBe((test.p_value as number) < 0.1);
    }
    expect(() => checkFitDocument(JSON.parse(JSON.stringify(run.document)), 'fit.json')).not.toThrow();
    const csv = modelsCsv(run.fits, run.trends);
    const header = csv.split('\n')[0].split(',');
    expect(header.slice(-8)).toEqual(['trend_statistic', 'trend_p_value', 'trend_level', 'trend_supported', 'trend_direction', 'trend_replicates', 'trend_seed', 'trend_aicc_false_trend_rate']);
  }, 120_000);

  // Command lines in the test process (runCliHere, issue 22): the checks read the exit code and the output.
  it('--no-trend-test leaves it out; a bad --trend-level is a usage error', async () => {
    const skipped = await runCliHere(['fit', sample, '--no-intervals', '--no-trend-test', '--json'], root);
    expect(skipped.status).toBe(0);
    expect(JSON.parse(skipped.stdout).lineages[0].trend_test).toBeUndefined();
    const bad = await runCliHere(['fit', sample, '--no-intervals', '--trend-level', '5'], root);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/--trend-level must be a number between 0 and 1, e\.g\. 0\.05, got "5"/);
  }, 120_000);
});
