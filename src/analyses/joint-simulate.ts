import { InputError, usageError } from '../data/errors.js';
import { neutraliseFormula } from '../data/names.js';
import { fitJointModel, fitJointModels, type JointModelFit } from '../joint/fit-joint.js';
import type { JointGroup } from '../joint/joint-groups.js';
import { jointModel, jointModels, locationsPerTrait, type JointModel } from '../joint/joint-models.js';
import { simulateJoint, type JointTruth } from '../joint/simulate-joint.js';
import { createRandom } from '../random/random.js';
import { formatValue } from '../simulate/sample-table.js';
import { replicateSeed } from '../random/seeds.js';
import { loadJointGroups, type JointOptions } from './joint-run.js';

/**
 * `simulate` and `power` with the joint models (issue 17): draws on the
 * design of a file's joint groups (times, missing values, sampling
 * covariances), parameters from the model fitted to each group unless given.
 */

/**
 * Whether a model id names a joint model (the simulate command's switch).
 *
 * @example
 * isJointModel('correlated-ou'); // true
 * isJointModel('ou'); // false (the single-trait model)
 */
export function isJointModel(id: string | undefined): boolean {
  return id !== undefined && jointModel(id) !== undefined;
}

/**
 * The true values of a fitted joint model, with entries replaced by
 * `--parameters` overrides such as `step_correlation[1][2]=0.8`,
 * `step_covariance[2][2]=0.5`, `ancestral_mean[1]=30`, `alpha[2]=1.5`
 * (indices from 1, in the group's trait order; a correlation keeps the
 * variances and sets the covariance).
 *
 * @throws InputError (usage) for an unknown name, an index out of range, a value out of bounds or a covariance that is not positive semi-definite.
 *
 * @example
 * const rows = ['A,length,3,5,1,0.5', 'A,width,3,5,2,0.5', 'A,length,2,5,1.4,0.5', 'A,width,2,5,2.3,0.5', 'A,length,1,5,2,0.5', 'A,width,1,5,3,0.5', 'A,length,0,5,2.2,0.5', 'A,width,0,5,3.5,0.5'];
 * const [group] = jointGroups(buildLineages(readSamples(readTable(['section,trait,age,n,mean,sd', ...rows].join('\n'), 's.csv'))), 's.csv', new WarningLog());
 * const model = jointModel('correlated-random-walk');
 * const fit = fitJointModel(model, group.data);
 * const truth = jointTruth(model, fit, 2, 'step_correlation[1][2]=0.5');
 * truth.covariance[1] / Math.sqrt(truth.covariance[0] * truth.covariance[3]); // 0.5 (to 1e-12; the variances kept, the covariance set)
 * jointTruth(model, fit, 2, 'step_correlation[1][3]=0.5');
 * // throws: step_correlation[1][3]
 */
