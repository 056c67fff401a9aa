import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { InputError } from './errors.js';
import { describeControlCharacter, firstControlCharacter } from './names.js';

/**
 * Checks of the JSON documents the tool reads back (`report` and `redraw` on
 * a saved fit.json, `report --attach` of compare.json or power JSON). A
 * document written by the tool always passes; a hand-edited one that does
 * not fit the layout the readers rely on is refused with one message naming
 * the file and the field path, e.g.
 * `fit.json: lineages[0].models[0].weight: expected a number from 0 to 1 or null, got "bad"`
 * (exit 1), instead of an internal error or a wrong page further on.
 *
 * Fields added after the first release (`trait_unit`, `first_age`,
 * `extrapolated_horizons`) may be absent; any field the readers do not use
 * is not checked, so later additions keep older readers working.
 */

/** A field that does not fit the layout: where (path from the document root) and what was expected. */
class DocumentProblem extends Error {
  constructor(readonly path: string, readonly detail: string) {
    super(`${path === '' ? 'the document' : path}: ${detail}`);
  }
}

/** A check of one value at a path; throws DocumentProblem. */
type Check = (value: unknown, path: string) => void;

/** How a value is shown in a message: as JSON, cut at 60 characters; a missing field says so. */
function shown(value: unknown): string {
  if (value === undefined) return 'nothing (the field is missing)';
  // JSON.parse reads 1e999 as Infinity, which JSON.stringify would show as null.
  if (typeof value === 'number' && !Number.isFinite(value)) return `${value} (a number beyond double precision)`;
  const text = JSON.stringify(value) ?? String(value);
  return text.length > 60 ? `${text.slice(0, 59)}…` : text;
}

function fail(path: string, expected: string, value: unknown): never {
  throw new DocumentProblem(path, `expected ${expected}, got ${shown(value)}`);
}

