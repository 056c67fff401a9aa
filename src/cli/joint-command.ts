import type { JointOptions } from '../analyses/joint-run.js';
import { runJoint } from '../analyses/joint-run.js';
import { jointModelsCsv, jointText } from '../render/joint-output.js';
import { inputPaths, OutputSet, prepareOutputFolder, releaseOutputLocks } from './write-output.js';

/** Options of `stratotrend joint` as the command line gives them. */
export interface JointCommandOptions extends JointOptions {
  json?: boolean;
  out?: string;
  quiet?: boolean;
}

/**
 * `stratotrend joint FILE`: fit the joint models to every section's traits;
 * print the tables (or JSON) and with --out write joint.json and
 * joint-models.csv.
 */
export async function jointCommand(file: string, options: JointCommandOptions): Promise<void> {
  try {
    const run = await runJoint(file, options);
    if (options.out) {
      const names = ['joint.json', 'joint-models.csv'];
      const folder = prepareOutputFolder(options.out, inputPaths(file, options), names);
      const set = new OutputSet(folder, options.out);
      try {
        set.add('joint.json', JSON.stringify(run.document, null, 2) + '\n');
        set.add('joint-models.csv', jointModelsCsv(run.fits));
      } catch (error) {
        set.abandon();
        throw error;
      }
      set.commit();
    }
    if (options.json) process.stdout.write(JSON.stringify(run.document, null, 2) + '\n');
    else if (!options.quiet) {
      process.stdout.write(jointText(run.fits) + '\n');
      if (options.out) process.stdout.write(`\nWrote joint.json and joint-models.csv to ${options.out}\n`);
    }
    for (const warning of run.warnings.list()) {
      if (warning.category === 'at-bound' || warning.category === 'not-compared') continue;
      process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
    }
  } finally {
    releaseOutputLocks();
  }
}
