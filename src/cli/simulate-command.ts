import { runSimulate, type SimulateCommandOptions } from '../analyses/simulate-run.js';
import { seedOption, wholeOption } from '../analyses/option-values.js';
import { refuseInputPath, writeAtomically } from '../io/write-output.js';

// `stratotrend simulate`: the data are made by runSimulate
// (src/analyses/simulate-run.ts); this file writes them to --out or stdout.

// Tests and other callers import the option parser from here as before.
export { parseParameters } from '../analyses/simulate-run.js';

/**
 * `stratotrend simulate [FILE]`: sequences from a model with given
 * parameters on the design of FILE (each of its lineages) or of the design
 * options, written as a samples CSV the tool reads back. Parameters not given
 * are taken from the model fitted to each lineage of FILE.
 *
 * @example
 * await simulateCommand(undefined, {});
 * // throws: --parameters: give ancestral_mean, drift, step_variance
 */
export async function simulateCommand(file: string | undefined, options: SimulateCommandOptions): Promise<void> {
  const joint = await import('../analyses/joint-simulate.js');
  if (joint.isJointModel(options.model)) {
    // The joint models (issue 17) simulate on the design of a file's sections with two or more traits.
    const text = await joint.jointSimulation(file, { ...options, replicates: wholeOption(options.replicates, '--replicates', 1, 1, 100000), seed: seedOption(options.seed) });
    if (options.out) {
      refuseInputPath(options.out, [file as string]);
      writeAtomically(options.out, text);
    } else process.stdout.write(text);
    return;
  }
  const text = await runSimulate(file, options, (warnings) => {
    for (const warning of warnings) process.stderr.write(`warning (${warning.category}): ${warning.message}\n`);
  });
  if (options.out) {
    if (file !== undefined) refuseInputPath(options.out, [file]);
    writeAtomically(options.out, text);
  } else process.stdout.write(text);
}
