import { InputError } from './errors.js';
import type { Table } from './read-table.js';
import { RunningMoments } from './summarise.js';

/** Which column carries the stratigraphic position of a horizon. */
export type TimeKind = 'age' | 'time' | 'height' | 'depth';

/** Summary statistics of one horizon of one (section, trait) lineage, before sorting. */
export interface HorizonRecord {
  readonly section: string;
  readonly trait: string;
  /** The value of the time column as read (age, elapsed time, height or depth). */
  readonly position: number;
  readonly n: number;
  readonly mean: number;
  /** Within-horizon sample variance (n - 1 divisor), on the analysed scale. */
  readonly variance: number;
  /** Input line of the (first) row of this horizon. */
  readonly line: number;
  /** Optional environmental covariate value at this horizon. */
  readonly covariate?: number;
}

/** The horizons of a file with what kind of input they came from. */
export interface SampleSet {
  readonly file: string;
  readonly form: 'summary' | 'specimen';
  readonly timeKind: TimeKind;
  readonly records: readonly HorizonRecord[];
  readonly logTransformed: boolean;
}

/** How to turn table rows into horizons. */
export interface SampleOptions {
  /** Natural-log transform (specimens one by one; summaries by the delta method). */
  log?: boolean;
  /** Read a decimal comma ("1,5") as a decimal point. */
  decimalComma?: boolean;
}

/** Column names the tool knows; anything else is ignored unless it looks like a typo of one. */
export const knownColumns = [
  'section', 'trait', 'age', 'time', 'height', 'depth', 'n', 'mean', 'sd', 'var', 'value', 'covariate',
] as const;

const numberPattern = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Validate a table of samples (summary form: one row per horizon with n, mean
 * and sd or var; specimen form: one row per specimen with value) and return
 * one record per horizon. Specimens are summarised with a numerically stable
 * variance; `log` applies the natural-log transform (delta method for summaries:
 * mean_ln = ln(mean), v_ln = (sd / mean)^2, common practice).
 *
 * @throws InputError naming file, line, column and value for every bad cell.
 */
