import { InvalidArgumentError, type Command } from 'commander';
import { addFigureOptions } from './render.js';
import { addAgeModelOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend fit`. The action imports the fitting code only when
 * the command runs, so defining commands stays cheap.
 */
export function defineFitCommand(program: Command): void {
  addFigureOptions(addAgeModelOptions(addSampleOptions(
    program
      .command('fit')
      .description('fit every model to every lineage (section × trait) of a samples CSV and rank them by AICc')
      .argument('<file>', 'samples CSV (summary form: n, mean, sd or var per horizon; specimen form: value per specimen); "-" reads stdin'),
  )))
    .option('--json', 'print one JSON document to stdout instead of the table')
    .option('--out <folder>', 'write models.csv, fit.json and the figures (see the figure options; redraw them later with "stratotrend redraw") into this folder (created if needed)')
    .option('--models <set>', 'classic|extended|id,id,...: "classic" (the five models), "extended" (classic plus the shift, mode-shift and covariate models the data allow) or a comma-separated list of model ids', 'classic')
    .option('--min-segment <n>', 'fewest horizons in a segment of a shift model (default 5; at least 3 where a segment has its own variance)')
    .option('--covariate-file <file>', 'covariate per horizon for the covariate models: CSV with section (optional), age, time, height or depth, and covariate; matched by section and that position (height/depth as the samples give them, age also for heights/depths placed by --age-model)')
    .option('--rates', 'print rates: darwins and haldanes per interval and over the whole sequence, model-based rates, with the caution on interval dependence')
    .option('--generation-time <years>', 'generation time in years, for haldanes and per-generation rates (implies --rates)')
    .option('--adequacy', 'check the adequacy of the best-supported model (one-step prediction errors, parametric bootstrap)')
    .option('--adequacy-draws <n>', 'simulated data sets for --adequacy (default 199)')
    .option('--adequacy-seed <n>', 'seed of the --adequacy simulation (default 1)')
    .option('--no-intervals', 'skip the profile-likelihood intervals (faster)')
    .option('--intervals <method>', 'how the 95% intervals are made: integrated (default: integrated likelihood, best calibrated; ou and shift models use adjusted, or profile where adjusted would leave out the estimate), adjusted (restricted profile likelihood), profile (plain profile likelihood, asymptotic) or bootstrap (profile with a parametric-bootstrap cut-off, slower; profile where the bootstrap cannot calibrate). A fit whose intervals fell back says so in interval_method and a warning')
    .option('--quiet', 'print nothing but errors and warnings')
    .option('--no-figures', 'with --out, write no figure files (by default each lineage gets a trajectory and a model-support figure, each trait with several sections a sections figure; drawing estimated over two minutes is announced first)')
    .option('--report <file>', 'also write one self-contained HTML report (as "stratotrend report" does; never over an input, nor over a file of that name stratotrend did not write: checked before fitting)')
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

Extended set (--models extended adds these; segments are numbered from the oldest; every shift
position is found by exhaustive search over positions leaving each segment >= --min-segment
horizons, and each position counts 1 in K; the search's time grows with the square of the
horizons: a run estimated over a minute is announced first, and a lineage where a model would
search more than 2,000,000 placements — two shifts beyond about 2,000 horizons — is refused):
  punctuated-1, punctuated-2
                    1 or 2 shifts split the sequence into stasis segments with their own means
                    (segment_K_mean) and one shared stasis_variance (K = 4, 6)
  punctuated-1-separate, punctuated-2-separate
                    the same with a stasis variance per segment (segment_K_variance) (K = 5, 8)
  FIRST-then-SECOND mode shift: one shift between two different modes from stasis, random-walk,
                    directional-walk (all 6 ordered pairs, e.g. stasis-then-random-walk). A stasis
                    segment has its own mean and variance; a walk after the shift continues from
                    the latent lineage mean at the last horizon before it; a walk first starts at
                    ancestral_mean (K = its parameters + 1: 4 to 6)
  covariate-stasis  mean = covariate_intercept + covariate_slope x covariate, independent
                    stasis_variance about it (K = 3); needs a covariate column or --covariate-file
  covariate-walk    random walk whose steps add covariate_slope x the change in the covariate
                    to random steps with step_variance (K = 3)

Input columns (names case-insensitive): section, trait (optional); one of age (before present,
older = larger), time (elapsed), or height / depth with --age-model FILE; n, mean, and sd or var (summary form) or value (specimen form);
covariate (optional, for the covariate models).`;
}
