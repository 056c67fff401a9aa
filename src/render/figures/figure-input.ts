import { InputError } from '../../data/errors.js';

/**
 * The parts of one lineage document (as `lineageDocument` writes it into
 * fit.json) that the figures read. Only these fields are required; anything
 * else in the document is ignored, so older and newer fit.json files redraw
 * as long as these are present.
 */
export interface FigureLineage {
  readonly section: string;
  readonly trait: string;
  /** Unit label of elapsed time, e.g. "Myr". */
  readonly timeUnit: string;
  /** Unit label of the trait (`trait_unit`, from `--trait-unit`), or null when none was given or the document predates it. */
  readonly traitUnit: string | null;
  /** What the position column was: age (before present), time, height or depth. */
  readonly positionKind: string;
  /** Age before present of the oldest horizon (from an age model for heights and depths), or null. */
  readonly firstAge: number | null;
  /** 'ln' when the trait was log-transformed. */
  readonly transform: string;
  readonly bestModel: string | null;
  readonly models: readonly FigureModel[];
  /** Elapsed time since the oldest horizon, oldest first. */
  readonly time: readonly number[];
  /** Position as read (age, time, height or depth). */
  readonly position: readonly number[];
  readonly mean: readonly number[];
  readonly samplingVariance: readonly number[];
  /** Specimens per horizon (`data.n`), or null when the document has none. */
  readonly count: readonly number[] | null;
  /** Horizons whose age the age model extrapolated beyond its ties (drawn open). */
  readonly extrapolated: readonly boolean[];
  readonly smoothed: { readonly model: string; readonly mean: readonly number[]; readonly standardError: readonly number[] } | null;
  /**
   * Time of the lineage's first horizon on the model's own clock (`curve_origin`, default 0):
   * compare's shared-offset hypothesis runs one process from the oldest horizon of all
   * sections, so a later section's curve is the model's expectation from that time on.
   */
  readonly curveOrigin: number;
}

/** One model row of the document. */
export interface FigureModel {
  readonly id: string;
  readonly label: string;
  readonly k: number | null;
  readonly logLik: number | null;
  readonly aicc: number | null;
  readonly deltaAicc: number | null;
  readonly weight: number | null;
  readonly compared: boolean;
  readonly notComparedReason: string | null;
  /** Point estimates by parameter name (missing or null estimates left out). */
  readonly estimates: Readonly<Record<string, number>>;
  /** Derived point estimates (`derived` in fit.json, e.g. ou's `limit_drift`; missing or null left out). */
  readonly derived: Readonly<Record<string, number>>;
}

type Json = Record<string, unknown>;

function fail(where: string, detail: string): never {
  throw new InputError(`${where}: ${detail}`);
}

function numberList(value: unknown, where: string, length: number | null): number[] {
  if (!Array.isArray(value)) fail(where, `must be a list of numbers, got ${JSON.stringify(value)?.slice(0, 40)}`);
  if (length !== null && value.length !== length) fail(where, `must have ${length} entries (one per horizon), got ${value.length}`);
  return value.map((entry, index) => {
    if (typeof entry !== 'number' || !Number.isFinite(entry)) fail(`${where}[${index}]`, `must be a finite number, got ${JSON.stringify(entry)}`);
    return entry;
  });
}

function nullableNumber(value: unknown): number | null {
  return typeof value === 'number' && Number.isFinite(value) ? value : null;
}

function text(value: unknown, fallback = ''): string {
  return typeof value === 'string' ? value : fallback;
}

/**
 * Read one lineage document (from fit.json or straight from
 * `lineageDocument`) into the figure's view of it, checking the fields the
 * figures need.
 *
 * @param document - one entry of fit.json's `lineages`
 * @param where - how to name the document in errors, e.g. `fit.json lineages[1]`
 * @throws InputError naming the field when data are missing or not numbers
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const figureLineage = readFigureLineage(lineageDocument(fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })));
 * figureLineage.models.map((model) => model.id); // ['strict-stasis', 'random-walk']
 * figureLineage.mean; // [1, 2, 3]
 * readFigureLineage([]);
 * // throws: lineage: must be a lineage object
 */
