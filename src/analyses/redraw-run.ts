import { dirname } from 'node:path';
import { checkFitDocument, readJsonFile } from '../data/documents.js';
import { InputError, usageError } from '../data/errors.js';
import { WarningLog } from '../data/warnings.js';
import { OutputSet, prepareOutputFolder } from '../io/write-output.js';
import { figureKinds, type FigureKind } from '../render/figures/index.js';
import type { FitDocumentView, LineageView } from '../render/report/document-view.js';
import { figureTimeWarning, planFigureFiles, writeFigureFiles, type FigureCommandOptions } from './figure-files.js';

// The redraw job: a saved fit.json's figures drawn again, without refitting
// (`stratotrend redraw`, src/cli/render-command.ts, prints what it wrote).

/** Options of `stratotrend redraw`. */
export interface RedrawCommandOptions extends FigureCommandOptions {
  out?: string;
  only?: string;
  lineage?: string[];
  quiet?: boolean;
}

/**
 * The lineages of a saved fit.json, after checking the whole document (one
 * message naming the file and the field). This is the one check: from here
 * on the lineages are typed and the figures take them as they are (issue 22).
 */
function readFitDocument(file: string): readonly LineageView[] {
  const { value } = readJsonFile(file, 'the fit.json written by "fit --out"');
  checkFitDocument(value, file);
  return (value as FitDocumentView).lineages;
}

function parseKinds(text: string): FigureKind[] {
  const kinds = text.split(',').map((kind) => kind.trim()).filter((kind) => kind !== '');
  for (const kind of kinds) {
    if (!(figureKinds as readonly string[]).includes(kind)) throw usageError(`--only: unknown figure kind "${kind}"; use ${figureKinds.join(', ')}`);
  }
  if (kinds.length === 0) throw usageError('--only: no figure kind named');
  return kinds as FigureKind[];
}

function lineageMatches(document: LineageView, wanted: readonly string[]): boolean {
  if (wanted.length === 0) return true;
  const { section, trait } = document;
  const names = [section, trait, [section, trait].filter((part) => part !== '').join(' / ')].map((name) => name.normalize('NFC').toLowerCase());
  return wanted.some((name) => names.includes(name.trim().normalize('NFC').toLowerCase()));
}

/** Run `work`; a data error from the drawing (an axis that cannot be labelled, which knows no file) is re-raised naming the fit document. */
function namingFile<T>(file: string, work: () => T): T {
  try {
    return work();
  } catch (error) {
    if (error instanceof InputError && error.kind === 'data' && error.file === undefined) throw new InputError(error.message, { file });
    throw error;
  }
}

/**
 * Draw the figures of a saved fit.json again (the lineages and kinds asked
 * for) into `options.out` (default: the fit.json's folder), as one output
 * set; returns the folder and the names written.
 *
 * @param onLongRun called with the `long-run` warning, before drawing, when the figures will take long
 * @example
 * // mkdtempSync, writeFileSync, rmSync from node:fs, tmpdir from node:os (a scratch folder for a small fit.json)
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * writeFileSync(`${folder}/fit.json`, JSON.stringify(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic')));
 * redrawFigures(`${folder}/fit.json`, { only: 'model-support', figureFormat: 'svg', quiet: true }).written; // ['a_length.model-support.svg']
 * redrawFigures(`${folder}/fit.json`, { lineage: ['B'], quiet: true });
 * // throws: --lineage: no lineage of
 * rmSync(folder, { recursive: true });
 */
export function redrawFigures(file: string, options: RedrawCommandOptions, onLongRun: (warning: string) => void = () => {}): { out: string; written: string[] } {
  const all = readFitDocument(file);
  const wanted = options.lineage ?? [];
  const chosen = all.map((document) => lineageMatches(document, wanted));
  if (!chosen.includes(true)) {
    throw usageError(`--lineage: no lineage of ${file} is called ${wanted.map((name) => `"${name}"`).join(' or ')}`);
  }
  // Names come from the whole document, as fit gave them, so redrawing some lineages never takes another's file name.
  const plan = namingFile(file, () => planFigureFiles(all, options, parseKinds(options.only ?? figureKinds.join(',')), (index) => chosen[index]));
  if (plan.jobs.length === 0) throw usageError('nothing to draw (a sections figure needs a trait measured in two or more sections)');
  const out = options.out ?? dirname(file);
  const folder = prepareOutputFolder(out, [file], plan.names);
  const warnings = new WarningLog();
  const long = figureTimeWarning(plan, 'draw only the lineages you need with --lineage NAME, or only some kinds with --only');
  if (long) {
    warnings.add('long-run', long);
    onLongRun(long);
  }
  const set = new OutputSet(folder, out);
  const written = namingFile(file, () => {
    try {
      return writeFigureFiles(all, plan, set, { quiet: options.quiet });
    } catch (error) {
      set.abandon();
      throw error;
    }
  });
  set.commit();
  return { out, written };
}
