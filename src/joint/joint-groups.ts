import { InputError } from '../data/errors.js';
import { numberCell, sectionColumnOf, type SampleSet } from '../data/samples.js';
import type { Table } from '../data/read-table.js';
import type { WarningLog } from '../data/warnings.js';
import type { Lineage, TimeUnit } from '../lineage.js';
import { choleskyInPlace, type JointData } from './vector-filter.js';

/**
 * One group of `stratotrend joint`: the traits of one section, in file
 * order, on the union of their horizons (t from the group's oldest horizon).
 */
export interface JointGroup {
  readonly section: string;
  readonly traits: readonly string[];
  readonly data: JointData;
  /** Stratigraphic position of each horizon as read (age, time, height or depth). */
  readonly position: Float64Array;
  readonly positionKind: Lineage['positionKind'];
  /** Age before present of the oldest horizon (when known). */
  readonly firstAge: number;
  /** Specimens per (horizon, trait), 0 where missing; horizon-major. */
  readonly count: Float64Array;
  /** How the within-horizon covariance between traits was obtained. */
  readonly samplingCovariance: 'diagonal' | 'estimated';
  readonly timeUnit: TimeUnit;
  readonly traitUnits: readonly (string | null)[];
  readonly logTransformed: boolean;
  /** Input line of the first row of each trait (for messages). */
  readonly firstLines: readonly number[];
}

/**
 * Within-horizon covariance between two traits from specimens measured for
 * both (a `specimen` column): the specimens of one (section, horizon) keyed
 * by their id, each with its value per trait.
 */
export type SpecimenTable = Map<string, Map<string, Map<string, number>>>;

/**
 * Read the specimen rows of a specimen-form file that has a `specimen`
 * column: per (section, position), per specimen id, the value of each trait
 * (natural log with `log`).
 *
 * @throws InputError naming file, line, column and value for a specimen measured twice for one trait.
 *
 * @example
 * const table = readTable('section,trait,age,specimen,value\nA,length,1,s1,1\nA,width,1,s1,2\nA,length,0,s2,2\nA,width,0,s2,3\n', 's.csv');
 * const specimens = readSpecimens(table, readSamples(table), {});
 * specimens.get('A\u00001').get('s1'); // new Map([['length', 1], ['width', 2]])
 * readSpecimens(table, readSamples(readTable('age,n,mean,sd\n1,5,3,0.5\n', 'a.csv')), {}); // null (summary form: no specimens)
 */
export function readSpecimens(table: Table, samples: SampleSet, options: { log?: boolean; decimalComma?: boolean }): SpecimenTable | null {
  const at = (name: string): number => table.header.indexOf(name);
  if (samples.form !== 'specimen' || at('specimen') < 0) return null;
  const sectionName = sectionColumnOf(table.header, table.file, table.rawHeader);
  const specimens: SpecimenTable = new Map();
  const seen = new Map<string, number>();
  for (const { line, cells } of table.rows) {
    const section = sectionName ? cells[at(sectionName)].normalize('NFC') : '';
    const trait = at('trait') >= 0 ? cells[at('trait')].normalize('NFC') : '';
    const position = numberCell(cells[at(samples.timeKind)], { file: table.file, line, column: samples.timeKind }, options.decimalComma === true);
    const id = cells[at('specimen')].trim();
    if (id === '') continue;
    let value = numberCell(cells[at('value')], { file: table.file, line, column: 'value' }, options.decimalComma === true);
    if (options.log) value = Math.log(value);
    const horizonKey = `${section}\u0000${position}`;
    const key = `${horizonKey}\u0000${id}\u0000${trait}`;
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      throw new InputError(`specimen "${id}" is measured twice for trait "${trait}" at ${samples.timeKind} ${position} (also line ${earlier}), got "${cells[at('specimen')]}"; give one value per specimen and trait`, { file: table.file, line, column: 'specimen' });
    }
    seen.set(key, line);
    let horizon = specimens.get(horizonKey);
    if (!horizon) specimens.set(horizonKey, (horizon = new Map()));
    let specimen = horizon.get(id);
    if (!specimen) horizon.set(id, (specimen = new Map()));
    specimen.set(trait, value);
  }
  return specimens;
}

