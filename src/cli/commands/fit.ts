import { InvalidArgumentError, type Command } from 'commander';
import { extensionModels } from '../../models/extensions.js';
import type { EvolutionModel } from '../../models/model.js';
import { classicModels } from '../../models/registry.js';
import { addFigureOptions } from './render.js';
import { addAgeModelOptions, addFittingOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend fit`. The action imports the fitting code only when
 * the command runs, so defining commands stays cheap.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * defineFitCommand(program);
 * program.commands.map((command) => command.name()); // ['fit']
 */
export function defineFitCommand(program: Command): void {
  addFigureOptions(addFittingOptions(addAgeModelOptions(addSampleOptions(
    program
      .command('fit')
      .description('fit every model to every lineage (section × trait) of a samples CSV and rank them by AICc')
      .argument('<file>', 'samples CSV (summary form: n, mean, sd or var per horizon; specimen form: value per specimen); "-" reads stdin'),
  ))))
    .option('--json', 'print one JSON document to stdout instead of the table')
    .option('--out <folder>', 'write models.csv, fit.json and the figures (see the figure options; redraw them later with "stratotrend redraw") into this folder (created if needed)')
    .option('--quiet', 'print nothing but errors and warnings')
    .option('--no-figures', 'with --out, write no figure files (by default each lineage gets a trajectory and a model-support figure, each trait with several sections a sections figure; drawing estimated over two minutes is announced first)')
    .option('--report <file>', 'also write one self-contained HTML report (as "stratotrend report" does; never over an input, nor over a file of that name stratotrend did not write: checked before fitting)')
    .option('--summary', 'print the cross-lineage summary (wins per model, Akaike weights, drift) instead of one table per lineage; adds "compilation" to the JSON and compilation.png with --out')
    .option('--threads <count>', 'threads for many lineages: this one and count − 1 workers (1 = no workers; default: every core when there are enough lineages to pay off)', parseThreads)
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
${helpEntries(classicModels)}

Extended set (--models extended adds these; segments are numbered from the oldest; every shift
position is found by exhaustive search over positions leaving each segment >= --min-segment
horizons, and each position counts 1 in K; the search's time grows with the square of the
horizons: a run estimated over a minute is announced first, and a lineage where a model would
search more than 2,000,000 placements — two shifts beyond about 2,000 horizons — is refused):
${helpEntries(extensionModels)}

Input columns (names case-insensitive): section, trait (optional); one of age (before present,
older = larger), time (elapsed), or height / depth with --age-model FILE; n, mean, and sd or var (summary form) or value (specimen form);
covariate (optional, for the covariate models).`;
}

/** The help entries the models give about themselves (`EvolutionModel.help`): a heading of up to 17 characters has its first line beside it. */
function helpEntries(models: readonly EvolutionModel[]): string {
  const indent = ' '.repeat(20);
  return models
    .flatMap((model) => (model.help ? [model.help] : []))
    .map(({ heading, lines }) => (heading.length < 18
      ? [`  ${heading.padEnd(18)}${lines[0]}`, ...lines.slice(1).map((line) => indent + line)]
      : [`  ${heading}`, ...lines.map((line) => indent + line)]).join('\n'))
    .join('\n');
}
