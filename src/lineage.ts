import { InputError } from './data/errors.js';
import type { HorizonRecord, SampleSet, TimeKind } from './data/samples.js';
import type { WarningLog } from './data/warnings.js';

/** The unit of elapsed time: a label and, when known, its length in years. */
export interface TimeUnit {
  /** Unit of elapsed time, e.g. "Myr". */
  readonly label: string;
  /** Years per unit, or null for a unit the tool cannot convert (a custom label). */
  readonly years: number | null;
}

/**
 * Units the tool can convert (common practice: Ma/Myr million years, ka/kyr
 * thousand years, yr years). Any other label is used as given.
 * @example
 * timeUnit('ka'); // { label: 'kyr', years: 1000 }
 * timeUnit('varves'); // { label: 'varves', years: null }
 */
export function timeUnit(name: string): TimeUnit {
  const key = name.trim();
  const known: Record<string, TimeUnit> = {
    ma: { label: 'Myr', years: 1e6 },
    myr: { label: 'Myr', years: 1e6 },
    ka: { label: 'kyr', years: 1e3 },
    kyr: { label: 'kyr', years: 1e3 },
    yr: { label: 'yr', years: 1 },
    a: { label: 'yr', years: 1 },
    years: { label: 'yr', years: 1 },
  };
  return known[key.toLowerCase()] ?? { label: key, years: null };
}

/**
 * Longest plausible span of one lineage, in years (common practice, a rough
 * bound): a species lineage followed through a section lasts a few million
 * years, rarely tens; 100 Myr is generous. A longer span in the stated unit
 * almost always means ages in ka (or years) read as Ma.
 */
export const plausibleLineageSpanYears = 1e8;

/** Units a time axis can be restated in, largest first (the `--time-unit` values). */
const restatedUnits = [
  { option: 'Ma', label: 'Myr', years: 1e6 },
  { option: 'ka', label: 'kyr', years: 1e3 },
  { option: 'yr', label: 'yr', years: 1 },
] as const;

/**
 * The first `--time-unit` (largest first) other than the stated one under
 * which a quantity is plausible, or null. `isPlausible(years)` judges the
 * quantity when one unit of the axis is `years` long.
 *
 * @example
 * plausibleUnit(1e6, (years) => 1923 * years <= 1e8); // { option: 'ka', label: 'kyr' }
 */
export function plausibleUnit(statedYears: number, isPlausible: (years: number) => boolean): { option: string; label: string } | null {
  for (const unit of restatedUnits) {
    if (unit.years === statedYears) continue;
    if (isPlausible(unit.years)) return { option: unit.option, label: unit.label };
  }
  return null;
}

/**
 * Warn (category `time-axis`, one line) when a lineage spans more than
 * {@link plausibleLineageSpanYears} in the stated unit, naming the
 * `--time-unit` that makes the span plausible. Silent for a custom unit.
 * @example
 * const log = new WarningLog();
 * warnImplausibleSpan('A / x', 2000, timeUnit('Ma'), 'age', log);
 * log.list()[0].message.endsWith('if the age values are in kyr, give --time-unit ka (rates are per Myr)'); // true
 */
export function warnImplausibleSpan(name: string, span: number, unit: TimeUnit, kind: string, warnings: Pick<WarningLog, 'add'> | undefined): void {
  if (unit.years === null || !(span * unit.years > plausibleLineageSpanYears)) return;
  const years = unit.years;
  const better = plausibleUnit(years, (candidate) => candidate < years && span * candidate <= plausibleLineageSpanYears);
  warnings?.add(
    'time-axis',
    `${name}: the horizons span ${Number(span.toPrecision(6))} ${unit.label}, more than the ${plausibleLineageSpanYears / 1e6} Myr plausible for one lineage; ${better ? `if the ${kind === 'height' || kind === 'depth' ? "age model's ages" : `${kind} values`} are in ${better.label}, give --time-unit ${better.option}` : 'check the time column and --time-unit'} (rates are per ${unit.label})`,
  );
}

/**
 * One evolving lineage: the horizons of one (section, trait) pair sorted from
 * oldest to youngest, with the sampling variance of each horizon's mean.
 * All arrays have one entry per horizon; the object is never mutated.
 */
