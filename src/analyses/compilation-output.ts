import { existsSync } from 'node:fs';
import { summariseCompilation, type CompilationSummary } from '../compare/compilation.js';
import { compilationDocument, compilationTable } from '../render/compilation-table.js';
import type { FitRun } from './fit-run.js';
import type { OutputSet } from '../io/write-output.js';

/** Summarise a batch fit across lineages and add it to the run's JSON document as `compilation`. */
export function addCompilation(run: FitRun): CompilationSummary {
  const summary = summariseCompilation(run.fits);
  run.document.compilation = compilationDocument(summary);
  return summary;
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
