import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { summariseCompilation, type CompilationSummary } from '../compare/compilation.js';
import { compilationDocument, compilationTable } from '../render/compilation-table.js';
import type { FitRun } from './fit-command.js';
import { writeAtomically } from './write-output.js';

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

/** Draw compilation.png into the output folder (loads the chart stack only now). */
export async function writeCompilationFigure(summary: CompilationSummary, folder: string): Promise<void> {
  const modulePath = new URL('../render/figures/compilation.js', import.meta.url);
  if (!existsSync(modulePath)) return;
  const { renderCompilation } = (await import(modulePath.href)) as { renderCompilation: (summary: CompilationSummary, options: { format: 'png' }) => { bytes: Uint8Array } };
  writeAtomically(join(folder, 'compilation.png'), Buffer.from(renderCompilation(summary, { format: 'png' }).bytes));
}