export function readSamples(table: Table, options: SampleOptions = {}): SampleSet {
  const { file, header } = table;
  const column = (name: string): number => header.indexOf(name);
  checkTypos(table);
  const timeColumns = (['age', 'time', 'height', 'depth'] as const).filter((name) => column(name) >= 0);
  if (timeColumns.length === 0) {
    throw new InputError('no time column: expected one of "age" (before present), "time" (elapsed), "height" or "depth"', { file, line: 1 });
  }
  if (timeColumns.length > 1) {
    throw new InputError(`more than one time column (${timeColumns.join(', ')}): keep exactly one`, { file, line: 1 });
  }
  const timeKind = timeColumns[0];
  const specimenForm = column('value') >= 0 && column('mean') < 0;
  const number = (cells: readonly string[], line: number, name: string): number => {
    const raw = cells[column(name)];
    const text = options.decimalComma ? raw.replace(',', '.') : raw;
    if (raw === '') throw new InputError('is empty, expected a number', { file, line, column: name });
    if (!numberPattern.test(text)) {
      const hint = !options.decimalComma && /^[+-]?\d+,\d+$/.test(raw) ? ' (for a decimal comma use --decimal-comma)' : '';
      throw new InputError(`must be a finite number, got "${raw}"${hint}`, { file, line, column: name });
    }
    const value = Number(text);
    if (!Number.isFinite(value)) throw new InputError(`must be a finite number, got "${raw}"`, { file, line, column: name });
    return value;
  };
  const label = (cells: readonly string[], name: string): string => (column(name) >= 0 ? cells[column(name)] : '');
  const covariateOf = (cells: readonly string[], line: number): number | undefined =>
    column('covariate') >= 0 ? number(cells, line, 'covariate') : undefined;

  if (specimenForm) {
    const groups = new Map<string, { section: string; trait: string; position: number; line: number; moments: RunningMoments; covariate?: number }>();
    for (const { line, cells } of table.rows) {
      const position = number(cells, line, timeKind);
      let value = number(cells, line, 'value');
      if (options.log) {
        if (!(value > 0)) throw new InputError(`must be positive to take its logarithm (--log), got "${cells[column('value')]}"`, { file, line, column: 'value' });
        value = Math.log(value);
      }
      const section = label(cells, 'section');
      const trait = label(cells, 'trait');
      const key = `${section}\u0000${trait}\u0000${position}`;
      let group = groups.get(key);
      if (!group) {
        group = { section, trait, position, line, moments: new RunningMoments(), covariate: covariateOf(cells, line) };
        groups.set(key, group);
      }
      group.moments.add(value);
    }
    const records = [...groups.values()].map((group) => ({
      section: group.section,
      trait: group.trait,
      position: group.position,
      n: group.moments.n,
      mean: group.moments.mean(),
      variance: group.moments.variance(),
      line: group.line,
      covariate: group.covariate,
    }));
    return { file, form: 'specimen', timeKind, records, logTransformed: options.log === true };
  }

  for (const required of ['n', 'mean']) {
    if (column(required) < 0) {
      throw new InputError(`missing required column "${required}" (summary form needs n, mean and sd or var; specimen form needs value)`, { file, line: 1 });
    }
  }
  const hasSd = column('sd') >= 0;
  const hasVar = column('var') >= 0;
  if (!hasSd && !hasVar) throw new InputError('missing required column "sd" or "var"', { file, line: 1 });
  if (hasSd && hasVar) throw new InputError('has both "sd" and "var": keep one', { file, line: 1 });
  const records = table.rows.map(({ line, cells }): HorizonRecord => {
    const position = number(cells, line, timeKind);
    const n = number(cells, line, 'n');
    if (!Number.isInteger(n) || n < 1) throw new InputError(`must be a whole number of specimens of at least 1, got "${cells[column('n')]}"`, { file, line, column: 'n' });
    let mean = number(cells, line, 'mean');
    const spreadName = hasSd ? 'sd' : 'var';
    const spread = number(cells, line, spreadName);
    if (spread < 0) throw new InputError(`must be zero or positive, got "${cells[column(spreadName)]}"`, { file, line, column: spreadName });
    let variance = hasSd ? spread * spread : spread;
    if (options.log) {
      if (!(mean > 0)) throw new InputError(`must be positive to take its logarithm (--log), got "${cells[column('mean')]}"`, { file, line, column: 'mean' });
      variance = variance / (mean * mean);
      mean = Math.log(mean);
    }
    return { section: label(cells, 'section'), trait: label(cells, 'trait'), position, n, mean, variance, line, covariate: covariateOf(cells, line) };
  });
  return { file, form: 'summary', timeKind, records, logTransformed: options.log === true };
}

function checkTypos(table: Table): void {
  for (const name of table.header) {
    if ((knownColumns as readonly string[]).includes(name) || name === '') continue;
    for (const known of knownColumns) {
      if (known.length >= 3 && editDistance(name, known) === 1) {
        throw new InputError(`unknown column "${name}": did you mean "${known}"?`, { file: table.file, line: 1 });
      }
    }
  }
  const seen = new Set<string>();
  for (const name of table.header) {
    if (seen.has(name) && name !== '') throw new InputError(`column "${name}" appears twice in the header`, { file: table.file, line: 1 });
    seen.add(name);
  }
}

/** Levenshtein distance (insertions, deletions, substitutions). */
export function editDistance(a: string, b: string): number {
  const previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let diagonal = previous[0];
    previous[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const above = previous[j];
      previous[j] = Math.min(previous[j] + 1, previous[j - 1] + 1, diagonal + (a[i - 1] === b[j - 1] ? 0 : 1));
      diagonal = above;
    }
  }
  return previous[b.length];
}
