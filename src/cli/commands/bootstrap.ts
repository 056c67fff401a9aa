import type { Command } from 'commander';
import { allModels } from '../../models/registry.js';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/** The `--models` choices as the models declare them (`EvolutionModel.nests`): "id (restriction: nested id)". */
function nestingChoices(): string {
  return allModels().flatMap((model) => (model.nests ? [`${model.id} (${model.nests.condition}: ${model.nests.model})`] : [])).join(', ');
}

/**
 * Define `stratotrend bootstrap`; the action loads the simulation code only when run.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * defineBootstrapCommand(program);
 * program.commands.map((command) => command.name()); // ['bootstrap']
 */
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
    .option('--threads <k>', 'threads: this one and k − 1 workers (default: every core)')
    .option('--models <ids>', `also test newer models against the classic model each nests, by the same likelihood-ratio bootstrap, chi-square(1) p beside (ids separated by commas; a shift position is searched in every replicate; where a simulation measured a test rejecting too often — moving-optimum under 50 horizons, optimum-shift on any length and its chi-square p — the output says so): ${nestingChoices()}`)
    .option('--min-segment <n>', 'with --models optimum-shift: fewest horizons in a segment, in the observed fit and every replicate, as for fit (default 5; at least 3)')
    .option('--json', 'print one JSON document instead of the text')
    .option('--quiet', 'no text and no progress bar')
    .action(async (file: string, options) => {
      const { bootstrapCommand } = await import('../bootstrap-command.js');
      await bootstrapCommand(file, options);
    });
}
