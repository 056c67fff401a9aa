import type { Command } from 'commander';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend simulate`; the action loads the simulation code only when run.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * defineSimulateCommand(program);
 * program.commands.map((command) => command.name()); // ['simulate']
 */
export function defineSimulateCommand(program: Command): void {
  addAgeModelOptions(addSampleOptions(
    program
      .command('simulate')
      .description('draw lineages from a model with given parameters, on the design of a samples file or of the design options, and write them as a samples CSV')
      .argument('[file]', 'samples CSV whose design (times, n, within-horizon variances) is used; parameters not given are fitted to it'),
    { traitUnit: false },
  ), { draws: false })
    .option('--model <id>', 'generating model: any model id of "stratotrend fit --help", e.g. random-walk, ou or accelerating-walk (a shift model takes its shift position from the fit to FILE); or a joint model of "stratotrend joint" (e.g. correlated-random-walk: needs a FILE with two or more traits per section, writes summary rows)', 'directional-walk')
    .option('--parameters <list>', 'parameter values, e.g. "ancestral_mean=5,drift=0.2,step_variance=0.01" (names as in the fit JSON); for a joint model entries by trait number, e.g. "step_correlation[1][2]=0.8,ancestral_mean[2]=18" (names as in joint.json)')
    .option('--horizons <N>', 'design without a file: number of horizons (default 25)')
    .option('--spacing <dt>', 'design without a file: time between horizons (default 0.1)')
    .option('--n <n>', 'design without a file: specimens per horizon (default 20)')
    .option('--within-variance <v>', 'design without a file: within-horizon variance of the trait (default 1)')
    .option('--replicates <R>', 'number of simulated data sets (each lineage of each replicate becomes its own section)', '1')
    .option('--seed <s>', 'seed: the same seed gives byte-identical output', '1')
    .option('--form <form>', 'summary (n, mean, sd per horizon) or specimen (one value per specimen)', 'summary')
    .option('--out <file>', 'write the CSV here instead of stdout')
    .action(async (file: string | undefined, options) => {
      const { simulateCommand } = await import('../simulate-command.js');
      await simulateCommand(file, options);
    });
}