function isObject(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

/** `lineages[0].models` from `lineages[0]` and `models`; keys that are not plain words in brackets. */
function field(path: string, key: string): string {
  if (/^[A-Za-z_][A-Za-z0-9_]*$/.test(key)) return path === '' ? key : `${path}.${key}`;
  return `${path}[${JSON.stringify(key)}]`;
}

const anything: Check = () => undefined;

/**
 * A finite number, optionally whole, within [min, max], or null when
 * `nullable`. A value of the wrong kind reads "expected a number or null";
 * one out of range names the range ("expected a number from 0 to 1").
 */
function number(options: { whole?: boolean; min?: number; max?: number; nullable?: boolean } = {}): Check {
  const { whole = false, min, max, nullable = false } = options;
  const kind = `${whole ? 'a whole number' : 'a number'}${nullable ? ' or null' : ''}`;
  const range = min !== undefined && max !== undefined ? ` from ${min} to ${max}` : min !== undefined ? ` of at least ${min}` : max !== undefined ? ` of at most ${max}` : '';
  return (value, path) => {
    if (value === null && nullable) return;
    if (typeof value !== 'number' || !Number.isFinite(value) || (whole && !Number.isInteger(value))) fail(path, kind, value);
    if ((min !== undefined && value < min) || (max !== undefined && value > max)) fail(path, `${whole ? 'a whole number' : 'a number'}${range}${nullable ? ' or null' : ''}`, value);
  };
}

/** Text; a `name` (printed in tables, titles, file names) must hold no control character. */
function text(options: { nullable?: boolean; name?: boolean } = {}): Check {
  const { nullable = false, name = false } = options;
  return (value, path) => {
    if (value === null && nullable) return;
    if (typeof value !== 'string') fail(path, `text${nullable ? ' or null' : ''}`, value);
    const control = name ? firstControlCharacter(value) : null;
    if (control !== null) {
      throw new DocumentProblem(path, `expected text without control characters, got ${shown(value)} (${describeControlCharacter(control.code)} at character ${control.position})`);
    }
  };
}

const boolean: Check = (value, path) => {
  if (typeof value !== 'boolean') fail(path, 'true or false', value);
};

function nullOr(check: Check, expected: string): Check {
  return (value, path) => {
    if (value === null) return;
    if (value === undefined) fail(path, `${expected} or null`, value);
    check(value, path);
  };
}

/** A list whose entries each pass `item`; `length` when fixed (`what` says why, e.g. "one per horizon"). */
function list(item: Check, options: { length?: number; what?: string; nonEmpty?: boolean } = {}): Check {
  return (value, path) => {
    if (!Array.isArray(value)) fail(path, options.nonEmpty ? 'a non-empty list' : 'a list', value);
    if (options.nonEmpty && value.length === 0) fail(path, 'a non-empty list', value);
    if (options.length !== undefined && value.length !== options.length) {
      throw new DocumentProblem(path, `expected ${options.length} entries${options.what ? ` (${options.what})` : ''}, got ${value.length}`);
    }
    value.forEach((entry, index) => item(entry, `${path}[${index}]`));
  };
}

/** An object with these required and optional fields (others are not checked). */
function object(required: Readonly<Record<string, Check>>, optional: Readonly<Record<string, Check>> = {}): Check {
  return (value, path) => {
    if (!isObject(value)) fail(path, 'an object', value);
    for (const [key, check] of Object.entries(required)) check(value[key], field(path, key));
    for (const [key, check] of Object.entries(optional)) if (value[key] !== undefined) check(value[key], field(path, key));
  };
}

/** An object used as a map: every key a name, every value passing `item`. */
function entries(item: Check): Check {
  return (value, path) => {
    if (!isObject(value)) fail(path, 'an object', value);
    for (const [key, entry] of Object.entries(value)) {
      text({ name: true })(key, `${path} key`);
      item(entry, field(path, key));
    }
  };
}

const name = text({ name: true });
const nullableName = text({ name: true, nullable: true });
const nullableNumber = number({ nullable: true });
const weight = number({ min: 0, max: 1, nullable: true });
const probability = number({ min: 0, max: 1 });

/** One estimate with its interval as fit.json writes it (`estimateDocument`). */
const estimate = object({
  estimate: nullableNumber,
  lower: nullableNumber,
  upper: nullableNumber,
  at_bound: text({ nullable: true }),
  lower_at_bound: boolean,
  upper_at_bound: boolean,
});

/** An estimate and its ends only (compare.json, `estimateEndsDocument`). */
const estimateEnds = object({ estimate: nullableNumber, lower: nullableNumber, upper: nullableNumber, at_bound: text({ nullable: true }) });

/** One ranked model of a lineage (`modelDocument`). */
const model = object({
  id: name,
  label: name,
  k: number({ whole: true, min: 0 }),
  logLik: nullableNumber,
  aicc: nullableNumber,
  delta_aicc: nullableNumber,
  weight,
  converged: boolean,
  compared: boolean,
  not_compared_reason: text({ nullable: true }),
  interval_method: text(),
  params: entries(estimate),
  derived: entries(estimate),
  flags: list(text()),
});

/** One lineage document (`lineageDocument`): its fields, its models, and data lists of one entry per horizon. */
const lineage: Check = (value, path) => {
  object(
    {
      section: name,
      trait: name,
      horizons: number({ whole: true, min: 1 }),
      time_unit: name,
      position_kind: text(),
      transform: text(),
      sampling_variance: text(),
      best_model: nullableName,
      models: list(model),
      data: object({}),
      smoothed: nullOr(object({}), 'an object'),
    },
    {
      extrapolated_horizons: number({ whole: true, min: 0 }),
      first_age: nullableNumber,
      trait_unit: nullableName,
      models_left_out: list(text()),
      // The trend verdict (issue 15): the fields the report reads.
      trend_test: nullOr(object({ p_value: number({ min: 0, max: 1, nullable: true }), level: number({ min: 0, max: 1 }), supported: boolean, replicates: number({ whole: true, min: 0 }) }, { direction: text({ nullable: true }), aicc_false_trend_rate: number({ min: 0, max: 1, nullable: true }), note: text({ nullable: true }) }), 'an object'),
    },
  )(value, path);
  const document = value as Record<string, unknown>;
  const horizons = document.horizons as number;
  const perHorizon = (item: Check): Check => list(item, { length: horizons, what: `one per horizon, "horizons" is ${horizons}` });
  const finite = number();
  const nonNegative = number({ min: 0 });
  object({
    time: perHorizon(finite),
    position: perHorizon(finite),
    mean: perHorizon(finite),
    n: perHorizon(number({ whole: true, min: 1 })),
    within_variance: perHorizon(nonNegative),
    sampling_variance: perHorizon(nonNegative),
    extrapolated: perHorizon(boolean),
    line: perHorizon(number({ whole: true, min: 0 })),
  })(document.data, field(path, 'data'));
  if (document.smoothed !== null) {
    object({ model: name, mean: perHorizon(nullableNumber), standard_error: perHorizon(number({ min: 0, nullable: true })) })(document.smoothed, field(path, 'smoothed'));
  }
  const ids = (document.models as { id: string }[]).map((entry) => entry.id);
  if (document.best_model !== null && !ids.includes(document.best_model as string)) {
    throw new DocumentProblem(field(path, 'best_model'), `expected null or the id of one of the lineage's models (${ids.join(', ') || 'none'}), got ${shown(document.best_model)}`);
  }
};

const warnings = list(object({ category: text(), message: text(), count: number({ whole: true, min: 1 }) }));

/** compare --json / compare.json: what the report's comparison block reads. */
const comparison = object(
  {
    traits: list(object(
      {
        trait: name,
        horizons: number({ whole: true, min: 1 }),
        time_unit: name,
        sections: list(object({ section: name, horizons: number({ whole: true, min: 1 }) }, { first_age: nullableNumber })),
        best: nullOr(object({ id: text(), model: text() }), 'an object'),
        hypotheses: list(object(
          { id: text(), model: text(), k: number({ whole: true, min: 0 }), logLik: nullableNumber, aicc: nullableNumber, delta_aicc: nullableNumber, weight, compared: boolean },
          { label: name, description: text(), message: text({ nullable: true }), params: entries(estimateEnds), flags: list(text()), converged: boolean, horizons: number({ whole: true, min: 1 }) },
        )),
        tests: list(object({ model: text(), restricted: text(), full: text(), statistic: nullableNumber, df: number({ whole: true, min: 0 }), p_value: number({ min: 0, max: 1, nullable: true }) })),
      },
      { trait_unit: nullableName, age_uncertainty: anything },
    )),
  },
  { provenance: object({}, { options: object({}) }), composite: list(lineage), caution: text(), warnings },
);

/** power --json: what the report's power block and power-curve figure read. */
const power = object(
  {
    grid: list(object({ drift: number(), drift_sd: number(), p_best: probability, p_weight: probability, p_lrt: probability }), { nonEmpty: true }),
    settings: object({
      replicates: number({ whole: true, min: 1 }),
      seed: number(),
      weight_threshold: probability,
      horizons: number({ whole: true, min: 1 }),
      span: number(),
      time_unit: name,
      pooled_within_sd: number({ min: 0 }),
    }),
    input: object({ lineage: name }, { trait_unit: nullableName, transform: text() }),
  },
  {
    smallest_drift: object({ power: probability }, { p_best: nullableNumber, p_weight: nullableNumber, p_lrt: nullableNumber }),
    lrt: object({ level: probability }),
    false_trend: object({ p_best: probability, p_weight: probability, p_lrt: probability }),
    notes: list(text()),
    caution: text(),
  },
);

/** A whole fit document (`fitDocument`), with any comparison or power results it carries. */
const fitDocument = object(
  {
    provenance: object({ tool: text(), version: text(), inputs: list(object({ file: text(), sha256: text() })), options: object({}) }),
    model_set: text(),
    lineages: list(lineage, { nonEmpty: true }),
    warnings,
  },
  { comparison, comparisons: comparison, power: (value, path) => (Array.isArray(value) ? list(power)(value, path) : power(value, path)) },
);

/** Run a check and turn its problem into the one-line user error naming the file. */
function checked(check: Check, value: unknown, file: string): void {
  try {
    check(value, '');
  } catch (error) {
    if (error instanceof DocumentProblem) throw new InputError(error.message, { file });
    throw error;
  }
}

/**
 * Check a parsed fit.json (the `fit --out` / `fit --json` document) before
 * `report` or `redraw` read it.
 *
 * @throws InputError naming the file and the first field that does not fit, e.g.
 *   `fit.json: lineages[0].models[0].params: expected an object, got nothing (the field is missing)`
 * @example
 * checkFitDocument({ traits: [] }, 'compare.json');
 * // throws: compare.json: is the JSON of "compare" (it has "traits"), not a fit.json
 */
export function checkFitDocument(value: unknown, file: string): void {
  if (isObject(value) && value.lineages === undefined) {
    // The other documents the tool writes: say which one it is rather than which field it lacks.
    if (Array.isArray(value.traits)) throw new InputError('is the JSON of "compare" (it has "traits"), not a fit.json; show it in a report with --attach', { file });
    if (Array.isArray(value.grid)) throw new InputError('is the JSON of "power" (it has "grid"), not a fit.json; show it in a report with --attach', { file });
  }
  checked(fitDocument, value, file);
}

/**
 * Check a parsed section comparison (`compare --json`, compare.json) before the report shows it.
 *
 * @throws InputError naming the file and the field, e.g. `compare.json: traits[0].hypotheses[1].k: expected a whole number of at least 0, got "2"`
 * @example
 * checkComparisonDocument({ traits: 'none' }, 'compare.json');
 * // throws: compare.json: traits: expected a list
 */
export function checkComparisonDocument(value: unknown, file: string): void {
  checked(comparison, value, file);
}

/**
 * Check a parsed power result (`power --json`) before the report shows it and draws its curve.
 *
 * @throws InputError naming the file and the field, e.g. `power.json: grid[3].p_best: expected a number from 0 to 1, got 1.5`
 * @example
 * checkPowerDocument([], 'power.json');
 * // throws: power.json: the document: expected an object, got []
 */
export function checkPowerDocument(value: unknown, file: string): void {
  checked(power, value, file);
}

/** A JSON file read back: the parsed value and the SHA-256 of its bytes. */
export interface JsonFile {
  readonly value: unknown;
  readonly sha256: string;
}

/**
 * Read and parse a JSON file the tool wrote earlier.
 *
 * @param expected - what the file should be, for the message when it is not JSON (e.g. `the fit.json written by "fit --out"`)
 * @param role - how the file was given, added to "no such file" (e.g. "given with --attach")
 * @throws InputError naming the file: missing, a folder, or not JSON
 * @example
 * readJsonFile('no-such-fit.json', 'the fit.json written by "fit --out"', { role: 'given with --attach' });
 * // throws: no-such-fit.json: no such file (given with --attach)
 */
export function readJsonFile(file: string, expected: string, options: { role?: string; missingKind?: 'data' | 'usage' } = {}): JsonFile {
  let buffer: Buffer;
  try {
    buffer = readFileSync(file);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? `is a folder, expected ${expected}` : String((error as Error).message);
    throw new InputError(`${reason}${options.role ? ` (${options.role})` : ''}`, { file, kind: options.missingKind ?? 'data' });
  }
  let value: unknown;
  try {
    value = JSON.parse(buffer.toString('utf8'));
  } catch (error) {
    throw new InputError(`is not JSON (${(error as Error).message}); expected ${expected}`, { file });
  }
  return { value, sha256: createHash('sha256').update(buffer).digest('hex') };
}
