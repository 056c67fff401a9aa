import { existsSync } from 'node:fs';
import { summariseCompilation, type CompilationSummary } from '../compare/compilation.js';
import { compilationDocument, compilationTable, type CompilationDocument } from '../render/compilation-table.js';
import { summariseTrends, type TrendSummary } from '../render/trend-text.js';
import type { LineageFit } from '../fit/fit-lineage.js';
import type { TrendTest } from '../trend/trend-test.js';
import type { OutputSet } from '../io/write-output.js';

/** `fit --summary`: the batch summarised across lineages, its trend verdicts in counts, and both as the fit document's `compilation` block. */
export interface Compilation {
  readonly summary: CompilationSummary;
  /** null with --no-trend-test. */
  readonly trends: TrendSummary | null;
  readonly document: CompilationDocument;
}

/**
 * Summarise a batch fit across lineages (and its trend verdicts, when tested) for the terminal, the figure and the JSON document.
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const b = lineageFromArrays({ section: 'B', trait: 'length', time: [0, 1, 2], mean: [1, 1.1, 0.9], samplingVariance: [1, 1, 1] });
 * const compilation = compileFits([a, b].map((lineage) => fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })), null);
 * compilation.summary.best; // ['strict-stasis', 'strict-stasis'] (random walk not compared: N - K - 1 = 0)
 * compilation.document.models[0].wins; // 2
 * compilation.trends; // null (no trend tests given)
 */
export function compileFits(fits: readonly LineageFit[], trendTests: readonly TrendTest[] | null): Compilation {
  const summary = summariseCompilation(fits);
  const trends = trendTests ? summariseTrends(fits, trendTests) : null;
  return { summary, trends, document: compilationDocument(summary, trends) };
}

/**
 * The summary as terminal text.
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * compilationText(compileFits([fitLineage(a, [strictStasis], { intervals: false })], null).summary).split('\n')[0]; // 'Compilation of 1 lineage (1 with models compared by AICc)'
 */
export function compilationText(summary: CompilationSummary): string {
  return compilationTable(summary);
}

/**
 * Draw compilation.png into the run's output set (loads the chart stack only now).
 *
 * @example
 * // The set here only records names and sizes. Run from dist/ (the built program) this adds compilation.png;
 * // run from the sources (as this example is checked) there is no compiled chart module beside it and nothing is added.
 * const a = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const summary = compileFits([fitLineage(a, [strictStasis, randomWalk], { intervals: false })], null).summary;
 * const files = new Map();
 * await writeCompilationFigure(summary, { add: (name, bytes) => files.set(name, bytes.length > 0) });
 * [...files].every(([name, drawn]) => name === 'compilation.png' && drawn); // true
 */
export async function writeCompilationFigure(summary: CompilationSummary, set: OutputSet): Promise<void> {
  const modulePath = new URL('../render/figures/compilation.js', import.meta.url);
  if (!existsSync(modulePath)) return;
  const { renderCompilation } = (await import(modulePath.href)) as { renderCompilation: (summary: CompilationSummary, options: { format: 'png' }) => { bytes: Uint8Array } };
  set.add('compilation.png', Buffer.from(renderCompilation(summary, { format: 'png' }).bytes));
}
