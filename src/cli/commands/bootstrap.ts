import type { Command } from 'commander';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/** Define `stratotrend bootstrap`; the action loads the simulation code only when run. */
export function defineBootstrapCommand(program: Command): void {
  addAgeModelOptions(addSampleOptions(
    program
      .command('bootstrap')
      .description('parametric-bootstrap tests for every lineage: directional vs random walk (likelihood ratio, with its chi-square p-value beside) and random walk vs stasis (AICc difference); --models adds newer models against the models they nest')
      .argument('<file>', 'samples CSV (as for fit)'),
    { traitUnit: false },
  ), { draws: false })
    .option('--replicates <R>', 'replicates drawn from each fitted null model', '200')
    .option('--seed <s>', 'seed (same seed, same results on any number of threads)', '1')
    .option('--threads <k>', 'worker threads (default: every core)')
    .option('--models <ids>', 'also test newer models against the classic model each nests, by the same likelihood-ratio bootstrap (ids separated by commas): accelerating-walk (rate_change = 0: random-walk), moving-optimum (optimum_drift = 0: ou), optimum-shift (equal optima: ou; shift position searched in every replicate)')
    .option('--json', 'print one JSON document instead of the text')
    .option('--quiet', 'no text and no progress bar')
    .action(async (file: string, options) => {
      const { bootstrapCommand } = await import('../bootstrap-command.js');
      await bootstrapCommand(file, options);
    });
}
