import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

// power --models (issue 16): the models refitted to every replicate can include the newer
// models; the trend is still judged between the random walk and the directional walk, so
// a set without them is refused before any simulation.

const samples = join(root, 'sample-data', 'shell-length.csv');

describe('power --models', () => {
  // Command lines in the test process (runCliHere, issue 22): what is checked is the exit code and the output, not the process.
  it('refuses a set without random-walk and directional-walk (exit 2, naming the option)', async () => {
    const run = await runCliHere(['power', samples, '--models', 'ou,accelerating-walk', '--replicates', '20'], root);
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/--models must include random-walk and directional-walk/);
  });
  it('fits the newer models to every replicate when asked: with the same seeded replicates, one more competitor never makes the directional walk best more often', async () => {
    const power = async (models: string) => {
      const run = await runCliHere(['power', samples, '--models', models, '--replicates', '20', '--drifts', '0.3', '--step-variance', '0.05', '--no-coverage', '--threads', '1', '--json', '--quiet'], root);
      expect(run.status, run.stderr).toBe(0);
      return JSON.parse(run.stdout).grid.find((point: { drift: number }) => point.drift === 0.3).p_best as number;
    };
    // Ranking by AICc (common practice): adding a model to the set can only take the first place away from another.
    const walks = await power('random-walk,directional-walk');
    expect(await power('random-walk,directional-walk,accelerating-walk')).toBeLessThanOrEqual(walks);
  });
});
