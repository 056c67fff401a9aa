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

/** Summarise a batch fit across lineages (and its trend verdicts, when tested) for the terminal, the figure and the JSON document. */
export function compileFits(fits: readonly LineageFit[], trendTests: readonly TrendTest[] | null): Compilation {
  const summary = summariseCompilation(fits);
  const trends = trendTests ? summariseTrends(fits, trendTests) : null;
  return { summary, trends, document: compilationDocument(summary, trends) };
}

/** The summary as terminal text. */
export function compilationText(summary: CompilationSummary): string {
  return compilationTable(summary);
}

/** Draw compilation.png into the run's output set (loads the chart stack only now). */
export async function writeCompilationFigure(summary: CompilationSummary, set: OutputSet): Promise<void> {
  const modulePath = new URL('../render/figures/compilation.js', import.meta.url);
  if (!existsSync(modulePath)) return;
  const { renderCompilation } = (await import(modulePath.href)) as { renderCompilation: (summary: CompilationSummary, options: { format: 'png' }) => { bytes: Uint8Array } };
  set.add('compilation.png', Buffer.from(renderCompilation(summary, { format: 'png' }).bytes));
}
