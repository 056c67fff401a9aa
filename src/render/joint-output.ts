import type { Warning } from '../data/warnings.js';
import type { JointParameters, RankedJointFit } from '../joint/fit-joint.js';
import type { JointInterval, JointIntervals } from '../joint/joint-intervals.js';
import type { JointGroup } from '../joint/joint-groups.js';
import { finiteOrNull, rankingDocument, type Provenance } from './fit-document.js';
import { csvField } from './models-csv.js';
import { formatFixed } from './units.js';
import { jointCoverageNote, stepCovarianceAtBoundary } from './measured-cautions.js';

/** One group's fits, as `stratotrend joint` computed them. */
export interface JointGroupFit {
  readonly group: JointGroup;
  readonly models: readonly RankedJointFit[];
  readonly best: string | null;
}

const rounded = (value: number | null): number | null => finiteOrNull(value);
const matrix = (rows: readonly (readonly (number | null)[])[] | null): (number | null)[][] | null => (rows ? rows.map((row) => row.map(rounded)) : null);
const vector = (values: readonly (number | null)[] | null): (number | null)[] | null => (values ? values.map(rounded) : null);

function paramsDocument(parameters: JointParameters | null): Record<string, unknown> | null {
  if (!parameters) return null;
  return {
    ancestral_mean: vector(parameters.ancestral_mean),
    drift: vector(parameters.drift),
    step_covariance: matrix(parameters.step_covariance),
    step_correlation: matrix(parameters.step_correlation),
    stasis_mean: vector(parameters.stasis_mean),
    stasis_covariance: matrix(parameters.stasis_covariance),
    optimum: vector(parameters.optimum),
    alpha: vector(parameters.alpha),
  };
}

const end = (value: number | null): number | null => finiteOrNull(value);
const pairOf = (interval: JointInterval | null): [number | null, number | null] | null => (interval ? [end(interval.lower), end(interval.upper)] : null);

function intervalsDocument(intervals: JointIntervals | null, coverageNote: string | null): Record<string, unknown> | null {
  if (!intervals) return null;
  const list = (values: readonly JointInterval[] | null) => (values ? values.map(pairOf) : null);
  const grid = (rows: readonly (readonly (JointInterval | null)[])[] | null) => (rows ? rows.map((row) => row.map(pairOf)) : null);
  return {
    method: intervals.method,
    level: intervals.level,
    ancestral_mean: list(intervals.ancestral_mean),
    drift: list(intervals.drift),
    step_covariance: grid(intervals.step_covariance),
    step_correlation: grid(intervals.step_correlation),
    stasis_mean: list(intervals.stasis_mean),
    stasis_covariance: grid(intervals.stasis_covariance),
    stasis_correlation: grid(intervals.stasis_correlation),
    optimum: list(intervals.optimum),
    alpha: list(intervals.alpha),
    coverage_note: coverageNote,
  };
}

/**
 * The data of a group as the figures and the report read them: the vertical
 * axis ("age" before present, or "time" elapsed), each horizon's position on
 * it, the trait means (null where missing) and the sampling covariance E_i.
 */
function seriesDocument(group: JointGroup): Record<string, unknown> {
  const k = group.traits.length;
  const agesKnown = group.positionKind !== 'time';
  return {
    axis: agesKnown ? 'age' : 'time',
    position: Array.from(group.data.time, (t) => (agesKnown ? group.firstAge - t : t)),
    time: Array.from(group.data.time),
    mean: Array.from(group.data.time, (_, i) => Array.from({ length: k }, (_, j) => finiteOrNull(group.data.values[i * k + j]))),
    count: Array.from(group.data.time, (_, i) => Array.from({ length: k }, (_, j) => group.count[i * k + j])),
    sampling_covariance: Array.from(group.data.time, (_, i) => Array.from({ length: k }, (_, j) => Array.from({ length: k }, (_, l) => group.data.sampling[i * k * k + j * k + l]))),
  };
}

/**
 * Number of observed trait values of a group (N of AICc).
 *
 * @example
 * const rows = ['A,length,2,5,1,0.5', 'A,width,2,5,2,0.5', 'A,length,1,5,2,0.5', 'A,width,1,5,3,0.5', 'A,length,0,5,2,0.5', 'A,width,0,5,3.5,0.5'];
 * const table = readTable(['section,trait,age,n,mean,sd', ...rows].join('\n'), 's.csv');
 * const [group] = jointGroups(buildLineages(readSamples(table)), 's.csv', new WarningLog());
 * observationsOf(group); // 6 (3 horizons × 2 traits, none missing)
 */
export function observationsOf(group: JointGroup): number {
  let count = 0;
  for (const value of group.data.values) if (!Number.isNaN(value)) count += 1;
  return count;
}