export interface Lineage {
  readonly section: string;
  readonly trait: string;
  /** Elapsed time since the oldest horizon, t_0 = 0, strictly increasing, in `timeUnit`. */
  readonly time: Float64Array;
  /** The stratigraphic position as read (age before present, time, height or depth). */
  readonly position: Float64Array;
  readonly positionKind: TimeKind;
  /** Sample mean of the trait at each horizon (x_i). */
  readonly mean: Float64Array;
  /** Number of specimens (n_i). */
  readonly count: Float64Array;
  /** Within-horizon sample variance (v_i, n - 1 divisor), pooled when asked. */
  readonly withinVariance: Float64Array;
  /** Sampling variance of each mean, e_i = v_i / n_i. */
  readonly samplingVariance: Float64Array;
  /** Optional covariate per horizon (NaN where absent). */
  readonly covariate: Float64Array | null;
  /** Input line of each horizon. */
  readonly lines: readonly number[];
  /** Horizons whose age was extrapolated beyond the age model's ties. */
  readonly extrapolated: readonly boolean[];
  /**
   * Age before present of the oldest horizon, so age_i = firstAge - t_i puts
   * lineages of different sections on one timescale (minus the elapsed time
   * for "time" input). Absent for lineages made from arrays (taken as 0).
   */
  readonly firstAge?: number;
  readonly timeUnit: TimeUnit;
  /**
   * Unit of the trait as measured, e.g. "mm" (`--trait-unit`): a label only,
   * never converted; absent or null when none was given. With
   * `logTransformed` the means are ln values of the trait in this unit.
   */
  readonly traitUnit?: string | null;
  readonly pooled: boolean;
  readonly logTransformed: boolean;
}

/** How to assemble lineages from samples. */
export interface LineageOptions {
  /** Pool within-horizon variances over the lineage: v_pooled = sum((n_i - 1) v_i) / sum(n_i - 1). */
  pool?: boolean;
  /** Unit of the input's time column (default Myr for ages in Ma). */
  timeUnit?: TimeUnit;
  /**
   * Unit label of the trait as measured (`--trait-unit`, e.g. "mm"), or a
   * function giving each trait's label by name; carried into every output, never converted.
   */
  traitUnit?: string | null | ((trait: string) => string | null);
  /** Fewest horizons accepted for a lineage (default 3). */
  minimumHorizons?: number;
  warnings?: WarningLog;
  /** Ages of the positions when the samples give heights or depths (from an age model). */
  ageOf?: (section: string, position: number, line: number) => { age: number; extrapolated: boolean };
}

/**
 * Lineage display name: "section / trait" with empty parts left out.
 *
 * @example
 * lineageName({ section: 'Korrin Gap', trait: 'length' }); // 'Korrin Gap / length'
 * lineageName({ section: '', trait: '' }); // 'lineage'
 */
export function lineageName(lineage: { section: string; trait: string }): string {
  const parts = [lineage.section, lineage.trait].filter((part) => part !== '');
  return parts.length === 0 ? 'lineage' : parts.join(' / ');
}

/**
 * Group horizon records into lineages, one per (section, trait) pair in order
 * of first appearance, each sorted by time (older first). Sampling variance of
 * a mean is e_i = v_i / n_i, or v_pooled / n_i with `pool` (MODELS.md).
 *
 * Rows at the same age are merged by {@link mergeSameAge} (reported as a
 * `duplicate-time` warning).
 *
 * @throws InputError for an exact copy of a row, n = 1 without pooling, too few horizons.
 * @example
 * const [lineage] = buildLineages(readSamples(readTable('age,n,mean,sd\n1,5,3,0.5\n3,5,1,0.5\n2,5,2,0.5\n', 'a.csv')));
 * Array.from(lineage.time); // [0, 1, 2] (oldest first, elapsed since age 3)
 * Array.from(lineage.samplingVariance); // [0.05, 0.05, 0.05] (to 1e-15; sd^2 / n)
 */
