import { InputError } from './errors.js';
import { checkName } from './names.js';
import type { Table } from './read-table.js';
import { numberCell, sectionColumnOf } from './samples.js';

/** One tie point: a stratigraphic height in a section with a known age. */
export interface TiePoint {
  readonly section: string;
  /** Height above the section datum (metres); a depth d is stored as height -d. */
  readonly height: number;
  /** Age before present (older = larger), in the samples' time unit. */
  readonly age: number;
  /** Standard deviation of the age (0 when exact or not given). */
  readonly ageSd: number;
  /** Input line of the tie. */
  readonly line: number;
}

/**
 * The tie points of every section, each section's ties sorted by height
 * (lowest first). Ages strictly decrease upward (superposition), checked on
 * reading. A file without a section column gives one set of ties, stored
 * under the key "" and used for every section.
 */
export interface AgeModel {
  readonly file: string;
  /** Which column the file used for the position: "height" or "depth" (depth d read as height -d). */
  readonly positionKind: 'height' | 'depth';
  readonly sections: ReadonlyMap<string, readonly TiePoint[]>;
}

/** One stretch between two consecutive ties. */
export interface SedimentationSegment {
  readonly fromHeight: number;
  readonly toHeight: number;
  /** Ages at the lower and upper ties (the lower is older). */
  readonly olderAge: number;
  readonly youngerAge: number;
  /** Constant sedimentation rate of the stretch: (toHeight - fromHeight) / (olderAge - youngerAge), metres per time unit. */
  readonly rate: number;
}

/**
 * Read a tie-point table: columns `section` (optional; or another name of
 * `sectionColumnNames`, as in the samples file), `height` or `depth`
 * (one of them; a depth d below the datum is read as height -d, so deeper is
 * lower and older), `age` (before present, older = larger) and optional
 * `age_sd` (>= 0). Each section needs at least two ties.
 *
 * @throws InputError naming file, line, column and value for a bad cell; for
 *   two ties at the same height; and for an age reversal (a higher tie that is
 *   not younger), naming both ties.
 * @example
 * readAgeModel(readTable('section,height,age\nA,0,10\nA,50,8\n', 'ties.csv')).sections.get('A')?.length; // 2
 */
export function readAgeModel(table: Table, options: { decimalComma?: boolean; positionKind?: 'height' | 'depth' } = {}): AgeModel {
  const { file, header } = table;
  const column = (name: string): number => header.indexOf(name);
  const hasHeight = column('height') >= 0;
  const hasDepth = column('depth') >= 0;
  if (hasHeight === hasDepth) {
    throw new InputError(hasHeight ? 'has both "height" and "depth": keep one' : 'an age model needs a "height" (or "depth") column', { file, line: 1 });
  }
  if (column('age') < 0) throw new InputError('an age model needs an "age" column (before present, older = larger)', { file, line: 1 });
  for (const name of header) {
    if (![sectionColumnOf(header, file, table.rawHeader) ?? 'section', 'height', 'depth', 'age', 'age_sd', ''].includes(name)) {
      throw new InputError(`unknown column "${name}" in an age model (expected section — or core, site, hole, borehole, locality, outcrop — height or depth, age, age_sd)`, { file, line: 1 });
    }
  }
  const positionKind = hasHeight ? 'height' : 'depth';
  const sectionColumn = sectionColumnOf(header, file, table.rawHeader) ?? 'section';
  if (options.positionKind !== undefined && options.positionKind !== positionKind) {
    // Checked before the ages: depths read as heights would otherwise surface as a misleading "age reversal".
    throw new InputError(
      `the ties give "${positionKind}" but the samples give "${options.positionKind}"; name the tie column "${options.positionKind}" like the samples (a depth d below the datum is height -d, so the two are not interchangeable)`,
      { file, line: 1, column: positionKind },
    );
  }
  // The samples file's one cell parser, so ties are range-checked like every other number (magnitude 1e-100..1e100 or 0)
  // and a decimal comma gets the same hint.
  const number = (cells: readonly string[], line: number, name: string): number =>
    numberCell(cells[column(name)], { file, line, column: name }, options.decimalComma === true);
  const grouped = new Map<string, TiePoint[]>();
  for (const { line, cells } of table.rows) {
    // NFC like the samples' names, so the ties of "Café" serve its horizons whichever form either file uses.
    const section = column(sectionColumn) >= 0 ? checkName(cells[column(sectionColumn)], { file, line, column: sectionColumn }).normalize('NFC') : '';
    const position = number(cells, line, positionKind);
    const age = number(cells, line, 'age');
    let ageSd = 0;
    if (column('age_sd') >= 0 && cells[column('age_sd')] !== '') {
      ageSd = number(cells, line, 'age_sd');
      if (ageSd < 0) throw new InputError(`must be zero or positive, got "${cells[column('age_sd')]}"`, { file, line, column: 'age_sd' });
    }
    const tie: TiePoint = { section, height: positionKind === 'depth' ? 0 - position : position, age, ageSd, line };
    const list = grouped.get(section);
    if (list) list.push(tie);
    else grouped.set(section, [tie]);
  }
  const sections = new Map<string, readonly TiePoint[]>();
  for (const [section, ties] of grouped) {
    const where = section === '' ? '' : ` for section "${section}"`;
    if (ties.length < 2) {
      throw new InputError(`has only one tie point${where}; at least two are needed to interpolate ages`, { file, line: ties[0].line });
    }
    const sorted = [...ties].sort((a, b) => a.height - b.height || a.line - b.line);
    checkOrder(sorted, file, positionKind);
    sections.set(section, sorted);
  }
  return { file, positionKind, sections };
}