export function jointTruth(model: JointModel, fit: JointModelFit, k: number, overrides: string | undefined): JointTruth {
  const parameters = fit.parameters;
  if (!parameters) throw usageError(`${model.id} could not be fitted to fill in the parameters: ${fit.message ?? 'not fitted'}`);
  const covarianceName = model.process === 'stasis' ? 'stasis_covariance' : 'step_covariance';
  const covariance = (parameters[covarianceName] as number[][]).map((row) => [...row]);
  const first = [...((model.process === 'stasis' ? parameters.stasis_mean : parameters.ancestral_mean) as number[])];
  const second = model.mean === 'drift' ? [...(parameters.drift as number[])] : model.mean === 'ou' ? (parameters.optimum as (number | null)[]).map((value, j) => value ?? first[j]) : null;
  const alpha = parameters.alpha ? [...parameters.alpha] : null;
  const vectorNames: Record<string, number[] | null> = {
    [model.process === 'stasis' ? 'stasis_mean' : 'ancestral_mean']: first,
    ...(model.mean === 'drift' ? { drift: second } : {}),
    ...(model.mean === 'ou' ? { optimum: second, alpha } : {}),
  };
  for (const part of (overrides ?? '').split(',').map((piece) => piece.trim()).filter((piece) => piece !== '')) {
    const match = /^([a-z_]+)\[(\d+)\](?:\[(\d+)\])?\s*=\s*(.+)$/.exec(part);
    if (!match) throw usageError(`--parameters: expected name[i]=value or name[i][j]=value for a joint model, got "${part}"`);
    const [, name, rawI, rawJ, rawValue] = match;
    const value = Number(rawValue);
    if (!Number.isFinite(value)) throw usageError(`--parameters: ${name} must be a number, got "${rawValue}"`);
    const i = Number(rawI) - 1;
    const j = rawJ === undefined ? null : Number(rawJ) - 1;
    if (i < 0 || i >= k || (j !== null && (j < 0 || j >= k))) throw usageError(`--parameters: index out of range in "${part}" (traits are numbered 1 to ${k})`);
    if (name in vectorNames && j === null) {
      if (name === 'alpha' && !(value > 0)) throw usageError(`--parameters: alpha must be positive, got ${value}`);
      (vectorNames[name] as number[])[i] = value;
    } else if (name === covarianceName && j !== null) {
      if (i === j && value < 0) throw usageError(`--parameters: ${name}[${i + 1}][${j + 1}] is a variance and must be at least 0, got ${value}`);
      if (i !== j && !model.correlated) throw usageError(`--parameters: ${model.id} has no covariance between traits; use a correlated model`);
      covariance[i][j] = value;
      covariance[j][i] = value;
    } else if (name === 'step_correlation' && j !== null && i !== j && model.process !== 'stasis') {
      if (!model.correlated) throw usageError(`--parameters: ${model.id} has no correlation between traits; use a correlated model`);
      if (!(Math.abs(value) <= 1)) throw usageError(`--parameters: a correlation must lie in [-1, 1], got ${value}`);
      const covarianceValue = value * Math.sqrt(covariance[i][i] * covariance[j][j]);
      covariance[i][j] = covarianceValue;
      covariance[j][i] = covarianceValue;
    } else {
      throw usageError(`--parameters: "${name}${j === null ? `[${i + 1}]` : `[${i + 1}][${j + 1}]`}" is not a parameter of ${model.id}; its parameters are ${[...Object.keys(vectorNames), `${covarianceName}[i][j]`, ...(model.correlated && model.process !== 'stasis' ? ['step_correlation[i][j]'] : [])].join(', ')}`);
    }
  }
  // Positive semi-definite: every 2 × 2 minor at least, and a Cholesky factor with a tiny ridge.
  for (let i = 0; i < k; i++) for (let j = 0; j < i; j++) {
    if (covariance[i][j] ** 2 > covariance[i][i] * covariance[j][j] * (1 + 1e-12)) throw usageError(`--parameters: ${covarianceName}[${i + 1}][${j + 1}] = ${covariance[i][j]} exceeds sqrt(variance × variance): the covariance must be positive semi-definite`);
  }
  const per = locationsPerTrait(model);
  const locations: number[] = [];
  for (let j = 0; j < k; j++) {
    locations.push(first[j]);
    if (per === 2) locations.push((second as number[])[j]);
  }
  return { locations, covariance: Float64Array.from(covariance.flat()), alpha };
}

/**
 * Simulated groups as a samples CSV in summary form (section, trait,
 * age or time, n, mean, sd): each replicate of each group becomes its own
 * section ("<section> r1"...); a trait missing at a horizon of the design
 * is missing in every replicate; sd = sqrt(e_ij n_ij) reproduces the
 * design's sampling variances. Seeds from (seed, replicate, group) only.
 *
 * @example
 * const rows = ['A,length,3,5,1,0.5', 'A,width,3,5,2,0.5', 'A,length,2,5,1.4,0.5', 'A,width,2,5,2.3,0.5', 'A,length,1,5,2,0.5', 'A,width,1,5,3,0.5', 'A,length,0,5,2.2,0.5', 'A,width,0,5,3.5,0.5'];
 * const [group] = jointGroups(buildLineages(readSamples(readTable(['section,trait,age,n,mean,sd', ...rows].join('\n'), 's.csv'))), 's.csv', new WarningLog());
 * const model = jointModel('independent-random-walks');
 * const truth = jointTruth(model, fitJointModel(model, group.data), 2, undefined);
 * const lines = jointSimulatedTable([group], model, [truth], 2, 1).split('\n');
 * lines[0]; // 'section,trait,age,n,mean,sd'
 * lines.length; // 18 (header, 2 replicates × 4 horizons × 2 traits, trailing newline)
 * lines[1].startsWith('A r1,length,3,5,'); // true
 */
export function jointSimulatedTable(groups: readonly JointGroup[], model: JointModel, truths: readonly JointTruth[], replicates: number, seed: number): string {
  const ages = groups.every((group) => group.positionKind !== 'time');
  const lines = [['section', 'trait', ages ? 'age' : 'time', 'n', 'mean', 'sd'].join(',')];
  const cell = (text: string): string => {
    const safe = neutraliseFormula(text);
    return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
  };
  for (let replicate = 0; replicate < replicates; replicate++) {
    groups.forEach((group, index) => {
      const k = group.traits.length;
      const data = simulateJoint(model, group.data, truths[index], createRandom(replicateSeed(seed, 47, replicate, index)));
      const section = `${group.section === '' ? 'simulated' : group.section}${replicates > 1 ? ` r${replicate + 1}` : ''}`;
      for (let i = 0; i < group.data.time.length; i++) {
        const position = ages ? group.firstAge - group.data.time[i] : group.data.time[i];
        for (let j = 0; j < k; j++) {
          const value = data.values[i * k + j];
          if (Number.isNaN(value)) continue;
          const n = group.count[i * k + j];
          const sd = Math.sqrt(group.data.sampling[i * k * k + j * k + j] * n);
          lines.push([cell(section), cell(group.traits[j]), formatValue(position), String(n), formatValue(value), formatValue(sd)].join(','));
        }
      }
    });
  }
  return lines.join('\n') + '\n';
}

