import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { jointCorrelationPower, jointTruth } from '../../src/analyses/joint-simulate.js';
import { loadJointGroups, runJoint } from '../../src/analyses/joint-run.js';
import { fitJointModel } from '../../src/joint/fit-joint.js';
import { jointModel, type JointModel } from '../../src/joint/joint-models.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-joint-simulate-'));

/** `stratotrend ARGS` in the test process (runCliHere, issue 22), from the project folder: its stdout, or a failure showing stderr. */
async function stratotrend(args: string[]): Promise<string> {
  const run = await runCliHere(args, root);
  if (run.status !== 0) throw new Error(`stratotrend ${args.join(' ')} exited with ${run.status}: ${run.stderr}`);
  return run.stdout;
}

describe('simulate with a joint model', () => {
  it('writes summary rows on the file\'s design that read back as the same group; same seed, same bytes', async () => {
    const args = ['simulate', 'sample-data/shell-shape.csv', '--model', 'correlated-random-walk', '--seed', '4'];
    const text = await stratotrend(args);
    expect(await stratotrend(args)).toBe(text);
    const path = join(folder, 'simulated.csv');
    writeFileSync(path, text);
    const [original] = (await loadJointGroups('sample-data/shell-shape.csv', {})).groups;
    const [simulated] = (await loadJointGroups(path, {})).groups;
    // Same design: horizons, times, missing values and sampling variances (sd written to 10 digits).
    expect(simulated.data.time.length).toBe(original.data.time.length);
    simulated.data.values.forEach((value, index) => expect(Number.isNaN(value)).toBe(Number.isNaN(original.data.values[index])));
    simulated.data.sampling.forEach((value, index) => expect(value).toBeCloseTo(original.data.sampling[index], 6));
  });

  it('--parameters step_correlation[1][2] keeps the variances and sets the covariance to r sqrt(v1 v2)', async () => {
    const [group] = (await loadJointGroups('sample-data/shell-shape.csv', {})).groups;
    const model = jointModel('correlated-random-walk') as JointModel;
    const fit = fitJointModel(model, group.data);
    const truth = jointTruth(model, fit, 2, 'step_correlation[1][2]=-0.3,ancestral_mean[2]=10');
    const [v1, , , v2] = truth.covariance;
    // Definition of a correlation (common practice).
    expect(truth.covariance[1]).toBeCloseTo(-0.3 * Math.sqrt(v1 * v2), 12);
    expect(v1).toBe(fit.parameters!.step_covariance![0][0]);
    expect(truth.locations[1]).toBe(10);
    expect(() => jointTruth(model, fit, 2, 'step_covariance[1][2]=1e6')).toThrow(/positive semi-definite/);
    expect(() => jointTruth(jointModel('independent-random-walks') as JointModel, fitJointModel(jointModel('independent-random-walks') as JointModel, group.data), 2, 'step_correlation[1][2]=0.5')).toThrow(/no correlation/);
  });
});

describe('power to detect a correlation', () => {
  it('rises with the true correlation on the demo design and its estimates follow the truth (seeded, 12 replicates)', async () => {
    const [group] = (await loadJointGroups('sample-data/shell-shape.csv', {})).groups;
    const { rows } = jointCorrelationPower(group, [0, 0.95], 12, 2);
    // Monotone power (common practice: a larger effect is detected at least as often), here strictly on this seeded run.
    expect(rows[1].power).toBeGreaterThan(rows[0].power);
    expect(rows[1].meanEstimate).toBeGreaterThan(0.7);
    expect(Math.abs(rows[0].meanEstimate)).toBeLessThan(0.3);
  });

  it('the joint command still fits what simulate wrote', async () => {
    const path = join(folder, 'simulated-2.csv');
    writeFileSync(path, await stratotrend(['simulate', 'sample-data/shell-shape.csv', '--model', 'independent-stasis', '--replicates', '2']));
    const run = await runJoint(path, { models: 'independent-stasis', intervals: false });
    expect(run.fits.map((fit) => fit.group.section)).toEqual(['Marrowind Wash r1', 'Marrowind Wash r2']);
  });
});
