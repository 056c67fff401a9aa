import { Option, type Command } from 'commander';

/**
 * Options every sample-reading command shares. `traitUnit: false` leaves out
 * `--trait-unit` for commands that print no trait quantities (bootstrap's
 * likelihood ratios and AICc differences have no unit; simulate writes a
 * samples CSV, which has no unit column).
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
 */
export function addAgeModelOptions(command: Command, { draws = true }: { draws?: boolean } = {}): Command {
  command
    .option('--age-model <file>', 'tie points (section, height or depth, age, optional age_sd) that turn sample heights/depths into ages; the tie column must match the samples\' (height with height, depth with depth)')
    .option('--extrapolate', 'allow ages beyond the outermost ties (constant rate of the nearest stretch); such horizons are flagged in every output');
  if (!draws) return command;
  return command
    .option('--age-draws <count>', 'redraw the tie-point ages from their age_sd this many times (kept in stratigraphic order), refit, and report the spread')
    .option('--seed <integer>', 'seed of the age redraws (same seed, same draws)', '1');
}
