import { InputError } from './errors.js';
import { checkName } from './names.js';
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
  /**
   * The summary row left its spread cell empty, which is accepted only where
   * n = 1 (one specimen has no standard deviation); `variance` is then 0, a
   * value that enters nothing because every use of it is weighted by n - 1.
   * Without pooling, `buildLineages` refuses it naming the spread column.
   */
  readonly spreadMissing?: boolean;
}

/** The horizons of a file with what kind of input they came from. */
export interface SampleSet {
  readonly file: string;
  readonly form: 'summary' | 'specimen';
  readonly timeKind: TimeKind;
  readonly records: readonly HorizonRecord[];
  readonly logTransformed: boolean;
  /** The spread column of a summary-form file ("sd" or "var"), for messages. */
  readonly spreadColumn?: string;
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

/**
 * Names the trade gives the section column, all read as `section`: field
 * workers speak of a section, locality or outcrop; deep-sea and borehole
 * workers of a core, site, hole or borehole (common practice). A file uses
 * one of them; `section` wins when it is there.
 */
export const sectionColumnNames = ['section', 'core', 'site', 'hole', 'borehole', 'locality', 'outcrop'] as const;

/**
 * The column of a (lower-cased) header that names the section: `section`
 * when present, otherwise the one other name of {@link sectionColumnNames}
 * it has, or null when it has none.
 *
 * @param rawHeader the header as written, for messages.
 * @throws InputError when the header has two or more of the other names and no `section` (which is the section is a guess).
 * @example
 * sectionColumnOf(['core', 'trait', 'age', 'n', 'mean', 'sd'], 'a.csv'); // 'core'
 */
export function sectionColumnOf(header: readonly string[], file: string, rawHeader: readonly string[] = header): string | null {
  if (header.includes('section')) return 'section';
  const found = sectionColumnNames.filter((name) => header.includes(name));
  if (found.length > 1) {
    const written = found.map((name) => `"${rawHeader[header.indexOf(name)] ?? name}"`);
    throw new InputError(
      `has ${written.length} columns that could name the section and no "section" column, got ${written.join(' and ')}; rename the one whose values tell sections apart to "section" (the others are then left unread)`,
      { file, line: 1, column: rawHeader[header.indexOf(found[1])] ?? found[1] },
    );
  }
  return found[0] ?? null;
}

/**
 * Largest magnitude accepted in a numeric cell. Squares and sums of squares of
 * numbers this size stay finite in double precision (1e200 << 1.8e308), so no
 * variance or likelihood term can overflow; smaller non-zero magnitudes than
 * {@link smallestMagnitude} would underflow when squared.
 */
export const largestMagnitude = 1e100;
/** Smallest non-zero magnitude accepted in a numeric cell (see {@link largestMagnitude}). */
export const smallestMagnitude = 1e-100;

const numberPattern = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Read one numeric cell: a plain decimal number (exponent allowed), finite and
 * within the range the tool computes with.
 *
 * @throws InputError naming file, line, column and the cell as written.
 * @example
 * numberCell('2,5', { file: 'a.csv', line: 3, column: 'mean' }, true); // 2.5
 */
export function numberCell(raw: string, where: { file: string; line: number; column: string }, decimalComma = false): number {
  if (raw === '') throw new InputError('is empty, expected a number', where);
  const text = decimalComma ? raw.replace(',', '.') : raw;
  if (!numberPattern.test(text)) {
    let hint = '';
    if (!decimalComma && /^[+-]?\d*,\d+$/.test(raw)) hint = ' (for a decimal comma use --decimal-comma)';
    else if (/^\s*[−–]/.test(raw)) hint = ' (write the minus sign as "-")';
    else if (/^[+-]?(inf|infinity|nan)$/i.test(raw)) hint = '';
    else if (/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*\S+$/.test(text)) hint = ' (remove the unit or text after the number)';
    throw new InputError(`must be a finite number, got "${raw}"${hint}`, where);
  }
  const value = Number(text);
  if (!Number.isFinite(value)) throw new InputError(`must be a finite number, got "${raw}"`, where);
  const magnitude = Math.abs(value);
  if (magnitude > largestMagnitude || (magnitude !== 0 && magnitude < smallestMagnitude)) {
    throw new InputError(`is outside the range the tool computes with (magnitude 1e-100 to 1e100, or 0), got "${raw}"; rescale the column`, where);
  }
  return value;
}

/** Where each column the tool reads sits in a header, and which form the file has. */
export interface ColumnPlan {
  readonly file: string;
  readonly header: readonly string[];
  readonly form: 'summary' | 'specimen';
  readonly timeKind: TimeKind;
  /** Which spread column a summary-form file has. */
  readonly spread: 'sd' | 'var' | null;
  /** The column read as the section (`section` or another name of {@link sectionColumnNames}), or null. */
  readonly section?: string | null;
}

/**
 * Check a header and decide what the file holds: exactly one time column;
 * specimen form (a `value` column and no `mean`) or summary form (`n`, `mean`
 * and one of `sd` / `var`). An unknown column is refused only when it looks
 * like a misspelling of a column the file lacks (a misspelt "section" would
 * otherwise merge sections silently); the message suggests the likely name.
 *
 * @param rawHeader the header as written (for messages); defaults to `header`.
 * @throws InputError naming the file, line 1 and the column.
 * @example
 * planColumns(['section', 'age', 'n', 'mean', 'sd'], 'a.csv'); // { file: 'a.csv', header: ['section', 'age', 'n', 'mean', 'sd'], form: 'summary', timeKind: 'age', spread: 'sd', section: 'section' }
 */
export function planColumns(header: readonly string[], file: string, rawHeader: readonly string[] = header): ColumnPlan {
  const seen = new Set<string>();
  for (const name of header) {
    if (seen.has(name) && name !== '') throw new InputError(`appears twice in the header, got "${name}" twice; keep one`, { file, line: 1, column: name });
    seen.add(name);
  }
  const has = (name: string): boolean => header.includes(name);
  const section = sectionColumnOf(header, file, rawHeader);
  const timeNames = ['age', 'time', 'height', 'depth'] as const;
  const timeColumns = timeNames.filter(has);
  const specimenForm = has('value') && !has('mean');
  const missing = new Set<string>(['trait', 'covariate'].filter((name) => !has(name)));
  if (section === null) missing.add('section');
  if (timeColumns.length === 0) timeNames.forEach((name) => missing.add(name));
  if (!specimenForm) {
    for (const name of ['n', 'mean']) if (!has(name)) missing.add(name);
    if (!has('sd') && !has('var')) { missing.add('sd'); missing.add('var'); }
    if (!has('mean') && !has('value')) missing.add('value');
  }
  header.forEach((name, index) => {
    if (name === '' || (knownColumns as readonly string[]).includes(name) || (sectionColumnNames as readonly string[]).includes(name)) return;
    const written = rawHeader[index] ?? name;
    if (missing.has('sd') && /^(se|sem|s\.?e\.?m?|std ?err(or)?|standard error)$/.test(name)) {
      throw new InputError(`column "${written}" looks like a standard error of the mean; the tool needs the within-horizon standard deviation "sd" (sd = se × √n) or variance "var"`, { file, line: 1, column: written });
    }
    const guess = likelyColumn(name, missing);
    if (guess) {
      throw new InputError(`unknown column "${written}": did you mean "${guess}"? (rename the column; the tool reads ${knownColumns.join(', ')})`, { file, line: 1, column: written });
    }
  });
  if (timeColumns.length === 0) {
    throw new InputError('no time column: expected one of "age" (before present), "time" (elapsed), "height" or "depth"', { file, line: 1 });
  }
  if (timeColumns.length > 1) {
    throw new InputError(`more than one time column (${timeColumns.join(', ')}): keep exactly one`, { file, line: 1 });
  }
  const timeKind = timeColumns[0];
  if (specimenForm) {
    const summaryColumns = ['n', 'sd', 'var'].filter(has);
    if (summaryColumns.length > 0) {
      throw new InputError(
        `has "value" (one row per specimen) and also ${summaryColumns.map((name) => `"${name}"`).join(', ')} (one row per horizon), got both forms; if each row summarises a horizon, rename "value" to "mean", otherwise remove ${summaryColumns.length === 1 ? 'that column' : 'those columns'}`,
        { file, line: 1, column: summaryColumns[0] },
      );
    }
    return { file, header, form: 'specimen', timeKind, spread: null, section };
  }
  for (const required of ['n', 'mean']) {
    if (!has(required)) {
      throw new InputError(`missing required column "${required}" (summary form needs n, mean and sd or var; specimen form needs value)`, { file, line: 1 });
    }
  }
  if (!has('sd') && !has('var')) throw new InputError('missing required column "sd" or "var"', { file, line: 1 });
  if (has('sd') && has('var')) throw new InputError('has both "sd" and "var": keep one', { file, line: 1 });
  return { file, header, form: 'summary', timeKind, spread: has('sd') ? 'sd' : 'var', section };
}

/** Other names people give the columns (normalised: lower case, units and punctuation removed). */
const synonyms: Readonly<Record<string, string>> = {
  std: 'sd', stdev: 'sd', 'std dev': 'sd', stddev: 'sd', sdev: 'sd', 's d': 'sd', 'standard deviation': 'sd',
  variance: 'var',
  count: 'n', number: 'n', 'sample size': 'n', 'n specimens': 'n', specimens: 'n',
  average: 'mean', avg: 'mean', means: 'mean',
  ma: 'age', ages: 'age', 'age ma': 'age', 'age myr': 'age', 'age ka': 'age', 'age bp': 'age',
  elapsed: 'time', 'elapsed time': 'time', times: 'time',
  elevation: 'height', 'stratigraphic height': 'height', 'meter level': 'height', 'metre level': 'height',
  measurement: 'value', measurements: 'value', values: 'value', val: 'value',
  sections: 'section', traits: 'trait',
};

/** The known column that `name` most likely misspells, among `candidates`, or null. */
function likelyColumn(name: string, candidates: ReadonlySet<string>): string | null {
  const plain = name.replace(/[([].*?[)\]]/g, ' ').replace(/[_\-.\s]+/g, ' ').trim();
  if (candidates.has(plain)) return plain;
  const synonym = synonyms[plain] ?? synonyms[plain.replace(/ /g, '')];
  if (synonym && candidates.has(synonym)) return synonym;
  let best: string | null = null;
  let bestDistance = Number.POSITIVE_INFINITY;
  for (const known of candidates) {
    if (known.length < 2) continue;
    // Optional columns are suggested only for a single slip, so a real extra column ("sector", "trial") is not refused.
    const optional = known === 'section' || known === 'trait' || known === 'covariate';
    const allowed = known.length >= 5 && !optional ? 2 : 1;
    const distance = editDistance(plain, known, true);
    if (distance <= allowed && distance < bestDistance) {
      best = known;
      bestDistance = distance;
    }
  }
  return best;
}

/** Most distinct values an unread column may take and still be watched for hidden sections. */
const watchedValues = 64;

/** Where the rows with one value of an unread column sit in time (per trait). */
interface GroupSpan {
  readonly value: string;
  readonly trait: string;
  /** Line of the first row with this value. */
  readonly line: number;
  earliest: number;
  latest: number;
  /** Up to three distinct positions (enough to call the group a lineage). */
  readonly distinct: number[];
}

/** An unread column being watched; `groups` null once it has too many values to be a section column. */
interface UnreadColumn {
  readonly written: string;
  readonly at: number;
  groups: Map<string, GroupSpan> | null;
}

/**
 * Turns table rows into horizon records one row at a time, so the whole-file
 * reader ({@link readSamples}) and the streaming reader
 * (`stream-samples.ts`) share every check and message. Specimens of the same
 * (section, trait, position) are summarised as they arrive with
 * {@link RunningMoments}; memory grows with the number of horizons, not rows.
 * @example
 * const collector = new HorizonCollector(planColumns(['age', 'value'], 'a.csv'));
 * collector.add(2, ['1.5', '4']); collector.add(3, ['1.5', '6']);
 * collector.finish().records; // [{ section: '', trait: '', position: 1.5, n: 2, mean: 5, variance: 2, line: 2 }]
 */
export class HorizonCollector {
  private readonly index: (name: string) => number;
  /** Columns the tool does not read, watched (when the file has no section column) for groups of rows that overlap in time. */
  private readonly unread: UnreadColumn[];
  private readonly groups = new Map<string, { section: string; trait: string; position: number; line: number; moments: RunningMoments; covariate?: number; covariateText?: string }>();
  private readonly summaries: HorizonRecord[] = [];

