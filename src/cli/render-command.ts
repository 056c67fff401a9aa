import { join } from 'node:path';
import { redrawFigures, type RedrawCommandOptions } from '../analyses/redraw-run.js';
import { releaseOutputLocks } from '../io/write-output.js';

// `stratotrend redraw`: the figures are drawn by redrawFigures
// (src/analyses/redraw-run.ts); this file prints the long-run warning and the
// files written.

export type { RedrawCommandOptions } from '../analyses/redraw-run.js';

/**
 * `stratotrend redraw FIT_JSON`: draw the figures of a saved fit again, without refitting.
 *
 * @example
 * redrawCommand('no-such.json', {});
 * // throws: no-such.json: no such file
 */
export function redrawCommand(file: string, options: RedrawCommandOptions): void {
  try {
    redrawAndWrite(file, options);
  } finally {
    releaseOutputLocks();
  }
}

function redrawAndWrite(file: string, options: RedrawCommandOptions): void {
  const { out, written } = redrawFigures(file, options, (long) => process.stderr.write(`warning (long-run): ${long}\n`));
  if (!options.quiet) process.stdout.write(written.map((name) => join(out, name)).join('\n') + '\n');
}