/** Options of the joint path of `simulate`. */
export interface JointSimulateOptions extends Omit<JointOptions, 'seed'> {
  model?: string;
  parameters?: string;
  replicates: number;
  seed: number;
  form?: string;
}

/**
 * `simulate FILE --model <joint model>`: the model fitted to each group of
 * FILE (parameters given by `--parameters` replace the fitted ones), then
 * `replicates` draws per group as a samples CSV.
 *
 * @throws InputError (usage) without FILE, or with --form specimen.
 *
 * @example
 * const text = await jointSimulation('sample-data/shell-shape.csv', { model: 'independent-random-walks', replicates: 1, seed: 1 });
 * text.split('\n').length; // 48 (header, 46 means: 24 horizons × 2 traits less the design's 2 missing values, trailing newline)
 * await jointSimulation(undefined, { model: 'independent-random-walks', replicates: 1, seed: 1 });
 * // throws: --model independent-random-walks is a joint model: give a samples FILE
 */
export async function jointSimulation(file: string | undefined, options: JointSimulateOptions): Promise<string> {
  const model = jointModel(options.model ?? '') as JointModel;
  if (file === undefined) throw usageError(`--model ${model.id} is a joint model: give a samples FILE with two or more traits per section, whose design (times, missing values, sampling variances) and fitted values are used`);
  if ((options.form ?? 'summary') !== 'summary') throw usageError(`--form: the joint models write summary rows only (the sampling covariance between traits of a horizon is not simulated per specimen), got "${options.form}"`);
  const { groups } = await loadJointGroups(file, { ...options, seed: undefined });
  const truths = groups.map((group) => jointTruth(model, fitJointModel(model, group.data), group.traits.length, options.parameters));
  return jointSimulatedTable(groups, model, truths, options.replicates, options.seed);
}

/** One row of the joint power table. */
export interface JointPowerRow {
  /** The true step correlation of the simulated correlated random walks. */
  readonly correlation: number;
  /** Share of replicates where correlated-random-walk has the lower AICc of the two walks. */
  readonly power: number;
  /** Mean estimated correlation over the replicates. */
  readonly meanEstimate: number;
}

/**
 * Power to detect an evolutionary correlation on the design of a group
 * (the first of FILE unless `section`): correlated random walks with the
 * step variances of the independent walks fitted to it and the given true
 * correlation (trait pair 1, 2; the others 0) are simulated `replicates`
 * times; each is fitted by independent-random-walks and
 * correlated-random-walk, and the share where the correlated model has the
 * lower AICc is the power (at correlation 0: the false-correlation rate).
 *
 * @example
 * const rows = ['A,length,3,5,1,0.5', 'A,width,3,5,2,0.5', 'A,length,2,5,1.4,0.5', 'A,width,2,5,2.3,0.5', 'A,length,1,5,2,0.5', 'A,width,1,5,3,0.5', 'A,length,0,5,2.2,0.5', 'A,width,0,5,3.5,0.5'];
 * const [group] = jointGroups(buildLineages(readSamples(readTable(['section,trait,age,n,mean,sd', ...rows].join('\n'), 's.csv'))), 's.csv', new WarningLog());
 * const power = jointCorrelationPower(group, [0], 2, 1);
 * power.rows.map((row) => [row.correlation, row.power]); // [[0, 0]]
 * power.stepVariances[0] / fitJointModel(jointModel('independent-random-walks'), group.data).parameters.step_covariance[0][0]; // 1 (to 1e-9; the independent walks' fitted step variances)
 */