export function buildLineages(samples: SampleSet, options: LineageOptions = {}): Lineage[] {
  const unit = options.timeUnit ?? timeUnit('Myr');
  const minimum = options.minimumHorizons ?? 3;
  const groups = new Map<string, typeof samples.records[number][]>();
  for (const record of samples.records) {
    const key = `${record.section}\u0000${record.trait}`;
    const group = groups.get(key);
    if (group) group.push(record);
    else groups.set(key, [record]);
  }
  const lineages: Lineage[] = [];
  for (const records of groups.values()) {
    const { section, trait } = records[0];
    const name = lineageName({ section, trait });
    const placed = records.map((record) => {
      if (samples.timeKind === 'height' || samples.timeKind === 'depth') {
        if (!options.ageOf) {
          throw new InputError(`gives "${samples.timeKind}" but no age model was given (use --age-model FILE)`, { file: samples.file, line: 1 });
        }
        const signed = samples.timeKind === 'depth' ? -record.position : record.position;
        const { age, extrapolated } = options.ageOf(section, signed, record.line);
        if (!Number.isFinite(age)) {
          throw new InputError(`the age model gives no finite age for ${samples.timeKind} ${record.position}, got ${age}; check the age model's ties`, { file: samples.file, line: record.line, column: samples.timeKind });
        }
        return { record, age, extrapolated };
      }
      return { record, age: samples.timeKind === 'age' ? record.position : -record.position, extrapolated: false };
    });
    // Older first: larger age first (time is stored as negative age above).
    placed.sort((left, right) => right.age - left.age || left.record.line - right.record.line);
    placed.splice(0, placed.length, ...mergeSameAge(placed, name, samples, options.warnings));
    if (placed.length < minimum) {
      throw new InputError(`lineage "${name}" has ${placed.length} horizon${placed.length === 1 ? '' : 's'}; at least ${minimum} are needed to fit any model`, { file: samples.file, line: placed[0].record.line });
    }
    const count = Float64Array.from(placed, (entry) => entry.record.n);
    let withinVariance = Float64Array.from(placed, (entry) => entry.record.variance);
    if (options.pool) {
      let weighted = 0;
      let degrees = 0;
      for (const { record } of placed) {
        weighted += (record.n - 1) * record.variance;
        degrees += record.n - 1;
      }
      if (degrees === 0) {
        throw new InputError(`lineage "${name}": every horizon has n = 1, so no within-horizon variance can be pooled`, { file: samples.file, line: placed[0].record.line, column: 'n' });
      }
      withinVariance = new Float64Array(placed.length).fill(weighted / degrees);
    } else {
      for (const { record } of placed) {
        if (record.spreadMissing) {
          throw new InputError(
            `is empty where n = 1 (one specimen has no standard deviation), got ""; --pool handles this: it pools the within-horizon variance over the lineage, to which such a horizon adds nothing`,
            { file: samples.file, line: record.line, column: samples.spreadColumn ?? 'sd' },
          );
        }
        if (record.n === 1) {
          throw new InputError(`n = 1 gives no within-horizon variance; use --pool to pool variances over the lineage`, { file: samples.file, line: record.line, column: samples.form === 'summary' ? 'n' : 'value' });
        }
      }
    }
    const samplingVariance = Float64Array.from(withinVariance, (variance, i) => variance / count[i]);
    refuseUnboundedLikelihood(name, placed.map((entry) => entry.record), samplingVariance, samples, options.pool === true);
    const firstAge = placed[0].age;
    const time = Float64Array.from(placed, (entry) => firstAge - entry.age);
    warnImplausibleSpan(name, time[time.length - 1] ?? 0, unit, samples.timeKind, options.warnings);
    const hasCovariate = placed.some((entry) => entry.record.covariate !== undefined);
    for (let i = 0; i < placed.length; i++) {
      if (samplingVariance[i] === 0) {
        options.warnings?.add('zero-sampling-variance', `${name}: horizon at ${samples.timeKind} ${placed[i].record.position} (line ${placed[i].record.line}) has zero sampling variance`);
      }
      if (placed[i].extrapolated) {
        options.warnings?.add('extrapolated-age', `${name}: the age of the horizon at ${samples.timeKind} ${placed[i].record.position} (line ${placed[i].record.line}) is extrapolated beyond the age model's ties`);
      }
    }
    lineages.push({
      section,
      trait,
      time,
      position: Float64Array.from(placed, (entry) => entry.record.position),
      positionKind: samples.timeKind,
      mean: Float64Array.from(placed, (entry) => entry.record.mean),
      count,
      withinVariance,
      samplingVariance,
      covariate: hasCovariate ? Float64Array.from(placed, (entry) => entry.record.covariate ?? Number.NaN) : null,
      lines: placed.map((entry) => entry.record.line),
      extrapolated: placed.map((entry) => entry.extrapolated),
      firstAge,
      timeUnit: unit,
      traitUnit: typeof options.traitUnit === 'function' ? options.traitUnit(trait) : options.traitUnit ?? null,
      pooled: options.pool === true,
      logTransformed: samples.logTransformed,
    });
  }
  return lineages;
}