/**
 * Ties sorted by height must have strictly decreasing ages (a higher bed is
 * younger: the law of superposition, common practice).
 */
function checkOrder(sorted: readonly TiePoint[], file: string, positionKind: 'height' | 'depth'): void {
  const shown = (tie: TiePoint): string => `${positionKind} ${positionKind === 'depth' ? -tie.height : tie.height}`;
  for (let i = 1; i < sorted.length; i++) {
    const below = sorted[i - 1];
    const above = sorted[i];
    const where = above.section === '' ? '' : ` in section "${above.section}"`;
    if (above.height === below.height) {
      throw new InputError(`two ties at the same ${shown(above)}${where} (lines ${below.line} and ${above.line})`, { file, line: above.line, column: positionKind });
    }
    if (!(above.age < below.age)) {
      throw new InputError(
        `age reversal${where}: the tie at ${shown(above)} (line ${above.line}, age ${above.age}) is higher than the tie at ${shown(below)} (line ${below.line}, age ${below.age}) but not younger`,
        { file, line: above.line, column: 'age' },
      );
    }
  }
}

/**
 * The ties used for a section: its own, or the file's single unnamed set.
 *
 * @example
 * tiesFor(readAgeModel(readTable('height,age\n0,10\n50,8\n', 'ties.csv')), 'Korrin Gap').length; // 2 (a file without sections serves every section)
 */
export function tiesFor(model: AgeModel, section: string): readonly TiePoint[] | undefined {
  return model.sections.get(section) ?? (model.sections.size === 1 ? model.sections.get('') : undefined);
}

/**
 * Age at a height by piecewise-linear interpolation between the two ties
 * around it (a constant sedimentation rate between ties); outside the
 * outermost ties, the line through the two nearest ties is extended (the rate
 * of the outermost stretch), and the result is marked extrapolated.
 *
 * age(h) = age_k + (h - h_k) (age_{k+1} - age_k) / (h_{k+1} - h_k)
 *
 * @param ties one section's ties sorted by height (at least two)
 * @param height height above the datum (a depth d passed as -d)
 * @example
 * interpolateAge([{ height: 0, age: 10 }, { height: 50, age: 8 }], 20); // { age: 9.2, extrapolated: false }
 */
