import { usageError } from '../data/errors.js';
import { invisibleFormatWords } from '../data/names.js';
import {
  figureJobs,
  figureKinds,
  parseFigureWidth,
  renderModelSupport,
  renderSectionsTogether,
  renderTrajectory,
  resolveFigureOptions,
  type FigureFormat,
  type FigureJob,
  type FigureKind,
  type FigureLineageDocument,
  type FigureOptions,
} from '../render/figures/index.js';
import { durationWords } from './run-cost.js';
import { OutputSet } from '../io/write-output.js';
import { figureParts, type FigurePart } from '../render/figures/figure-options.js';
import { smoothUnderEstimates } from '../fit/fit-lineage.js';
import { lineageFromArrays } from '../lineage.js';
import { findModel } from '../models/registry.js';
import { drawingProgress } from '../io/progress.js';

/** Figure options as commander hands them over (strings until checked). */
export interface FigureCommandOptions {
  figures?: boolean;
  figureFormat?: string;
  figureWidth?: string;
  dpi?: string;
  orientation?: string;
  drawModel?: string;
  smoothedBand?: boolean;
  leaveOut?: string;
  traitTitle?: string;
  markerAreaByN?: boolean;
}

/** The checked figure options and the formats to write. */
export interface FigureRequest {
  readonly formats: readonly FigureFormat[];
  readonly options: FigureOptions;
}

/**
 * Check the figure options of a command line.
 *
 * @throws InputError (usage) naming the option and the bad value
 *
 * @example
 * figureRequest({ figureFormat: 'svg,png', dpi: '300' }).formats; // ['svg', 'png']
 * figureRequest({ dpi: 'high' });
 * // throws: --dpi: expected a number of dots per inch, got "high"
 */
export function figureRequest(options: FigureCommandOptions): FigureRequest {
  const formats = (options.figureFormat ?? 'png').split(',').map((format) => format.trim().toLowerCase()).filter((format) => format !== '');
  for (const format of formats) {
    if (format !== 'png' && format !== 'svg' && format !== 'pdf') throw usageError(`--figure-format: expected png, svg or pdf, got "${format}"`);
  }
  if (formats.length === 0) throw usageError('--figure-format: no format named');
  const dpiText = options.dpi ?? '600';
  const dpi = Number(dpiText);
  if (!/^\s*\d+(\.\d+)?\s*$/.test(dpiText) || !Number.isFinite(dpi)) throw usageError(`--dpi: expected a number of dots per inch, got "${dpiText}"`);
  const orientation = options.orientation ?? 'stratigraphic';
  if (orientation !== 'stratigraphic' && orientation !== 'horizontal') throw usageError(`--orientation: expected stratigraphic or horizontal, got "${orientation}"`);
  const figureOptions: FigureOptions = {
    width: parseFigureWidth(options.figureWidth ?? 'single'),
    dpi,
    orientation,
    model: options.drawModel,
    smoothed: options.smoothedBand === true,
    leaveOut: options.leaveOut === undefined ? [] : parseLeaveOut(options.leaveOut),
    traitTitle: options.traitTitle === undefined ? undefined : traitTitleOption(options.traitTitle),
    markerByCount: options.markerAreaByN === true,
  };
  // Range checks (width, dpi) live with the figures; run them now so a bad option fails before any file is written.
  for (const format of formats) resolveFigureOptions({ ...figureOptions, format: format as FigureFormat });
  if (formats.includes('png')) {
    // The tallest figures are about 1.4 times as tall as wide; refuse before fitting output is written, not midway.
    const { widthCm } = resolveFigureOptions(figureOptions);
    const across = (widthCm / 2.54) * dpi;
    if (across * across * 1.4 > 100e6) throw usageError(`--dpi ${dpiText} at ${widthCm} cm makes PNG figures of over 100 million pixels; lower --dpi or --figure-width, or use --figure-format svg or pdf`);
  }
  return { formats: [...new Set(formats)] as FigureFormat[], options: figureOptions };
}

/**
 * Parse `--leave-out`: a comma-separated list of title, subtitle, notes, or
 * "captions" for all three.
 *
 * @throws InputError (usage) naming the unknown part
 * @example
 * parseLeaveOut('title,notes'); // ["title", "notes"]
 */