/**
 * Group lineages by section (traits in file order) for the joint models.
 * A section with one trait is skipped with a note (warning category
 * `input`). The group's horizons are the union of its traits' positions; a
 * trait missing at a horizon is NaN. The sampling covariance E_i is
 * diagonal (each trait's e_ij = v_ij / n_ij) unless `specimens` gives the
 * specimens measured for several traits; then E_i,jl = r_jl sqrt(e_ij e_il)
 * n_jl / sqrt(n_ij n_il), r_jl the correlation of the n_jl specimens
 * measured for both (= S_i / n_i when every specimen has every trait).
 *
 * @throws InputError when two traits of a group share no horizon, or no group has two traits.
 *
 * @example
 * // Three horizons, two or three specimens each measured for both traits: the within-horizon covariance is estimated.
 * const rows = ['A,length,2,s1,1', 'A,width,2,s1,2', 'A,length,2,s2,1.5', 'A,width,2,s2,2.4', 'A,length,2,s3,1.2', 'A,width,2,s3,2.1', 'A,length,1,s4,2', 'A,width,1,s4,3', 'A,length,1,s5,2.4', 'A,width,1,s5,3.3', 'A,length,0,s6,2', 'A,width,0,s6,3', 'A,length,0,s7,2.6', 'A,width,0,s7,3.5'];
 * const table = readTable(['section,trait,age,specimen,value', ...rows].join('\n'), 's.csv');
 * const samples = readSamples(table);
 * const [group] = jointGroups(buildLineages(samples), 's.csv', new WarningLog(), readSpecimens(table, samples, {}));
 * group.traits; // ['length', 'width']
 * group.samplingCovariance; // 'estimated'
 * group.data.sampling[0]; // 0.021111111111111112 (to 1e-15; the sample variance of 1, 1.5, 1.2 is 0.0633..., over n = 3)
 */
export function jointGroups(lineages: readonly Lineage[], file: string, warnings: WarningLog, specimens: SpecimenTable | null = null): JointGroup[] {
  const sections = new Map<string, Lineage[]>();
  for (const lineage of lineages) {
    const list = sections.get(lineage.section);
    if (list) list.push(lineage);
    else sections.set(lineage.section, [lineage]);
  }
  const groups: JointGroup[] = [];
  for (const [section, members] of sections) {
    const name = section === '' ? 'the file' : `section "${section}"`;
    if (members.length < 2) {
      warnings.add('input', `${name} has one trait ("${members[0].trait}"): skipped, the joint models need two or more`);
      continue;
    }
    groups.push(groupOf(section, members, file, specimens, warnings));
  }
  if (groups.length === 0) {
    throw new InputError('no section has two or more traits, so there is nothing to fit jointly (add a "trait" column naming each measurement, or use "stratotrend fit" for one trait)', { file });
  }
  return groups;
}

