/**
 * The shapes of the fit document (src/render/fit-document.ts) as the report
 * reads them. The report is built from the JSON document, not from the fit
 * objects, so a report can be made from a saved fit.json and shows exactly
 * the numbers that fit.json holds.
 */

/** One estimate with its interval, as in fit.json. */
export interface EstimateView {
  readonly estimate: number | null;
  readonly lower: number | null;
  readonly upper: number | null;
  readonly at_bound: string | null;
  readonly lower_at_bound: boolean;
  readonly upper_at_bound: boolean;
}

/** One model row of a lineage, as in fit.json. */
export interface ModelView {
  readonly id: string;
  readonly label: string;
  readonly k: number;
  readonly logLik: number | null;
  readonly aicc: number | null;
  readonly delta_aicc: number | null;
  readonly weight: number | null;
  readonly converged: boolean;
  readonly compared: boolean;
  readonly not_compared_reason: string | null;
  readonly interval_method: string;
  readonly params: Readonly<Record<string, EstimateView>>;
  readonly derived: Readonly<Record<string, EstimateView>>;
  readonly flags: readonly string[];
  readonly [extra: string]: unknown;
}

/** One lineage (section × trait), as in fit.json. */
export interface LineageView {
  readonly section: string;
  readonly trait: string;
  readonly horizons: number;
  readonly time_unit: string;
  /** The `--trait-unit` label as given, null when none (absent in a fit.json written before the option). */
  readonly trait_unit?: string | null;
  readonly position_kind: string;
  readonly transform: string;
  readonly sampling_variance: string;
  readonly best_model: string | null;
  readonly models: readonly ModelView[];
  readonly data: {
    readonly time: readonly (number | null)[];
    readonly position: readonly (number | null)[];
    /** Age of each horizon (ages as read, or placed by the age model); null for elapsed-time input; absent in a fit.json written before issue 19. */
    readonly age?: readonly (number | null)[] | null;
    readonly mean: readonly (number | null)[];
    readonly n: readonly (number | null)[];
    readonly within_variance: readonly (number | null)[];
    readonly sampling_variance: readonly (number | null)[];
    readonly extrapolated: readonly boolean[];
    readonly line: readonly number[];
  };
  readonly smoothed: { readonly model: string; readonly mean: readonly (number | null)[]; readonly standard_error: readonly (number | null)[] } | null;
  readonly [extra: string]: unknown;
}

/** The provenance block of fit.json. */
export interface ProvenanceView {
  readonly tool: string;
  readonly version: string;
  readonly inputs: readonly { readonly file: string; readonly sha256: string }[];
  readonly options: Readonly<Record<string, unknown>>;
}

/** The whole fit document. Unknown top-level keys (comparisons, power, …) are kept. */
export interface FitDocumentView {
  readonly provenance: ProvenanceView;
  readonly model_set: string;
  readonly lineages: readonly LineageView[];
  readonly warnings: readonly { readonly category: string; readonly message: string; readonly count: number }[];
  readonly [extra: string]: unknown;
}

/**
 * Read a document produced by `fitDocument` (or parsed from fit.json) as the report's view of it.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * document.lineages.length; // 1
 * asFitDocument({ lineages: [] });
 * // throws: not a stratotrend fit document: expected "provenance" and "lineages"
 */
export function asFitDocument(document: Record<string, unknown>): FitDocumentView {
  const view = document as unknown as FitDocumentView;
  if (!view || typeof view !== 'object' || !Array.isArray(view.lineages) || !view.provenance) {
    throw new TypeError('not a stratotrend fit document: expected "provenance" and "lineages"');
  }
  return view;
}

/**
 * "section / trait", leaving out empty parts (same rule as the terminal table).
 *
 * @example
 * lineageTitle({ section: 'A', trait: 'length' }); // 'A / length'
 * lineageTitle({ section: '', trait: '' }); // 'lineage'
 */
export function lineageTitle(lineage: Pick<LineageView, 'section' | 'trait'>): string {
  const parts = [lineage.section, lineage.trait].filter((part) => part !== '');
  return parts.length === 0 ? 'lineage' : parts.join(' / ');
}