  constructor(readonly plan: ColumnPlan, private readonly options: SampleOptions = {}, rawHeader: readonly string[] = plan.header) {
    this.index = (name) => plan.header.indexOf(name);
    const read = new Set<string>([...knownColumns, plan.section ?? 'section', '']);
    this.unread = plan.section === null || plan.section === undefined
      ? plan.header.flatMap((name, at) => (read.has(name) ? [] : [{ written: rawHeader[at] ?? name, at, groups: new Map<string, GroupSpan>() }]))
      : [];
  }

  /** Note where this row's value of each unread column sits in time. */
  private watch(line: number, cells: readonly string[], trait: string, position: number): void {
    for (const column of this.unread) {
      if (column.groups === null) continue;
      const value = cells[column.at];
      const key = `${trait}\u0000${value}`;
      let span = column.groups.get(key);
      if (!span) {
        // A column with many values (identifiers, measurements, notes) is not a hidden section column.
        if (column.groups.size >= watchedValues) {
          column.groups = null;
          continue;
        }
        span = { value, trait, line, earliest: position, latest: position, distinct: [position] };
        column.groups.set(key, span);
      }
      span.earliest = Math.min(span.earliest, position);
      span.latest = Math.max(span.latest, position);
      if (span.distinct.length < 3 && !span.distinct.includes(position)) span.distinct.push(position);
    }
  }

