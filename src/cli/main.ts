import { Command, CommanderError } from 'commander';
import { InputError } from '../data/errors.js';
import { defineCompareCommand } from './commands/compare.js';
import { defineFitCommand } from './commands/fit.js';
import { defineJointCommand } from './commands/joint.js';
import { definePowerCommand } from './commands/power.js';
import { defineBootstrapCommand } from './commands/bootstrap.js';
import { defineSimulateCommand } from './commands/simulate.js';
import { defineRedrawCommand } from './commands/render.js';
import { defineReportCommand } from './commands/report.js';
import { toolVersion } from '../io/version.js';

/**
 * Command-line entry point. Commands load their modules only when run, so
 * `--help` and light commands never load the fitting or chart stack.
 *
 * @example
 * // As bin/stratotrend calls it; a non-zero exit code would be set on the process (here: none).
 * await main(['node', 'stratotrend', '--version']); // undefined (the version is printed on stdout)
 */
export async function main(argv: readonly string[]): Promise<void> {
  const debug = argv.includes('--debug');
  // A reader that stops early (`| head`) is not an error: stop quietly.
  process.stdout.on('error', (error: NodeJS.ErrnoException) => {
    if (error.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    process.exitCode = reportError(error, debug);
  });
  const program = buildProgram();
  // Node exits with code 0 when nothing is left to wait for, even if a
  // command's promise never settled: make that a reported internal error.
  let settled = false;
  process.once('beforeExit', () => {
    if (!settled) {
      process.stderr.write('stratotrend: internal error: the command stopped before it finished (run again with --debug for details)\n');
      process.exitCode = 70;
    }
  });
  const code = await runCommandLine(argv, program);
  if (code !== 0) process.exitCode = code;
  settled = true;
}

/**
 * Run one command line (`argv` as `process.argv`: node, script, arguments)
 * and return its exit code instead of setting the process's, with none of
 * `main`'s process-wide hooks, so one process can run several command lines
 * (the CLI tests run them in the test process: test/support/cli-in-process.ts).
 * Output still goes to process.stdout and process.stderr.
 *
 * @example
 * await runCommandLine(['node', 'stratotrend', '--version']); // 0 (the version is printed on stdout)
 * await runCommandLine(['node', 'stratotrend', 'fit', '--intervals', 'nonsense', 'sample-data/shell-length.csv']); // 2 (a usage error, printed on stderr)
 */
export async function runCommandLine(argv: readonly string[], program: Command = buildProgram()): Promise<number> {
  try {
    await program.parseAsync(argv as string[]);
    return 0;
  } catch (error) {
    return reportError(error, argv.includes('--debug'));
  }
}

/**
 * Turn an error into one stderr line and an exit code (1 bad data, 2 bad usage, 70 internal).
 *
 * @example
 * reportError(new InputError('bad value', { file: 'a.csv', line: 3 }), false); // 1 (stderr: "stratotrend: a.csv line 3: bad value")
 * reportError(usageError('--seed: bad'), false); // 2
 * reportError(new Error('bug'), false); // 70
 */
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

/**
 * The commander program with every command.
 *
 * @example
 * buildProgram().commands.map((command) => command.name()); // ['fit', 'compare', 'joint', 'report', 'power', 'simulate', 'bootstrap', 'redraw']
 */
export function buildProgram(): Command {
  const program = new Command();
  program
    .name('stratotrend')
    .description('Fit models of phyletic evolution (stasis, random walks, directional change, approach to an optimum) to trait means measured through stratigraphic sections, with sampling error, compared by AICc.')
    .version(toolVersion())
    .exitOverride()
    .configureOutput({ writeErr: (text) => process.stderr.write(text) });

  defineFitCommand(program);
  defineCompareCommand(program);
  defineJointCommand(program);
  defineReportCommand(program);
  definePowerCommand(program);
  defineSimulateCommand(program);
  defineBootstrapCommand(program);
  defineRedrawCommand(program);
  return program;
}
