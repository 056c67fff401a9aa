import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { runPower } from '../../src/analyses/power-run.js';
import { parseParameters, simulateCommand } from '../../src/cli/simulate-command.js';

// The command edges: options in, files and documents out. The statistics
// behind them are tested in the other files of this folder.
describe('simulate and power commands', () => {
  const folder = mkdtempSync(join(tmpdir(), 'stratotrend-simulate-'));
  const file = join(folder, 'sim.csv');

  it('simulate writes a file that power reads, and the same seed writes the same bytes', async () => {
    const options = { parameters: 'ancestral_mean=5,drift=0.3,step_variance=0.02', horizons: '14', spacing: '0.25', n: '12', withinVariance: '0.3', seed: '9', out: file };
    await simulateCommand(undefined, options);
    const first = readFileSync(file, 'utf8');
    await simulateCommand(undefined, options);
    expect(readFileSync(file, 'utf8')).toBe(first);
    expect(first.split('\n')[0]).toBe('section,trait,time,n,mean,sd');
    const run = await runPower(file, { replicates: '20', drifts: '0,0.5', coverage: false, threads: '1', seed: '3' });
    const document = run.document as { grid: { drift: number; p_best: number; p_weight: number; p_lrt: number }[]; false_trend: unknown };
    expect(document.grid.map((point) => point.drift)).toEqual([0, 0.5]);
    for (const point of document.grid) {
      for (const key of ['p_best', 'p_weight', 'p_lrt'] as const) {
        expect(point[key]).toBeGreaterThanOrEqual(0);
        expect(point[key]).toBeLessThanOrEqual(1);
      }
    }
    expect(document.false_trend).toEqual({ p_best: document.grid[0].p_best, p_weight: document.grid[0].p_weight, p_lrt: document.grid[0].p_lrt });
  });

  it('refuses unknown parameter names and missing parameters with usage errors', async () => {
    expect(() => parseParameters('drift=1,speed=2', ['ancestral_mean', 'drift', 'step_variance'])).toThrow(InputError);
    await expect(simulateCommand(undefined, { parameters: 'drift=1' })).rejects.toThrow(/give ancestral_mean, step_variance/);
  });
});