export function parseLeaveOut(text: string): FigurePart[] {
  const words = text.split(',').map((word) => word.trim().toLowerCase()).filter((word) => word !== '');
  if (words.length === 0) throw usageError('--leave-out: no part named; use title, subtitle, notes or captions');
  const parts = new Set<FigurePart>();
  for (const word of words) {
    if (word === 'captions') figureParts.forEach((part) => parts.add(part));
    else if ((figureParts as readonly string[]).includes(word)) parts.add(word as FigurePart);
    else throw usageError(`--leave-out: unknown part "${word}"; use title, subtitle, notes or captions`);
  }
  return figureParts.filter((part) => parts.has(part));
}

/** Check `--trait-title`: one line of printable text. */
function traitTitleOption(text: string): string {
  const trimmed = text.trim();
  if (trimmed === '') throw usageError('--trait-title: empty title');
  if (/[\u0000-\u001f\u007f-\u009f]/.test(trimmed)) throw usageError(`--trait-title: control characters are not allowed, got ${JSON.stringify(trimmed)}`);
  const hidden = invisibleFormatWords(trimmed);
  if (hidden !== null) throw usageError(`--trait-title must be visible text; it holds ${hidden}, got ${JSON.stringify(trimmed)}`);
  return trimmed;
}

/** The figures to write and their file names, known before anything is drawn. */
export interface FigurePlanForFolder {
  readonly jobs: readonly FigureJob[];
  readonly request: FigureRequest;
  readonly names: readonly string[];
}

/**
 * Plan the figure files of a fit document's lineages: always pass all of
 * them (names are worked out over the whole document, `figureJobs`) and
 * narrow with `selected`.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic');
 * planFigureFiles(document.lineages, { figureFormat: 'svg' }).names; // ['a_length.trajectory.svg', 'a_length.model-support.svg']
 * planFigureFiles(document.lineages, { drawModel: 'ou' });
 * // throws: --draw-model: no lineage was fitted with "ou"
 */
export function planFigureFiles(
  lineages: readonly FigureLineageDocument[],
  options: FigureCommandOptions,
  kinds: readonly FigureKind[] = figureKinds,
  selected: (index: number) => boolean = () => true,
): FigurePlanForFolder {
  const request = figureRequest(options);
  if (request.options.model) {
    const ids = new Set(lineages.filter((_document, index) => selected(index)).flatMap((document) => document.models.map((model) => model.id)));
    if (!ids.has(request.options.model)) {
      throw usageError(`--draw-model: no lineage was fitted with "${request.options.model}"; models in this fit: ${[...ids].join(', ') || 'none'}`);
    }
  }
  const jobs = figureJobs(lineages, kinds, selected);
  const names = jobs.flatMap((job) => request.formats.map((format) => `${job.stem}.${format}`));
  return { jobs, request, names };
}

/**
 * Rough seconds to draw one figure: a PNG at 9 cm and 600 dpi about 0.75 s
 * (what drawing took per figure in a 20,000-lineage trial, 8–9 hours in all),
 * scaled by its pixel count over that; SVG and PDF about 0.25 s. Our own
 * measurements; other machines differ.
 *
 * @example
 * secondsPerFigure(figureRequest({ figureFormat: 'svg' })); // 0.25
 * secondsPerFigure(figureRequest({})); // 0.75 (a PNG at 9 cm and 600 dpi)
 */
export function secondsPerFigure(request: FigureRequest): number {
  const { widthCm, dpi } = resolveFigureOptions(request.options);
  return request.formats.reduce((total, format) => total + (format === 'png' ? 0.1 + 0.65 * ((widthCm * dpi) / (9 * 600)) ** 2 : 0.25), 0);
}

/** Figures estimated to take longer than this (seconds) to draw are announced first. */
export const longDrawingSeconds = 120;

/**
 * The warning to give before drawing many figures: how many, roughly how
 * long, and how to draw fewer (null when the drawing is short).
 *
 * @param advice - what to suggest ("--no-figures" and "redraw --lineage" for fit; "--lineage" / "--only" for redraw)
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = fitDocument([fitLineage(lineage, [strictStasis], { intervals: false })], provenance, [], 'classic');
 * figureTimeWarning(planFigureFiles(document.lineages, {}), 'use --no-figures'); // null (two figures, about 1.5 s)
 */
