import { InvalidArgumentError, type Command } from 'commander';
import { addAgeModelOptions } from './compare.js';
import { addSampleOptions } from './shared.js';

/**
 * Define `stratotrend fit`. The action imports the fitting code only when
 * the command runs, so defining commands stays cheap.
 */
export function defineFitCommand(program: Command): void {
  addAgeModelOptions(addSampleOptions(
    program
      .command('fit')
      .description('fit every model to every lineage (section × trait) of a samples CSV and rank them by AICc')
      .argument('<file>', 'samples CSV (summary form: n, mean, sd or var per horizon; specimen form: value per specimen); "-" reads stdin'),
  ))
    .option('--json', 'print one JSON document to stdout instead of the table')
    .option('--out <folder>', 'write models.csv and fit.json into this folder (created if needed)')
    .option('--models <set>', 'model set: "classic" (the five models) or a comma-separated list of model ids', 'classic')
    .option('--no-intervals', 'skip the profile-likelihood intervals (faster)')
    .option('--intervals <method>', 'how the 95% intervals are made: integrated (default: integrated likelihood, best calibrated; ou and shift models use adjusted), adjusted (restricted profile likelihood), profile (plain profile likelihood, asymptotic) or bootstrap (profile with a parametric-bootstrap cut-off, slower)')
    .option('--quiet', 'print nothing but errors and warnings')
    .option('--report <file>', 'also write one self-contained HTML report (as "stratotrend report" does)')
    .option('--summary', 'print the cross-lineage summary (wins per model, Akaike weights, drift) instead of one table per lineage; adds "compilation" to the JSON and compilation.png with --out')
    .option('--threads <count>', 'worker threads for many lineages (1 = no workers; default: every core when there are enough lineages to pay off)', parseThreads)
    .addHelpText('after', modelHelp())
    .action(async (file: string, options) => {
      const { fitCommand } = await import('../fit-command.js');
      await fitCommand(file, options);
    });
}

function parseThreads(value: string): number {
  const count = Number(value);
  if (!Number.isInteger(count) || count < 1 || count > 256) throw new InvalidArgumentError(`--threads must be a whole number from 1 to 256, got "${value}"`);
  return count;
}

function modelHelp(): string {
  return `
Models (ids as in --models and the JSON):
  strict-stasis     no change: horizon means differ from stasis_mean by sampling error only (K = 1)
  stasis            independent fluctuation about stasis_mean with stasis_variance (K = 2)
  random-walk       unbiased random walk from ancestral_mean with step_variance per time unit (K = 2)
  directional-walk  random walk with drift per time unit (K = 3)
  ou                Ornstein–Uhlenbeck approach from ancestral_mean to optimum at rate alpha (K = 4)

Input columns (names case-insensitive): section, trait (optional); one of age (before present,
older = larger), time (elapsed); n, mean, and sd or var (summary form) or value (specimen form).`;
}
