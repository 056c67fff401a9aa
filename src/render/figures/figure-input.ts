import type { LineageView, ModelView } from '../report/document-view.js';

/**
 * The parts of one lineage document (as `lineageDocument` writes it into
 * fit.json) that the figures read, in the figures' terms (`figureLineage`).
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
  /** Specimens per horizon (`data.n`); null where a caller has none (the figures then draw every marker alike). */
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

/**
 * A lineage document as the figures take it: one entry of the fit document's
 * `lineages` (`LineageView`), and for `compare`'s sections figure the time its
 * curve starts on the model's clock (`curve_origin`, default 0).
 */
export type FigureLineageDocument = LineageView & { readonly curve_origin?: number };

/** A data list as numbers: a document built by `lineageDocument` or checked by `checkFitDocument` holds no null there. */
function numbers(values: readonly (number | null)[]): readonly number[] {
  return values as readonly number[];
}

/**
 * One lineage document in the figures' terms. No checks here (issue 22): the
 * document is either built by `lineageDocument` from a lineage the reader
 * validated (`fit`, `report`, `compare`), or read from a saved fit.json and
 * checked field by field once, on reading (`checkFitDocument` in `redraw` and
 * `report FIT_JSON`). Fields a fit.json of an older version may lack
 * (`trait_unit`, `first_age`) and `curve_origin` get their defaults.
 *
 * @param document - one entry of fit.json's `lineages`, or `lineageDocument(fit)`
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })));
 * view.models.map((model) => model.id); // ['strict-stasis', 'random-walk']
 * view.mean; // [1, 2, 3]
 */
export function figureLineage(document: FigureLineageDocument): FigureLineage {
  const { data } = document;
  const time = numbers(data.time);
  const models: FigureModel[] = document.models.map((model) => {
    const pointEstimates = (entries: ModelView['params']): Record<string, number> => {
      const estimates: Record<string, number> = {};
      for (const [name, entry] of Object.entries(entries)) if (entry.estimate !== null) estimates[name] = entry.estimate;
      return estimates;
    };
    return {
      id: model.id,
      label: model.label,
      k: model.k,
      logLik: model.logLik,
      aicc: model.aicc,
      deltaAicc: model.delta_aicc,
      weight: model.weight,
      compared: model.compared,
      notComparedReason: model.not_compared_reason,
      estimates: pointEstimates(model.params),
      derived: pointEstimates(model.derived),
    };
  });
  const { smoothed } = document;
  return {
    section: document.section,
    trait: document.trait,
    timeUnit: document.time_unit,
    // A label of blanks is no label (the axis title stays without a unit).
    traitUnit: typeof document.trait_unit === 'string' && document.trait_unit.trim() !== '' ? document.trait_unit : null,
    positionKind: document.position_kind,
    firstAge: typeof document.first_age === 'number' ? document.first_age : null,
    transform: document.transform,
    bestModel: document.best_model,
    models,
    time,
    position: numbers(data.position),
    mean: numbers(data.mean),
    samplingVariance: numbers(data.sampling_variance),
    count: numbers(data.n),
    extrapolated: data.extrapolated,
    // A smoother that failed at a horizon writes null there; such a band is not drawn.
    smoothed: smoothed && smoothed.mean.every((value) => value !== null) && smoothed.standard_error.every((value) => value !== null)
      ? { model: smoothed.model, mean: numbers(smoothed.mean), standardError: numbers(smoothed.standard_error) }
      : null,
    curveOrigin: document.curve_origin ?? 0,
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