export function figureTimeWarning(plan: FigurePlanForFolder, advice: string): string | null {
  const seconds = plan.jobs.length * secondsPerFigure(plan.request);
  if (seconds <= longDrawingSeconds) return null;
  return `drawing ${plan.names.length.toLocaleString('en-US')} figure files will take roughly ${durationWords(seconds)} (an estimate); ${advice}`;
}

/**
 * Draw the planned figures and add them to `set` (an output set of a folder
 * prepared with `prepareOutputFolder`, which claimed the names); they are put
 * in place with the rest of the set by `set.commit()`.
 *
 * @returns the file names written, in drawing order
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic');
 * const added = [];
 * // A stand-in for an OutputSet, which would write the files when committed.
 * const set = { add: (name, bytes) => added.push(name) };
 * writeFigureFiles(document.lineages, planFigureFiles(document.lineages, { figureFormat: 'svg' }, ['model-support']), set, { quiet: true }); // ['a_length.model-support.svg']
 * added; // ['a_length.model-support.svg']
 */
export function writeFigureFiles(lineages: readonly FigureLineageDocument[], plan: FigurePlanForFolder, set: OutputSet, options: { quiet?: boolean } = {}): string[] {
  const written: string[] = [];
  const total = plan.names.length;
  const progress = drawingProgress(total, options);
  const { model, smoothed } = plan.request.options;
  for (const job of plan.jobs) {
    // The band is the smoother of the model drawn: fit.json holds the best model's, so another model's is worked out from its estimates.
    const documents = job.lineages.map((index) => (smoothed && model && job.kind === 'trajectory' ? withSmootherOf(lineages[index], model) : lineages[index]));
    for (const format of plan.request.formats) {
      const options: FigureOptions = { ...plan.request.options, format };
      const figure =
        job.kind === 'trajectory'
          ? renderTrajectory(documents[0], options)
          : job.kind === 'model-support'
            ? renderModelSupport(documents[0], options)
            : renderSectionsTogether(documents, options);
      const name = `${job.stem}.${format}`;
      set.add(name, figure.bytes);
      written.push(name);
      progress?.(written.length);
    }
  }
  return written;
}

/**
 * A lineage document whose `smoothed` is the smoother under `modelId` (the
 * model drawn): unchanged when it already is, else worked out from the
 * model's estimates and the document's horizon data (`smoothUnderEstimates`),
 * or null when that cannot be done (the model was not fitted, or needs a
 * covariate the document does not carry); the figure then says why no band is drawn.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic');
 * document.lineages[0].smoothed.model; // 'strict-stasis' (the best model's)
 * withSmootherOf(document.lineages[0], 'random-walk').smoothed.model; // 'random-walk'
 * withSmootherOf(document.lineages[0], 'ou').smoothed; // null (not fitted)
 */
export function withSmootherOf(document: FigureLineageDocument, modelId: string): FigureLineageDocument {
  if (document.smoothed?.model === modelId) return document;
  let smoothed: { model: string; mean: number[]; standard_error: number[] } | null = null;
  try {
    const entry = document.models.find((candidate) => candidate.id === modelId);
    const definition = findModel(modelId);
    // The data lists of a built document, or of one checked on reading (checkFitDocument), are finite numbers: not checked again.
    const data = document.data as { readonly [list in 'time' | 'mean' | 'sampling_variance' | 'n']: readonly number[] };
    if (entry && definition) {
      const estimates: Record<string, number> = {};
      for (const [name, value] of Object.entries(entry.params)) if (value.estimate !== null) estimates[name] = value.estimate;
      const lineage = lineageFromArrays({ time: data.time, mean: data.mean, samplingVariance: data.sampling_variance, count: data.n });
      const result = smoothUnderEstimates(definition, estimates, lineage);
      if (result.mean.every(Number.isFinite) && result.standardError.every(Number.isFinite)) {
        smoothed = { model: modelId, mean: Array.from(result.mean), standard_error: Array.from(result.standardError) };
      }
    }
  } catch {
    smoothed = null;
  }
  return { ...document, smoothed };
}