/**
 * Refuse sampling variances for which no model has a maximum-likelihood fit.
 * A horizon with zero sampling variance among horizons with positive ones
 * lets every model with a process variance fit that horizon exactly as the
 * variance goes to 0, so the likelihood grows without bound (and strict
 * stasis is singular); zero everywhere with identical means leaves nothing to
 * fit. (Zero everywhere with different means is legal: stasis is then an
 * ordinary normal sample, and the walks are reported as not fitted.)
 *
 * @throws InputError naming the first zero-variance horizon.
 * @example
 * const records = [1, 2].map((age, i) => ({ section: '', trait: '', position: age, n: 4, mean: i, variance: i, line: i + 2 }));
 * refuseUnboundedLikelihood('A', records, Float64Array.of(0, 0.25), { file: 'a.csv', timeKind: 'age', form: 'summary', spreadColumn: 'sd' }, false);
 * // throws: a.csv line 2, column "sd": lineage "A": the horizon at age 1 has zero within-horizon variance
 */
export function refuseUnboundedLikelihood(
  name: string,
  records: readonly HorizonRecord[],
  samplingVariance: Float64Array,
  samples: Pick<SampleSet, 'file' | 'timeKind' | 'form'> & { spreadColumn?: string },
  pooled: boolean,
): void {
  const zero = records.findIndex((_, i) => samplingVariance[i] === 0);
  if (zero < 0) return;
  const column = samples.form === 'specimen' ? 'value' : samples.spreadColumn;
  const where = { file: samples.file, line: records[zero].line, ...(column ? { column } : {}) };
  const allZero = records.every((_, i) => samplingVariance[i] === 0);
  if (!allZero) {
    throw new InputError(
      `lineage "${name}": the horizon at ${samples.timeKind} ${records[zero].position} has zero within-horizon variance (its ${records[zero].n} specimens are all equal) while other horizons do not, got variance 0; no model's likelihood has a maximum then (it grows without bound as the model fits that horizon exactly). ${pooled ? 'Check the values of this horizon' : 'Use --pool to pool the within-horizon variance over the lineage, or check the values'}`,
      where,
    );
  }
  if (records.every((record) => record.mean === records[0].mean)) {
    throw new InputError(
      `lineage "${name}": every horizon has the same mean (${records[0].mean}) and zero within-horizon variance, got variance 0 throughout; there is no variation to model`,
      where,
    );
  }
}

/**
 * Merge horizons of one lineage that share an age (the rule for duplicate
 * times): the samples are combined as if their specimens had been listed
 * together, n = sum n_j, mean = sum n_j x_j / n, variance = (sum (n_j - 1) v_j
 * + sum n_j (x_j - mean)^2) / (n - 1) (the exact pooled sample variance of
 * the union, common practice), and a `duplicate-time` warning names the
 * lines. Refused instead: a row that repeats another exactly (a copy) and
 * merged rows with different covariate values.
 *
 * @param placed horizons sorted by age, older first.
 * @throws InputError for an exact copy or conflicting covariates.
 * @example
 * const record = (n, mean, line) => ({ record: { section: '', trait: '', position: 5, n, mean, variance: 1, line }, age: 5, extrapolated: false });
 * const [merged] = mergeSameAge([record(2, 1, 2), record(2, 3, 3)], 'A', { file: 'a.csv', timeKind: 'age' });
 * [merged.record.n, merged.record.mean, merged.record.variance]; // [4, 2, 2] (variance: (1·1 + 1·1 + 2·1 + 2·1) / 3)
 */
