import type { JointOptions } from '../analyses/joint-run.js';
import { runJoint } from '../analyses/joint-run.js';
import { jointModelsCsv, jointText } from '../render/joint-output.js';
import type { JointFigureGroup } from '../render/figures/joint.js';
import { fileSlug } from '../render/figures/figure-set.js';
import { inputPaths, OutputSet, prepareOutputFolder, releaseOutputLocks } from '../io/write-output.js';

/** Options of `stratotrend joint` as the command line gives them. */
export interface JointCommandOptions extends JointOptions {
  json?: boolean;
  out?: string;
  quiet?: boolean;
  /** false with --no-figures. */
  figures?: boolean;
}

/**
 * `stratotrend joint FILE`: fit the joint models to every section's traits;
 * print the tables (or JSON) and with --out write joint.json and
 * joint-models.csv.
 *
 * @example
 * // A real run prints the joint tables (seconds); the file is read first:
 * await jointCommand('no-such.csv', {});
 * // throws: no-such.csv: no such file
 */
export async function jointCommand(file: string, options: JointCommandOptions): Promise<void> {
  try {
    const run = await runJoint(file, options);
    if (options.out) {
      const groups = (run.document as { groups: JointFigureGroup[] }).groups;
      const figures = options.figures === false ? [] : jointFigureNames(groups);
      const names = ['joint.json', 'joint-models.csv', ...figures.map((figure) => figure.name)];
      const folder = prepareOutputFolder(options.out, inputPaths(file, options), names);
      const set = new OutputSet(folder, options.out);
      try {
        set.add('joint.json', JSON.stringify(run.document, null, 2) + '\n');
        set.add('joint-models.csv', jointModelsCsv(run.fits));
        if (figures.length > 0) {
          const { renderJointPanels, renderJointTrajectory } = await import('../render/figures/joint.js');
          for (const figure of figures) {
            const group = groups[figure.group];
            set.add(figure.name, figure.pair ? renderJointTrajectory(group, figure.pair[0], figure.pair[1]).bytes : renderJointPanels(group).bytes);
          }
        }
      } catch (error) {
        set.abandon();
        throw error;
      }
      set.commit();
    }
    if (options.json) process.stdout.write(JSON.stringify(run.document, null, 2) + '\n');
    else if (!options.quiet) {
      process.stdout.write(jointText(run.fits) + '\n');
      if (options.out) process.stdout.write(`\nWrote joint.json, joint-models.csv${options.figures === false ? '' : ' and the figures'} to ${options.out}\n`);
    }
    for (const warning of run.warnings.list()) {
      if (warning.category === 'at-bound' || warning.category === 'not-compared') continue;
      process.stderr.write(`warning (${warning.category}): ${warning.message}${warning.count > 1 ? ` (${warning.count} times)` : ''}\n`);
    }
  } finally {
    releaseOutputLocks();
  }
}

/**
 * The figure files of `joint --out`: per group a panels figure and one
 * trajectory per pair of traits, named from the section and traits, e.g.
 * joint-marrowind-wash-panels.png, joint-marrowind-wash-shell-length-shell-width.png.
 *
 * @example
 * jointFigureNames([{ section: 'Section A', traits: ['length', 'width', 'height'] }]).map((figure) => figure.name); // ['joint-section-a-panels.png', 'joint-section-a-length-width.png', 'joint-section-a-length-height.png', 'joint-section-a-width-height.png']
 */
export function jointFigureNames(groups: readonly JointFigureGroup[]): { name: string; group: number; pair: [number, number] | null }[] {
  const names: { name: string; group: number; pair: [number, number] | null }[] = [];
  groups.forEach((group, index) => {
    const stem = `joint-${group.section === '' ? `group-${index + 1}` : fileSlug(group.section)}`;
    names.push({ name: `${stem}-panels.png`, group: index, pair: null });
    for (let j = 0; j < group.traits.length; j++) {
      for (let l = j + 1; l < group.traits.length; l++) names.push({ name: `${stem}-${fileSlug(group.traits[j])}-${fileSlug(group.traits[l])}.png`, group: index, pair: [j, l] });
    }
  });
  return names;
}