/**
 * The JSON document of `stratotrend joint`: provenance, then per group its
 * section, traits (file order; every array below follows it), horizons,
 * observed values, how the sampling covariance was obtained, the best
 * model and every model with its estimates (`params`), `intervals` (null
 * when not computed) and flags.
 *
 * @example
 * const rows = ['A,length,2,5,1,0.5', 'A,width,2,5,2,0.5', 'A,length,1,5,2,0.5', 'A,width,1,5,3,0.5', 'A,length,0,5,2,0.5', 'A,width,0,5,3.5,0.5'];
 * const table = readTable(['section,trait,age,n,mean,sd', ...rows].join('\n'), 's.csv');
 * const [group] = jointGroups(buildLineages(readSamples(table)), 's.csv', new WarningLog());
 * const fitted = { group, ...fitJointModels([jointModel('independent-stasis')], group.data) };
 * const document = jointDocument([fitted], { tool: 'stratotrend', version: '0.1.0', inputs: [], options: {} }, []);
 * document.groups[0].best_model; // 'independent-stasis'
 * document.groups[0].observations; // 6
 */
export function jointDocument(fits: readonly JointGroupFit[], provenance: Provenance, warnings: readonly Warning[]): Record<string, unknown> {
  return {
    provenance,
    groups: fits.map(({ group, models, best }) => ({
      section: group.section,
      traits: group.traits,
      trait_units: group.traitUnits,
      time_unit: group.timeUnit.label,
      log_transformed: group.logTransformed,
      horizons: group.data.time.length,
      observations: observationsOf(group),
      sampling_covariance: group.samplingCovariance,
      best_model: best,
      series: seriesDocument(group),
      models: models.map((model) => ({
        ...rankingDocument(model),
        compared: model.aicc !== null,
        not_compared: model.notCompared,
        params: paramsDocument(model.parameters),
        intervals: intervalsDocument(model.intervals, jointCoverageNote(model.id, stepCovarianceAtBoundary(model.flags))),
        flags: model.flags,
      })),
    })),
    warnings: warnings.map((warning) => ({ category: warning.category, message: warning.message, count: warning.count })),
  };
}

/**
 * The tidy table of `stratotrend joint --out` (joint-models.csv): one row
 * per group × model × parameter entry, with the parameter's name, the
 * traits it concerns (one, or two for a covariance or correlation entry)
 * and its estimate; the model's logL, AICc, weight and whether it is the
 * best are repeated on each row.
 *
 * @example
 * const rows = ['A,length,2,5,1,0.5', 'A,width,2,5,2,0.5', 'A,length,1,5,2,0.5', 'A,width,1,5,3,0.5', 'A,length,0,5,2,0.5', 'A,width,0,5,3.5,0.5'];
 * const table = readTable(['section,trait,age,n,mean,sd', ...rows].join('\n'), 's.csv');
 * const [group] = jointGroups(buildLineages(readSamples(table)), 's.csv', new WarningLog());
 * const fitted = { group, ...fitJointModels([jointModel('independent-stasis')], group.data) };
 * jointModelsCsv([fitted]).split('\n')[1]; // 'A,independent-stasis,4,-4.840822690802348,57.681645381604696,0,1,true,stasis_mean,length,,1.6666666666666667' (equal weights: the mean of 1, 2, 2)
 */
export function jointModelsCsv(fits: readonly JointGroupFit[]): string {
  const header = ['section', 'model', 'k', 'logLik', 'aicc', 'delta_aicc', 'weight', 'best', 'parameter', 'trait', 'trait_2', 'estimate'];
  const rows = [header.join(',')];
  for (const { group, models, best } of fits) {
    for (const model of models) {
      const common = [group.section, model.id, model.k, finiteOrNull(model.logLik), finiteOrNull(model.aicc), finiteOrNull(model.deltaAicc), finiteOrNull(model.weight), model.id === best];
      const parameters = model.parameters;
      if (!parameters) {
        rows.push([...common, null, null, null, null].map(csvField).join(','));
        continue;
      }
      for (const name of ['ancestral_mean', 'drift', 'stasis_mean', 'optimum', 'alpha'] as const) {
        parameters[name]?.forEach((value, j) => rows.push([...common, name, group.traits[j], null, finiteOrNull(value)].map(csvField).join(',')));
      }
      for (const name of ['step_covariance', 'step_correlation', 'stasis_covariance'] as const) {
        parameters[name]?.forEach((row, j) => row.forEach((value, l) => {
          if (l > j || (name === 'step_correlation' && l === j)) return;
          rows.push([...common, name, group.traits[j], l === j ? null : group.traits[l], finiteOrNull(value)].map(csvField).join(','));
        }));
      }
    }
  }
  return rows.join('\n') + '\n';
}