export function mergeSameAge<T extends { record: HorizonRecord; age: number; extrapolated: boolean }>(
  placed: readonly T[],
  name: string,
  samples: Pick<SampleSet, 'file' | 'timeKind'>,
  warnings?: WarningLog,
): T[] {
  const merged: T[] = [];
  let start = 0;
  while (start < placed.length) {
    let end = start + 1;
    while (end < placed.length && placed[end].age === placed[start].age) end++;
    if (end - start === 1) {
      merged.push(placed[start]);
      start = end;
      continue;
    }
    const group = placed.slice(start, end);
    const first = group[0].record;
    for (const { record } of group.slice(1)) {
      if (record.position === first.position && record.n === first.n && record.mean === first.mean && record.variance === first.variance) {
        throw new InputError(
          `lineage "${name}": this row repeats line ${first.line} exactly (same ${samples.timeKind}, n, mean and spread), got ${samples.timeKind} "${record.position}"; remove the copy`,
          { file: samples.file, line: record.line, column: samples.timeKind },
        );
      }
      if (record.covariate !== first.covariate) {
        throw new InputError(
          `lineage "${name}": rows at the same ${samples.timeKind} are merged into one horizon but their covariates differ (line ${first.line} has ${first.covariate}), got "${record.covariate}"`,
          { file: samples.file, line: record.line, column: 'covariate' },
        );
      }
    }
    let n = 0;
    let weighted = 0;
    for (const { record } of group) {
      n += record.n;
      weighted += record.n * record.mean;
    }
    const mean = weighted / n;
    let squares = 0;
    for (const { record } of group) squares += (record.n - 1) * record.variance + record.n * (record.mean - mean) ** 2;
    const variance = n > 1 ? squares / (n - 1) : 0;
    const lines = group.map((entry) => entry.record.line);
    warnings?.add(
      'duplicate-time',
      `${name}: ${group.length} rows at ${samples.timeKind} ${first.position} (lines ${lines.join(', ')}) merged into one horizon (n = ${n}; mean weighted by n; variance of the combined specimens)`,
    );
    merged.push({ ...group[0], record: { ...first, n, mean, variance, spreadMissing: false }, extrapolated: group.some((entry) => entry.extrapolated) });
    start = end;
  }
  return merged;
}

/**
 * A lineage made directly from arrays (for simulation and tests). Times must be
 * strictly increasing from 0.
 * @example
 * lineageFromArrays({ time: [0, 1], mean: [1, 2], samplingVariance: [0.1, 0.1] }).lines; // [2, 3] (as if read from a file with a header)
 */
export function lineageFromArrays(input: {
  time: ArrayLike<number>;
  mean: ArrayLike<number>;
  samplingVariance: ArrayLike<number>;
  count?: ArrayLike<number>;
  section?: string;
  trait?: string;
  timeUnit?: TimeUnit;
  traitUnit?: string | null;
  covariate?: ArrayLike<number>;
}): Lineage {
  const n = input.time.length;
  const count = input.count ? Float64Array.from(input.count) : new Float64Array(n).fill(1);
  const samplingVariance = Float64Array.from(input.samplingVariance);
  const time = Float64Array.from(input.time);
  return {
    section: input.section ?? '',
    trait: input.trait ?? '',
    time,
    position: Float64Array.from(time),
    positionKind: 'time',
    mean: Float64Array.from(input.mean),
    count,
    withinVariance: Float64Array.from(samplingVariance, (value, i) => value * count[i]),
    samplingVariance,
    covariate: input.covariate ? Float64Array.from(input.covariate) : null,
    lines: Array.from({ length: n }, (_, i) => i + 2),
    extrapolated: new Array<boolean>(n).fill(false),
    timeUnit: input.timeUnit ?? timeUnit('Myr'),
    traitUnit: input.traitUnit ?? null,
    pooled: false,
    logTransformed: false,
  };
}
