import type { Command } from 'commander';

/**
 * Figure options shared by `fit --out` and `redraw` (parsed and checked when the figures are drawn).
 *
 * @example
 * const command = addFigureOptions(buildProgram().createCommand('redraw'));
 * command.options.map((option) => option.long).slice(0, 3); // ['--figure-format', '--figure-width', '--dpi']
 */
export function addFigureOptions(command: Command): Command {
  return command
    .option('--figure-format <list>', 'figure files: png, svg, pdf, or a comma-separated list such as png,pdf', 'png')
    .option('--figure-width <width>', 'single (one journal column, 9 cm), double (18 cm) or a width in cm such as 12cm', 'single')
    .option('--dpi <dots>', 'resolution of PNG figures in dots per inch (72 to 1200)', '600')
    .option('--orientation <layout>', 'stratigraphic (time up the page, oldest at the bottom) or horizontal (time left to right)', 'stratigraphic')
    .option('--draw-model <id>', "model whose expected trajectory and 95% envelope are drawn (default: each lineage's best-supported model)")
    .option('--smoothed-band', 'also draw the smoothed lineage mean (Kalman smoother under the model drawn) with its 95% band')
    .option('--marker-area-by-n', 'draw each horizon mean with a marker whose area is proportional to its specimen count n (the median n at the usual size)')
    .option('--leave-out <parts>', 'parts of the figures not to draw, for a journal that sets its own caption: title, subtitle, notes, or captions for all three (comma-separated)')
    .option('--trait-title <text>', 'title of the trait axis instead of the one made from the trait name and unit; words between asterisks are set in italics (e.g. "Shell length of *Inventa fictiva* (mm)")');
}

/**
 * Define `stratotrend redraw`: draw the figures again from a saved fit.json
 * with other figure options, without refitting. The chart stack is loaded
 * only when the command runs.
 *
 * @example
 * const program = buildProgram().createCommand('stratotrend');
 * defineRedrawCommand(program);
 * program.commands.map((command) => command.name()); // ['redraw']
 */
export function defineRedrawCommand(program: Command): void {
  addFigureOptions(
    program
      .command('redraw')
      .description('draw the figures of a saved fit.json again (other size, format, orientation or model) without refitting')
      .argument('<fit-json>', 'a fit.json written by "fit --out"'),
  )
    .option('--out <folder>', 'folder for the figure files (default: the folder of the fit.json)')
    .option('--only <kinds>', 'figure kinds to draw: trajectory, model-support, sections (comma-separated)', 'trajectory,model-support,sections')
    .option('--lineage <name>', 'draw only lineages whose "section / trait" name, section or trait is this (repeat the option for several)', collect, [])
    .option('--quiet', 'print nothing but errors')
    .option('--debug', 'show stack traces for errors')
    .addHelpText('after', `
Figures (one file per figure; names say the lineage and the kind):
  <section>_<trait>.trajectory   horizon means with 95% sampling intervals, the model's expected
                                 trajectory and 95% envelope, oldest horizon at the bottom
  <section>_<trait>.model-support  K, logL, AICc, ΔAICc and Akaike weight bars, best marked (narrow
                                 figures leave out logL, then AICc, then K, then show weights as numbers)
  <trait>.sections               all sections of a trait on one time axis (when there are two or more;
                                 from 7 sections on, one small panel per section on shared axes)
Names that coincide after cleaning get -2, -3 on the lineage (or trait) name, as fit gave them.`)
    .action(async (file: string, options) => {
      const { redrawCommand } = await import('../render-command.js');
      redrawCommand(file, options);
    });
}

function collect(value: string, previous: string[]): string[] {
  return [...previous, value];
}