function number(value: number | null, digits = 4): string {
  if (value === null || !Number.isFinite(value)) return '—';
  return Number(value.toPrecision(digits)).toString();
}

/**
 * The correlations of a model in words, e.g.
 * "steps of length and width are correlated: 0.82".
 *
 * @example
 * correlationWords(['length', 'width'], [[1, 0.82], [0.82, 1]], 'steps'); // ['steps of length and width are correlated: 0.82']
 */
export function correlationWords(traits: readonly string[], correlation: readonly (readonly (number | null)[])[], what: string, intervals: readonly (readonly (JointInterval | null)[])[] | null = null): string[] {
  const lines: string[] = [];
  for (let j = 0; j < traits.length; j++) {
    for (let l = j + 1; l < traits.length; l++) {
      const value = correlation[j][l];
      if (value === null) continue;
      const strength = Math.abs(value) < 0.1 ? 'nearly uncorrelated' : value > 0 ? 'correlated' : 'negatively correlated';
      const interval = intervals?.[j]?.[l] ?? null;
      const ends = interval ? ` [${number(interval.lower, 2)}, ${number(interval.upper, 2)}]` : '';
      lines.push(`${what} of ${traits[j] || `trait ${j + 1}`} and ${traits[l] || `trait ${l + 1}`} are ${strength}: ${number(value, 2)}${ends}`);
    }
  }
  return lines;
}

/**
 * The terminal text of `stratotrend joint`: per group a model table, the best model and its correlations in words.
 *
 * @example
 * const rows = ['A,length,2,5,1,0.5', 'A,width,2,5,2,0.5', 'A,length,1,5,2,0.5', 'A,width,1,5,3,0.5', 'A,length,0,5,2,0.5', 'A,width,0,5,3.5,0.5'];
 * const table = readTable(['section,trait,age,n,mean,sd', ...rows].join('\n'), 's.csv');
 * const [group] = jointGroups(buildLineages(readSamples(table)), 's.csv', new WarningLog());
 * const fitted = { group, ...fitJointModels([jointModel('independent-stasis')], group.data) };
 * jointText([fitted]).split('\n')[2]; // '  independent-stasis  4  -4.841  57.682  0.000   1.000' (AICc = -2 logL + 8 + 2 × 4 × 5 / (6 - 4 - 1))
 */
export function jointText(fits: readonly JointGroupFit[]): string {
  const blocks = fits.map(({ group, models, best }) => {
    const lines: string[] = [];
    const title = group.section === '' ? 'Traits' : `Section ${group.section}`;
    lines.push(`${title}: ${group.traits.join(', ')} (${group.data.time.length} horizons, ${observationsOf(group)} observed values; sampling covariance ${group.samplingCovariance === 'diagonal' ? 'diagonal: summary rows give no covariance between traits, taken as 0' : 'estimated from specimens measured for several traits'})`);
    const header = ['model', 'K', 'logL', 'AICc', 'ΔAICc', 'weight'];
    // The same columns and decimals as fit's table (render/text-table.ts); models by id, as --models takes them.
    const table = models.map((model) => [model.id, String(model.k), formatFixed(model.logLik, 3), formatFixed(model.aicc, 3), formatFixed(model.deltaAicc, 3), model.weight === null ? '—' : model.weight.toFixed(3)]);
    const widths = header.map((name, c) => Math.max(name.length, ...table.map((row) => row[c].length)));
    const format = (row: string[]): string => '  ' + row.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join('  ');
    lines.push(format(header));
    for (const row of table) lines.push(format(row));
    for (const model of models) if (model.notCompared) lines.push(`  ${model.id}: ${model.notCompared}`);
    const winner = models.find((model) => model.id === best);
    if (!winner) {
      lines.push('  No model could be compared.');
      return lines.join('\n');
    }
    lines.push(`  Best supported: ${winner.id} (Akaike weight ${winner.weight === null ? '—' : winner.weight.toFixed(3)}).`);
    const parameters = winner.parameters;
    if (parameters?.step_correlation && winner.id.startsWith('correlated')) lines.push(...correlationWords(group.traits, parameters.step_correlation, '  Steps', winner.intervals?.step_correlation ?? null));
    if (parameters?.stasis_covariance && winner.id.startsWith('correlated')) {
      const correlation = parameters.stasis_covariance.map((row, j) => row.map((value, l) => value / Math.sqrt(parameters.stasis_covariance![j][j] * parameters.stasis_covariance![l][l])));
      lines.push(...correlationWords(group.traits, correlation, '  Fluctuations', winner.intervals?.stasis_correlation ?? null));
    }
    for (const flag of winner.flags) lines.push(`  Note: ${flag}.`);
    return lines.join('\n');
  });
  return blocks.join('\n\n');
}
