import { Option, type Command } from 'commander';

/** Options every sample-reading command shares. */
export function addSampleOptions(command: Command): Command {
  return command
    .option('--log', 'natural-log transform: specimens logged one by one, summaries by the delta method')
    .option('--pool', 'pool the within-horizon variance over each lineage (needed when some horizons have n = 1)')
    .option('--time-unit <unit>', 'unit of the age/time column: Ma/Myr, ka/kyr, yr, or any label', 'Myr')
    .addOption(new Option('--delimiter <char>', 'field delimiter (default: detected from the header: comma, semicolon or tab)'))
    .option('--decimal-comma', 'read "1,5" as 1.5 (use with a semicolon or tab delimiter)')
    .option('--debug', 'show stack traces for errors');
}