export function jointCorrelationPower(group: JointGroup, correlations: readonly number[], replicates: number, seed: number): { rows: JointPowerRow[]; stepVariances: number[] } {
  const independent = jointModels.find((model) => model.id === 'independent-random-walks') as JointModel;
  const correlated = jointModels.find((model) => model.id === 'correlated-random-walk') as JointModel;
  const fit = fitJointModel(independent, group.data);
  if (!fit.parameters?.step_covariance) throw new InputError(`independent-random-walks could not be fitted to ${group.section || 'the group'}: ${fit.message ?? 'not fitted'}`);
  const k = group.traits.length;
  const variances = fit.parameters.step_covariance.map((row, j) => row[j]);
  if (variances[0] <= 0 || variances[1] <= 0) throw new InputError(`the fitted step variance of ${group.traits[variances[0] <= 0 ? 0 : 1]} is 0 on this design, so no correlation of its steps can be simulated; the design cannot show one`);
  const rows = correlations.map((correlation, index) => {
    const covariance = new Float64Array(k * k);
    for (let j = 0; j < k; j++) covariance[j * k + j] = variances[j];
    covariance[1] = correlation * Math.sqrt(variances[0] * variances[1]);
    covariance[k] = covariance[1];
    const truth: JointTruth = { locations: (fit.parameters?.ancestral_mean as number[]), covariance, alpha: null };
    let detected = 0;
    let estimates = 0;
    for (let replicate = 0; replicate < replicates; replicate++) {
      const data = simulateJoint(correlated, group.data, truth, createRandom(replicateSeed(seed, 53, replicate, index)));
      const { models } = fitJointModels([independent, correlated], data, { intervals: false });
      if ((models[1].aicc ?? Number.POSITIVE_INFINITY) < (models[0].aicc ?? Number.POSITIVE_INFINITY)) detected += 1;
      estimates += models[1].parameters?.step_correlation?.[0][1] ?? 0;
    }
    return { correlation, power: detected / replicates, meanEstimate: estimates / replicates };
  });
  return { rows, stepVariances: variances };
}

/** Options of the joint path of `power` (`--correlations`). */
export interface JointPowerOptions extends Omit<JointOptions, 'threads'> {
  correlations: string;
  replicates?: string;
  seed?: string;
  lineage?: string;
  json?: boolean;
  quiet?: boolean;
}

/**
 * `power FILE --correlations r1,r2,...`: the power to detect an
 * evolutionary correlation between the first two traits of a section
 * (`--lineage` names the section; default the first group) on the file's own
 * design. Returns the text to print: a table, JSON with --json, nothing with
 * --quiet (the command prints it).
 *
 * @example
 * const parse = { replicates: (text) => Number(text ?? 2), seed: (text) => Number(text ?? 1) };
 * await runJointPower('sample-data/shell-shape.csv', { correlations: '0.5,1' }, parse);
 * // throws: --correlations: each value must lie strictly between -1 and 1, got "1"
 */
export async function runJointPower(file: string, options: JointPowerOptions, parse: { replicates: (text: string | undefined) => number; seed: (text: string | undefined) => number }): Promise<string> {
  const correlations = options.correlations.split(',').map((part) => part.trim()).filter((part) => part !== '').map((part) => {
    const value = Number(part);
    if (!(Math.abs(value) < 1)) throw usageError(`--correlations: each value must lie strictly between -1 and 1, got "${part}"`);
    return value;
  });
  if (correlations.length === 0) throw usageError('--correlations: give at least one correlation');
  if (!correlations.includes(0)) correlations.unshift(0);
  const replicates = parse.replicates(options.replicates);
  const seed = parse.seed(options.seed);
  const { groups, input } = await loadJointGroups(file, options);
  const group = options.lineage === undefined ? groups[0] : groups.find((entry) => entry.section === options.lineage);
  if (!group) throw usageError(`--lineage: no section "${options.lineage}" with two or more traits; the sections are ${groups.map((entry) => `"${entry.section}"`).join(', ')}`);
  const { rows, stepVariances } = jointCorrelationPower(group, correlations, replicates, seed);
  if (options.json) {
    return JSON.stringify({
      provenance: { tool: 'stratotrend', command: 'power', inputs: [input], options: { correlations, replicates, seed, section: group.section, traits: group.traits.slice(0, 2) } },
      design: { section: group.section, traits: group.traits, horizons: group.data.time.length, step_variances: stepVariances },
      criterion: 'correlated-random-walk has a lower AICc than independent-random-walks',
      rows: rows.map((row) => ({ correlation: row.correlation, power: row.power, mean_estimate: row.meanEstimate })),
    }, null, 2) + '\n';
  }
  if (options.quiet) return '';
  const lines = [
    `Power to detect a correlation between the steps of ${group.traits[0]} and ${group.traits[1]} (${group.section || 'the file'}: ${group.data.time.length} horizons, its own times, missing values and sampling variances; step variances ${stepVariances.slice(0, 2).map((value) => formatValue(value)).join(' and ')} from independent-random-walks fitted to it; ${replicates} replicates each).`,
    'Detected: correlated-random-walk has a lower AICc than independent-random-walks. At correlation 0 this is the false-correlation rate.',
    '  correlation  detected  mean estimate',
    ...rows.map((row) => `  ${row.correlation.toFixed(2).padStart(11)}  ${row.power.toFixed(3).padStart(8)}  ${row.meanEstimate.toFixed(3).padStart(13)}`),
  ];
  return lines.join('\n') + '\n';
}
