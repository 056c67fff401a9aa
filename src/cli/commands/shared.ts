import { Option, type Command } from 'commander';

/**
 * Options every sample-reading command shares. `traitUnit: false` leaves out
 * `--trait-unit` for commands that print no trait quantities (bootstrap's
 * likelihood ratios and AICc differences have no unit; simulate writes a
 * samples CSV, which has no unit column).
 *
 * @example
 * const command = addSampleOptions(buildProgram().createCommand('fit'));
 * command.options.map((option) => option.long); // ['--log', '--pool', '--time-unit', '--trait-unit', '--delimiter', '--decimal-comma', '--debug']
 */
export function addSampleOptions(command: Command, { traitUnit = true }: { traitUnit?: boolean } = {}): Command {
  command
    .option('--log', 'natural-log transform: specimens logged one by one, summaries by the delta method')
    .option('--pool', 'pool the within-horizon variance over each lineage (needed when some horizons have n = 1; it accepts an empty sd or var there)')
    .option('--time-unit <unit>', 'unit of the age/time column: Ma/Myr, ka/kyr, yr, or any label', 'Myr');
  if (traitUnit) {
    command.option(
      '--trait-unit <label>',
      'unit of the trait values, e.g. mm or µm², printed with estimates and on figure axes; TRAIT=LABEL gives one trait its own unit (repeat the option, e.g. --trait-unit "whorl width=mm" --trait-unit "rib density=ribs per cm"). A label only: nothing is converted; with --log it reads "ln mm"',
      (value: string, previous: string[] | undefined) => [...(previous ?? []), value],
    );
  }
  return command
    .addOption(new Option('--delimiter <char>', 'field delimiter (default: detected from the header: comma, semicolon or tab)'))
    .option('--decimal-comma', 'read "1,5" as 1.5 (use with a semicolon or tab delimiter)')
    .option('--debug', 'show stack traces for errors');
}


/**
 * The age-model options, one definition for every command that reads
 * samples (heights or depths need ties to become ages): `--age-model`,
 * `--extrapolate`, and with `draws` (fit, compare: the commands whose
 * conclusions the draws move) `--age-draws` and its `--seed`. The actions
 * read them through `src/cli/age-model-options.ts`.
 *
 * @example
 * const command = addAgeModelOptions(buildProgram().createCommand('power'), { draws: false });
 * command.options.map((option) => option.long); // ['--age-model', '--extrapolate']
 */
export function addAgeModelOptions(command: Command, { draws = true }: { draws?: boolean } = {}): Command {
  command
    .option('--age-model <file>', 'tie points (section, height or depth, age, optional age_sd) that turn sample heights/depths into ages; the tie column must match the samples\' (height with height, depth with depth)')
    .option('--extrapolate', 'allow ages beyond the outermost ties (constant rate of the nearest stretch); such horizons are flagged in every output');
  if (!draws) return command;
  return command
    .option('--age-draws <count>', 'redraw the tie-point ages from their age_sd this many times (kept in stratigraphic order), refit, and report the spread')
    .option('--seed <integer>', 'seed of the age redraws, and in fit of the trend test (same seed, same draws and p-values on any number of threads)', '1');
}

/**
 * The fitting options, one definition for `fit` and `report` (the report
 * fits exactly as `fit` does, so each option means the same in both and its
 * help text says so once): `--models`, `--min-segment`, `--covariate-file`,
 * `--rates`, `--generation-time`, `--adequacy` with its draws and seed, the
 * trend test (`--trend-level`, `--no-trend-test`; seeded by the command's
 * `--seed`) and the intervals (`--no-intervals`, `--intervals`). The actions read them
 * through `resolveModels` (`src/cli/model-selection.ts`),
 * `extensionSettings` (`src/cli/fit-extensions.ts`) and `intervalOptions`.
 *
 * @example
 * const command = addFittingOptions(buildProgram().createCommand('fit'));
 * command.options.map((option) => option.long).slice(0, 3); // ['--models', '--min-segment', '--covariate-file']
 */
export function addFittingOptions(command: Command): Command {
  return command
    .option('--models <set>', 'classic|extended|id,id,...: "classic" (the five models), "extended" (classic plus the shift, mode-shift, covariate and changing-landscape models the data allow) or a comma-separated list of model ids (see "stratotrend fit --help")', 'classic')
    .option('--min-segment <n>', 'fewest horizons in a segment of a shift model (default 5; at least 3 where a segment has its own variance)')
    .option('--covariate-file <file>', 'covariate per horizon for the covariate models: CSV with section (optional), age, time, height or depth, and covariate; matched by section and that position (height/depth as the samples give them, age also for heights/depths placed by --age-model)')
    .option('--rates', 'also give rates: darwins and haldanes per interval and over the whole sequence, model-based rates, with the caution on interval dependence')
    .option('--generation-time <years>', 'generation time in years, for haldanes and per-generation rates (implies --rates)')
    .option('--adequacy', 'check the adequacy of the best-supported model (one-step prediction errors, parametric bootstrap)')
    .option('--adequacy-draws <n>', 'simulated data sets for --adequacy (default 199)')
    .option('--adequacy-seed <n>', 'seed of the --adequacy simulation (default 1)')
    .option('--trend-level <p>', 'level of the trend test every lineage gets (drift against its standard error, p-value by parametric bootstrap from the fitted non-directional models; see "Trend verdict" in the README): a trend is supported when p < this (default 0.05)')
    .option('--no-trend-test', 'skip the trend test (faster: it simulates up to 199 data sets per null model and lineage, seeded by --seed)')
    .option('--no-intervals', 'skip the 95% intervals (faster)')
    .option('--intervals <method>', 'how the 95% intervals are made: integrated (default: integrated likelihood, best calibrated; ou, the shift models and the other models with two searched parameters (accelerating-walk, moving-optimum) use adjusted, or profile where adjusted would leave out the estimate), adjusted (restricted profile likelihood), profile (plain profile likelihood, asymptotic) or bootstrap (profile with a parametric-bootstrap cut-off, slower; profile where the bootstrap cannot calibrate). A fit whose intervals fell back says so in interval_method and a warning');
}
