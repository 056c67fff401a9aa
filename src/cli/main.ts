import { Command, CommanderError, Option } from 'commander';
import { InputError } from '../data/errors.js';
import { toolVersion } from './version.js';

/**
 * Command-line entry point. Commands load their modules only when run, so
 * `--help` and light commands never load the fitting or chart stack.
 */
export async function main(argv: readonly string[]): Promise<void> {
  const debug = argv.includes('--debug');
  const program = buildProgram();
  try {
    await program.parseAsync(argv as string[]);
  } catch (error) {
    process.exitCode = reportError(error, debug);
  }
}

/** Turn an error into one stderr line and an exit code (1 bad data, 2 bad usage, 70 internal). */
export function reportError(error: unknown, debug: boolean): number {
  if (error instanceof CommanderError) return error.exitCode === 0 ? 0 : 2;
  if (error instanceof InputError) {
    process.stderr.write(`stratotrend: ${error.message}\n`);
    if (debug) process.stderr.write(`${error.stack}\n`);
    return error.kind === 'usage' ? 2 : 1;
  }
  process.stderr.write(`stratotrend: internal error: ${(error as Error)?.message ?? String(error)}${debug ? '' : ' (run again with --debug for details)'}\n`);
  if (debug) process.stderr.write(`${(error as Error)?.stack}\n`);
  return 70;
}

/** Options every sample-reading command shares. */
function addSampleOptions(command: Command): Command {
  return command
    .option('--log', 'natural-log transform: specimens logged one by one, summaries by the delta method')
    .option('--pool', 'pool the within-horizon variance over each lineage (needed when some horizons have n = 1)')
    .option('--time-unit <unit>', 'unit of the age/time column: Ma/Myr, ka/kyr, yr, or any label', 'Myr')
    .addOption(new Option('--delimiter <char>', 'field delimiter (default: detected from the header: comma, semicolon or tab)'))
    .option('--decimal-comma', 'read "1,5" as 1.5 (use with a semicolon or tab delimiter)')
    .option('--debug', 'show stack traces for errors');
}

/** The commander program with every command. */
export function buildProgram(): Command {
  const program = new Command();
  program
    .name('stratotrend')
    .description('Fit models of phyletic evolution (stasis, random walks, directional change, approach to an optimum)\nto trait means measured through stratigraphic sections, with sampling error, compared by AICc.')
    .version(toolVersion())
    .exitOverride()
    .configureOutput({ writeErr: (text) => process.stderr.write(text) });

  addSampleOptions(
    program
      .command('fit')
      .description('fit every model to every lineage (section × trait) of a samples CSV and rank them by AICc')
      .argument('<file>', 'samples CSV (summary form: n, mean, sd or var per horizon; specimen form: value per specimen); "-" reads stdin'),
  )
    .option('--json', 'print one JSON document to stdout instead of the table')
    .option('--out <folder>', 'write models.csv and fit.json into this folder (created if needed)')
    .option('--models <set>', 'model set: "classic" (the five models) or a comma-separated list of model ids', 'classic')
    .option('--no-intervals', 'skip the profile-likelihood intervals (faster)')
    .option('--quiet', 'print nothing but errors and warnings')
    .addHelpText('after', modelHelp())
    .action(async (file: string, options) => {
      const { fitCommand } = await import('./fit-command.js');
      fitCommand(file, options);
    });
  return program;
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