export function interpolateAge(ties: readonly Pick<TiePoint, 'height' | 'age'>[], height: number): { age: number; extrapolated: boolean } {
  const last = ties.length - 1;
  const extrapolated = height < ties[0].height || height > ties[last].height;
  let k = 0;
  while (k < last - 1 && height > ties[k + 1].height) k += 1;
  const lower = ties[k];
  const upper = ties[k + 1];
  if (height === upper.height) return { age: upper.age, extrapolated };
  if (height === lower.height) return { age: lower.age, extrapolated };
  const age = lower.age + ((height - lower.height) * (upper.age - lower.age)) / (upper.height - lower.height);
  return { age, extrapolated };
}

/**
 * Sedimentation rates between consecutive ties: rate = (h_{k+1} - h_k) /
 * (age_k - age_{k+1}), in metres per time unit (common practice: the
 * accumulation rate implied by two dated levels).
 *
 * @example
 * sedimentationRates([{ height: 0, age: 10 }, { height: 50, age: 8 }])[0].rate; // 25 (m per Myr)
 */
export function sedimentationRates(ties: readonly Pick<TiePoint, 'height' | 'age'>[]): SedimentationSegment[] {
  const segments: SedimentationSegment[] = [];
  for (let k = 1; k < ties.length; k++) {
    const below = ties[k - 1];
    const above = ties[k];
    segments.push({
      fromHeight: below.height,
      toHeight: above.height,
      olderAge: below.age,
      youngerAge: above.age,
      rate: (above.height - below.height) / (below.age - above.age),
    });
  }
  return segments;
}

/** How {@link ageFunction} treats positions outside the ties. */
export interface AgeFunctionOptions {
  /** Allow ages beyond the outermost ties (flagged as extrapolated); default false. */
  extrapolate?: boolean;
  /** Name of the samples file, for error messages. */
  samplesFile?: string;
}

/**
 * The `ageOf` hook of `buildLineages`: the age of a sample's (signed) height
 * in its section.
 *
 * @throws InputError when the section has no ties, or when the height lies
 *   outside the ties and extrapolation was not asked for (naming the sample's
 *   line, its position and the tied range).
 * @example
 * const ageOf = ageFunction(readAgeModel(readTable('height,age\n0,10\n50,8\n', 'ties.csv')));
 * ageOf('Korrin Gap', 25, 7); // { age: 9, extrapolated: false }
 * ageOf('Korrin Gap', 60, 8);
 * // throws: line 8: height 60 in section "Korrin Gap" lies outside the age model's ties (0 to 50)
 */
export function ageFunction(model: AgeModel, options: AgeFunctionOptions = {}): (section: string, position: number, line: number) => { age: number; extrapolated: boolean } {
  return (section, position, line) => {
    const ties = tiesFor(model, section);
    if (!ties) {
      const known = [...model.sections.keys()].map((name) => `"${name}"`).join(', ');
      throw new InputError(`section "${section}" has no ties in the age model ${model.file} (it has ${known})`, { file: options.samplesFile, line, column: 'section' });
    }
    const result = interpolateAge(ties, position);
    if (result.extrapolated && !options.extrapolate) {
      const kind = model.positionKind;
      const show = (height: number): number => (kind === 'depth' ? -height : height);
      const low = show(ties[0].height);
      const high = show(ties[ties.length - 1].height);
      throw new InputError(
        `${kind} ${show(position)}${section === '' ? '' : ` in section "${section}"`} lies outside the age model's ties (${Math.min(low, high)} to ${Math.max(low, high)}); add ties that bracket it, or allow extrapolation with --extrapolate (those horizons are then flagged)`,
        { file: options.samplesFile, line },
      );
    }
    return result;
  };
}

/**
 * Whether any tie of the model has a positive age_sd (Monte Carlo over ages is then meaningful).
 *
 * @example
 * hasAgeUncertainty(readAgeModel(readTable('height,age,age_sd\n0,10,0.1\n50,8,\n', 'ties.csv'))); // true
 */
export function hasAgeUncertainty(model: AgeModel): boolean {
  for (const ties of model.sections.values()) if (ties.some((tie) => tie.ageSd > 0)) return true;
  return false;
}