  /**
   * Refuse a file without a section column in which an unread column splits
   * one trait's rows into groups of at least 3 horizons each whose spans
   * overlap in time: they are very likely sections (two cores merged into one
   * lineage otherwise, issue 18). Groups that only touch do not overlap.
   */
  private refuseHiddenSections(): void {
    for (const column of this.unread) {
      if (column.groups === null) continue;
      const spans = [...column.groups.values()].filter((span) => span.distinct.length >= 3);
      for (let a = 0; a < spans.length; a++) {
        for (let b = a + 1; b < spans.length; b++) {
          const first = spans[a];
          const second = spans[b];
          if (first.trait !== second.trait || !(first.earliest < second.latest && second.earliest < first.latest)) continue;
          const kind = this.plan.timeKind;
          const of = first.trait === '' ? 'the rows' : `the rows of trait "${first.trait}"`;
          throw new InputError(
            `splits ${of} into groups that overlap in time ("${first.value}" at ${kind} ${first.earliest} to ${first.latest}, "${second.value}" at ${kind} ${second.earliest} to ${second.latest}), got "${second.value}"; the file has no section column, so they would be fitted as one lineage. If they are sections, rename "${column.written}" to "section" (or core, site, hole, borehole, locality, outcrop); if the file is one section, add a "section" column`,
            { file: this.plan.file, line: second.line, column: column.written },
          );
        }
      }
    }
  }

