import type { Command } from 'commander';
import { addAgeModelOptions, addFittingOptions, addSampleOptions } from './shared.js';

/**
 * Define `stratotrend report`. The action imports the fitting and report
 * code only when the command runs.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * defineReportCommand(program);
 * program.commands.map((command) => command.name()); // ['report']
 */
export function defineReportCommand(program: Command): void {
  addFittingOptions(addAgeModelOptions(addSampleOptions(
    program
      .command('report')
      .description('fit every model and write one self-contained HTML report (tables, figures, methods text, references, provenance)')
      .argument('<file>', 'samples CSV as for "fit" ("-" reads stdin), or a fit.json saved by "fit --out" (reported without refitting)'),
  ), { draws: false }))
    .option('--out <file>', 'the HTML file to write (never over an input, nor over a file of that name stratotrend did not write)', 'stratotrend-report.html')
    .option('--figure-format <format>', 'figures inside the page: svg (vector, prints sharply) or png', 'svg')
    .option('--orientation <layout>', 'figures: stratigraphic (time up the page, oldest at the bottom) or horizontal', 'stratigraphic')
    .option('--draw-model <id>', "model whose expected trajectory and 95% envelope are drawn (default: each lineage's best-supported model)")
    .option('--smoothed-band', 'also draw the smoothed lineage mean with its 95% band')
    .option('--compare', 'also compare the sections of every trait measured in two or more (shared against separate processes, as "compare" does)')
    .option('--joint', 'also fit the joint models of several traits of one lineage to every section with two or more traits (as "joint" does), with their figures')
    .option('--power', 'also estimate the power of every lineage\'s design to detect a trend (simulations, as "power" does; takes a while)')
    .option('--power-replicates <R>', 'simulated lineages per drift value for --power', '200')
    .option('--power-step-variance <list>', 'step variance(s) the --power simulations assume, comma-separated, as "power --step-variance" (default: the fitted estimate, and the upper end of its 95% interval when the estimate is 0 or poorly determined)')
    .option('--seed <integer>', 'seed of the trend test and the --power simulations (same seed, same report numbers)', '1')
    .option('--attach <json...>', 'also show saved results of other analyses: a section comparison (compare --json) or power results (power --json)')
    .option('--quiet', 'print nothing but errors and warnings')
    .addHelpText('after', `
The page needs no network and no other file: styles and figures are inside it.
It opens in any browser and prints on paper (one lineage per page).
Its methods text is written from the options of the run; adapt it for the paper.
Everything else "fit" can do (age draws, threads, summary, …) goes through
"stratotrend fit FILE --report FILE.html", which writes the same page.`)
    .action(async (file: string, options) => {
      const { reportCommand } = await import('../report-command.js');
      await reportCommand(file, options);
    });
}