function groupOf(section: string, members: readonly Lineage[], file: string, specimens: SpecimenTable | null, warnings: WarningLog): JointGroup {
  const k = members.length;
  const firstAge = Math.max(...members.map((lineage) => lineage.firstAge ?? 0));
  // One horizon per position as read; t_i from the group's oldest (exactly the trait's own t when it starts there).
  const horizons = new Map<number, number>();
  for (const lineage of members) {
    const offset = firstAge - (lineage.firstAge ?? 0);
    lineage.position.forEach((position, i) => {
      if (!horizons.has(position)) horizons.set(position, offset === 0 ? lineage.time[i] : offset + lineage.time[i]);
    });
  }
  const order = [...horizons.entries()].sort((left, right) => left[1] - right[1]);
  const row = new Map(order.map(([position], i) => [position, i]));
  const count = order.length;
  const values = new Float64Array(count * k).fill(Number.NaN);
  const sampling = new Float64Array(count * k * k);
  const counts = new Float64Array(count * k);
  members.forEach((lineage, j) => {
    lineage.position.forEach((position, i) => {
      const at = row.get(position) as number;
      values[at * k + j] = lineage.mean[i];
      sampling[at * k * k + j * k + j] = lineage.samplingVariance[i];
      counts[at * k + j] = lineage.count[i];
    });
  });
  for (let j = 0; j < k; j++) {
    for (let l = 0; l < j; l++) {
      let shared = false;
      for (let i = 0; i < count && !shared; i++) shared = !Number.isNaN(values[i * k + j]) && !Number.isNaN(values[i * k + l]);
      if (!shared) {
        throw new InputError(
          `traits "${members[l].trait}" and "${members[j].trait}" of ${section === '' ? 'the file' : `section "${section}"`} share no horizon, got "${members[j].trait}" only where "${members[l].trait}" is absent; the joint models need the traits measured together at least once (fit them one by one with "stratotrend fit")`,
          { file, line: members[j].lines[0], column: 'trait' },
        );
      }
    }
  }
  if (specimens) {
    order.forEach(([position], i) => {
      const horizon = specimens.get(`${section}\u0000${position}`);
      if (!horizon) return;
      for (let j = 0; j < k; j++) {
        for (let l = 0; l < j; l++) {
          const pairs: [number, number][] = [];
          for (const measured of horizon.values()) {
            const a = measured.get(members[j].trait);
            const b = measured.get(members[l].trait);
            if (a !== undefined && b !== undefined) pairs.push([a, b]);
          }
          if (pairs.length < 2) continue;
          const meanA = pairs.reduce((sum, pair) => sum + pair[0], 0) / pairs.length;
          const meanB = pairs.reduce((sum, pair) => sum + pair[1], 0) / pairs.length;
          let sab = 0;
          let saa = 0;
          let sbb = 0;
          for (const [a, b] of pairs) {
            sab += (a - meanA) * (b - meanB);
            saa += (a - meanA) ** 2;
            sbb += (b - meanB) ** 2;
          }
          if (!(saa > 0 && sbb > 0)) continue;
          const correlation = sab / Math.sqrt(saa * sbb);
          const nj = counts[i * k + j];
          const nl = counts[i * k + l];
          const value = correlation * Math.sqrt(sampling[i * k * k + j * k + j] * sampling[i * k * k + l * k + l]) * pairs.length / Math.sqrt(nj * nl);
          sampling[i * k * k + j * k + l] = value;
          sampling[i * k * k + l * k + j] = value;
        }
      }
      // With three or more traits, correlations estimated from different subsets of specimens (each pair from the
      // specimens measured for both) need not fit together: the matrix can have a negative eigenvalue, which no
      // sampling covariance has. Its off-diagonal terms are then scaled down to the largest share that is valid.
      if (k < 3) return;
      const shrink = validCovarianceShare(sampling.subarray(i * k * k, (i + 1) * k * k), k);
      if (shrink < 1) {
        for (let j = 0; j < k; j++) for (let l = 0; l < k; l++) if (j !== l) sampling[i * k * k + j * k + l] *= shrink;
        const where = `${section === '' ? 'the file' : `section "${section}"`} at ${members[0].positionKind} ${position}`;
        warnings.add(
          'input',
          `${where}: the within-horizon correlations of ${members.map((lineage) => `"${lineage.trait}"`).join(', ')}, each estimated from the specimens measured for both traits of a pair, do not form a valid covariance matrix (specimens measured for only some of the traits); their covariances were scaled by ${shrink.toPrecision(3)}, the largest share that is valid`,
        );
      }
    });
  }
  return {
    section,
    traits: members.map((lineage) => lineage.trait),
    data: { traits: k, time: Float64Array.from(order, ([, t]) => t), values, sampling },
    position: Float64Array.from(order, ([position]) => position),
    positionKind: members[0].positionKind,
    firstAge,
    count: counts,
    samplingCovariance: specimens ? 'estimated' : 'diagonal',
    timeUnit: members[0].timeUnit,
    traitUnits: members.map((lineage) => lineage.traitUnit ?? null),
    logTransformed: members[0].logTransformed,
    firstLines: members.map((lineage) => lineage.lines[0]),
  };
}

/**
 * The largest share s in [0, 1] of the off-diagonal terms of a symmetric
 * k × k matrix (row-major, positive diagonal) that leaves it positive
 * semi-definite: 1 when it already is (to rounding), else found by
 * bisection (40 halvings) on the Cholesky factorisation of D + s O (D its
 * diagonal, O the rest; at s = 0 the diagonal alone is valid), with the
 * diagonal 1e-10 smaller so that the result is safely positive definite.
 *
 * @example
 * validCovarianceShare(Float64Array.of(1, 0.5, 0.5, 1), 2); // 1 (already valid)
 * // Correlations 0.9, 0.9 and -0.9 cannot hold together; halved they can (common practice: a Cholesky factor exists only for a positive definite matrix).
 * validCovarianceShare(Float64Array.of(1, 0.9, 0.9, 0.9, 1, -0.9, 0.9, -0.9, 1), 3) < 0.6; // true
 */
export function validCovarianceShare(matrix: ArrayLike<number>, k: number): number {
  const margin = 1e-10;
  // The first check tolerates rounding (a valid matrix is left alone); the shares tried after it must be valid with the
  // diagonal a little smaller, so that the result is safely positive definite.
  let diagonalFactor = 1 + margin;
  const trial = new Float64Array(k * k);
  const valid = (share: number): boolean => {
    for (let j = 0; j < k; j++) for (let l = 0; l < k; l++) trial[j * k + l] = j === l ? matrix[j * k + j] * diagonalFactor : share * matrix[j * k + l];
    return choleskyInPlace(trial, k);
  };
  if (valid(1)) return 1;
  diagonalFactor = 1 - margin;
  let low = 0;
  let high = 1;
  for (let step = 0; step < 40; step++) {
    const middle = 0.5 * (low + high);
    if (valid(middle)) low = middle;
    else high = middle;
  }
  return low;
}