  private number(cells: readonly string[], line: number, name: string): number {
    return numberCell(cells[this.index(name)], { file: this.plan.file, line, column: name }, this.options.decimalComma === true);
  }

  /**
   * A name cell (section, trait): refused with line and column when it holds
   * a control character, and put in Unicode normal form C, so a name typed
   * with a composed "é" and one with "e" + combining accent (which print
   * alike) are one lineage.
   */
  private label(cells: readonly string[], line: number, name: string): string {
    const at = this.index(name);
    return at >= 0 ? checkName(cells[at], { file: this.plan.file, line, column: name }).normalize('NFC') : '';
  }

  /** Validate and take one data row (cells in header order). */
  add(line: number, cells: readonly string[]): void {
    const { plan, options } = this;
    const file = plan.file;
    const position = this.number(cells, line, plan.timeKind);
    const covariate = this.index('covariate') >= 0 ? this.number(cells, line, 'covariate') : undefined;
    const section = this.label(cells, line, plan.section ?? 'section');
    const trait = this.label(cells, line, 'trait');
    if (this.unread.length > 0) this.watch(line, cells, trait, position);
    if (plan.form === 'specimen') {
      let value = this.number(cells, line, 'value');
      if (options.log) {
        if (!(value > 0)) throw new InputError(`must be positive to take its logarithm (--log), got "${cells[this.index('value')]}"`, { file, line, column: 'value' });
        value = Math.log(value);
      }
      const key = `${section}\u0000${trait}\u0000${position}`;
      let group = this.groups.get(key);
      if (!group) {
        group = { section, trait, position, line, moments: new RunningMoments(), covariate, covariateText: covariate === undefined ? undefined : cells[this.index('covariate')] };
        this.groups.set(key, group);
      } else if (covariate !== undefined && covariate !== group.covariate) {
        throw new InputError(
          `differs within the horizon at ${plan.timeKind} ${cells[this.index(plan.timeKind)]} (line ${group.line} has "${group.covariateText}"), got "${cells[this.index('covariate')]}"; give one covariate value per horizon`,
          { file, line, column: 'covariate' },
        );
      }
      group.moments.add(value);
      return;
    }
    const n = this.number(cells, line, 'n');
    if (!Number.isInteger(n) || n < 1) throw new InputError(`must be a whole number of specimens of at least 1, got "${cells[this.index('n')]}"`, { file, line, column: 'n' });
    let mean = this.number(cells, line, 'mean');
    const spreadName = plan.spread ?? 'sd';
    // One specimen has no spread and a spreadsheet leaves its cell empty: accepted where n = 1 (variance 0, weight n - 1 = 0 in any pooling; buildLineages refuses it without --pool).
    const spreadMissing = n === 1 && cells[this.index(spreadName)] === '';
    const spread = spreadMissing ? 0 : this.number(cells, line, spreadName);
    if (spread < 0) throw new InputError(`must be zero or positive, got "${cells[this.index(spreadName)]}"`, { file, line, column: spreadName });
    let variance = spreadName === 'sd' ? spread * spread : spread;
    if (options.log) {
      if (!(mean > 0)) throw new InputError(`must be positive to take its logarithm (--log), got "${cells[this.index('mean')]}"`, { file, line, column: 'mean' });
      variance = variance / (mean * mean);
      mean = Math.log(mean);
      if (!Number.isFinite(variance)) {
        throw new InputError(`gives a log-scale variance (${spreadName} relative to the mean) too large to compute with, got "${cells[this.index(spreadName)]}"`, { file, line, column: spreadName });
      }
    }
    if (spreadMissing) {
      this.summaries.push({ section, trait, position, n, mean, variance, line, covariate, spreadMissing });
      return;
    }
    this.summaries.push({ section, trait, position, n, mean, variance, line, covariate });
  }

