import { InvalidArgumentError, type Command } from 'commander';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend joint`: several traits of one lineage fitted
 * together. The action imports the fitting code only when the command runs.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * defineJointCommand(program);
 * program.commands.map((command) => command.name()); // ['joint']
 */
export function defineJointCommand(program: Command): void {
  addAgeModelOptions(addSampleOptions(
    program
      .command('joint')
      .description('fit models of several traits evolving together (correlated or independent walks, stasis, Ornstein–Uhlenbeck) to every section with two or more traits, ranked by AICc')
      .argument('<file>', 'samples CSV with a trait column (summary rows: n, mean, sd or var; specimen rows: value, and a "specimen" column to estimate the covariance between traits); "-" reads stdin'),
  ), { draws: false })
    .option('--traits <names>', 'comma-separated traits to fit together, in this set (default: every trait of the file); file order is kept')
    .option('--models <ids>', 'all, or a comma-separated list of joint model ids (see below)', 'all')
    .option('--json', 'print one JSON document to stdout instead of the tables')
    .option('--out <folder>', 'write joint.json, joint-models.csv and the figures into this folder (created if needed)')
    .option('--no-figures', 'with --out, write no figures (by default each section gets a panels figure and one trait-against-trait trajectory per pair of traits)')
    .option('--quiet', 'print nothing but errors and warnings')
    .option('--no-intervals', 'skip the 95% profile-likelihood intervals (faster; with them, the correlated walks\' measured coverage below 95% is said in a warning)')
    .option('--threads <count>', 'threads, one model per task: this one and count − 1 workers (1 = no workers; default: every core when intervals are computed, else 1); results do not depend on it', parseThreads)
    .addHelpText('after', `
Joint models (k traits; t from the section's oldest horizon; R the step covariance per time unit):
  independent-random-walks       each trait an unbiased random walk, R diagonal (K = 2k)
  correlated-random-walk         one multivariate random walk, R full (K = k + k(k+1)/2)
  independent-directional-walks  walks with a drift per trait, R diagonal (K = 3k)
  correlated-directional-walk    walks with a drift per trait, R full (K = 2k + k(k+1)/2)
  independent-stasis             independent N(theta, Sigma) per horizon, Sigma diagonal (K = 2k)
  correlated-stasis              the same with Sigma full (K = k + k(k+1)/2)
  independent-ou                 Ornstein–Uhlenbeck per trait (own alpha, optimum), R diagonal (K = 4k)
  correlated-ou                  the same with R full (K = 3k + k(k+1)/2)
AICc uses N = the number of observed trait values. A trait missing at a horizon is left out there
(nothing is imputed). Summary rows give no covariance between traits within a horizon: it is taken
as 0 ("sampling_covariance": "diagonal"). Specimen rows with a "specimen" column (one row per
specimen and trait) give it ("estimated").`)
    .action(async (file: string, options) => {
      const { jointCommand } = await import('../joint-command.js');
      await jointCommand(file, options);
    });
}

function parseThreads(value: string): number {
  const count = Number(value);
  if (!Number.isInteger(count) || count < 1 || count > 256) throw new InvalidArgumentError(`--threads must be a whole number from 1 to 256, got "${value}"`);
  return count;
}