export function readFigureLineage(document: unknown, where = 'lineage'): FigureLineage {
  if (document === null || typeof document !== 'object' || Array.isArray(document)) fail(where, 'must be a lineage object');
  const doc = document as Json;
  const data = doc.data as Json | undefined;
  if (!data || typeof data !== 'object') fail(`${where}.data`, 'missing (this fit.json has no horizon data to draw)');
  const time = numberList(data.time, `${where}.data.time`, null);
  if (time.length < 1) fail(`${where}.data.time`, 'has no horizons');
  const mean = numberList(data.mean, `${where}.data.mean`, time.length);
  const samplingVariance = numberList(data.sampling_variance, `${where}.data.sampling_variance`, time.length);
  const count = Array.isArray(data.n) && data.n.length === time.length && data.n.every((value) => typeof value === 'number' && value > 0 && Number.isFinite(value)) ? (data.n as number[]) : null;
  const position = data.position === undefined ? time.slice() : numberList(data.position, `${where}.data.position`, time.length);
  const rawModels = Array.isArray(doc.models) ? (doc.models as Json[]) : [];
  const models: FigureModel[] = rawModels.map((model, index) => {
    const params = (model.params ?? {}) as Record<string, { estimate?: unknown }>;
    const estimates: Record<string, number> = {};
    for (const [name, entry] of Object.entries(params)) {
      const value = nullableNumber(entry?.estimate);
      if (value !== null) estimates[name] = value;
    }
    const derived: Record<string, number> = {};
    const rawDerived = model.derived && typeof model.derived === 'object' ? (model.derived as Record<string, { estimate?: unknown } | null>) : {};
    for (const [name, entry] of Object.entries(rawDerived)) {
      const value = nullableNumber(entry?.estimate);
      if (value !== null) derived[name] = value;
    }
    const aicc = nullableNumber(model.aicc);
    return {
      id: text(model.id, `model ${index + 1}`),
      label: text(model.label, text(model.id, `model ${index + 1}`)),
      k: nullableNumber(model.k),
      logLik: nullableNumber(model.logLik),
      aicc,
      deltaAicc: nullableNumber(model.delta_aicc),
      weight: nullableNumber(model.weight),
      compared: model.compared === undefined ? aicc !== null : model.compared === true,
      notComparedReason: typeof model.not_compared_reason === 'string' ? model.not_compared_reason : null,
      estimates,
      derived,
    };
  });
  let smoothed: FigureLineage['smoothed'] = null;
  const rawSmoothed = doc.smoothed as Json | null | undefined;
  if (rawSmoothed && typeof rawSmoothed === 'object') {
    const smoothedMean = rawSmoothed.mean;
    const standardError = rawSmoothed.standard_error;
    if (Array.isArray(smoothedMean) && Array.isArray(standardError) && smoothedMean.length === time.length && standardError.length === time.length) {
      // A smoother that failed at a horizon writes null there; such a band is not drawn.
      if (smoothedMean.every((v) => typeof v === 'number') && standardError.every((v) => typeof v === 'number')) {
        smoothed = { model: text(rawSmoothed.model), mean: smoothedMean as number[], standardError: standardError as number[] };
      }
    }
  }
  return {
    section: text(doc.section),
    trait: text(doc.trait),
    timeUnit: text(doc.time_unit, 'Myr'),
    traitUnit: typeof doc.trait_unit === 'string' && doc.trait_unit.trim() !== '' ? doc.trait_unit : null,
    positionKind: text(doc.position_kind, 'time'),
    firstAge: nullableNumber(doc.first_age),
    transform: text(doc.transform, 'none'),
    bestModel: typeof doc.best_model === 'string' ? doc.best_model : null,
    models,
    time,
    position,
    mean,
    samplingVariance,
    count,
    extrapolated: Array.isArray(data.extrapolated) && data.extrapolated.length === time.length ? data.extrapolated.map((flag) => flag === true) : time.map(() => false),
    smoothed,
    curveOrigin: nullableNumber(doc.curve_origin) ?? 0,
  };
}

/**
 * "section / trait" with empty parts left out (as the tables name a lineage).
 *
 * @example
 * figureLineageName({ section: 'A', trait: 'length' }); // 'A / length'
 * figureLineageName({ section: '', trait: '' }); // 'lineage'
 */
export function figureLineageName(lineage: { section: string; trait: string }): string {
  const parts = [lineage.section, lineage.trait].filter((part) => part !== '');
  return parts.length === 0 ? 'lineage' : parts.join(' / ');
}