  /** The horizons collected so far, in order of first appearance. */
  finish(): SampleSet {
    const { plan, options } = this;
    this.refuseHiddenSections();
    const records = plan.form === 'summary'
      ? this.summaries
      : [...this.groups.values()].map((group) => ({
          section: group.section,
          trait: group.trait,
          position: group.position,
          n: group.moments.n,
          mean: group.moments.mean(),
          variance: group.moments.variance(),
          line: group.line,
          covariate: group.covariate,
        }));
    for (const record of records) {
      if (!Number.isFinite(record.variance) || !Number.isFinite(record.mean)) {
        throw new InputError('the specimens of this horizon have a variance too large to compute with; rescale the values', { file: plan.file, line: record.line, column: 'value' });
      }
    }
    return { file: plan.file, form: plan.form, timeKind: plan.timeKind, records, logTransformed: options.log === true, ...(plan.spread ? { spreadColumn: plan.spread } : {}) };
  }
}

/**
 * Validate a table of samples (summary form: one row per horizon with n, mean
 * and sd or var; specimen form: one row per specimen with value) and return
 * one record per horizon. Specimens are summarised with a numerically stable
 * variance; `log` applies the natural-log transform (delta method for summaries:
 * mean_ln = ln(mean), v_ln = (sd / mean)^2, common practice).
 *
 * @throws InputError naming file, line, column and value for every bad cell.
 * @example
 * readSamples(readTable('age,n,mean,sd\n2,5,1.5,0.5\n', 'a.csv')).records[0].variance; // 0.25 (sd squared)
 */
export function readSamples(table: Table, options: SampleOptions = {}): SampleSet {
  const plan = planColumns(table.header, table.file, table.rawHeader);
  const collector = new HorizonCollector(plan, options, table.rawHeader);
  for (const { line, cells } of table.rows) collector.add(line, cells);
  return collector.finish();
}

/**
 * Levenshtein distance (insertions, deletions, substitutions); with
 * `transpositions`, swapping two neighbouring letters also costs 1 (optimal
 * string alignment distance).
 * @example
 * editDistance('sectoin', 'section'); // 2
 * editDistance('sectoin', 'section', true); // 1 (one swap of neighbours)
 */
export function editDistance(a: string, b: string, transpositions = false): number {
  const rows: number[][] = Array.from({ length: a.length + 1 }, (_, i) => Array.from({ length: b.length + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      rows[i][j] = Math.min(rows[i - 1][j] + 1, rows[i][j - 1] + 1, rows[i - 1][j - 1] + cost);
      if (transpositions && i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) {
        rows[i][j] = Math.min(rows[i][j], rows[i - 2][j - 2] + 1);
      }
    }
  }
  return rows[a.length][b.length];
}
