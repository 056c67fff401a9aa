/**
 * Publication figures of a fit, drawn from the lineage documents exactly as
 * fit.json holds them (`lineageDocument` in src/render/fit-document.ts), so
 * a saved fit can be redrawn without refitting. The documents are typed and
 * not checked again here: a saved fit.json is checked once, where it is read
 * (`checkFitDocument`, in `redraw` and `report FIT_JSON`).
 *
 * - `renderTrajectory`: one lineage through its section: horizon means with
 *   95% sampling intervals (±1.96 √e_i), the chosen model's expected
 *   trajectory and 95% envelope, optionally the smoothed mean and its band.
 * - `renderSectionsTogether`: several sections of one trait on one time axis,
 *   each told apart by colour, marker shape and dash pattern.
 * - `renderModelSupport`: the table of models with Akaike-weight bars.
 *
 * Importing this module is cheap: the chart stack (chart.js,
 * chartjs-node-canvas, @napi-rs/canvas) is loaded on the first figure drawn.
 *
 * Example: `renderTrajectory(fitJson.lineages[0], { format: 'svg' })` returns
 * the SVG's bytes with `mime` 'image/svg+xml' (each function's own example shows a call).
 */
import { drawFigure, type RenderedFigure } from './chart-backend.js';
import { figureLineage, type FigureLineageDocument } from './figure-input.js';
import { resolveFigureOptions, type FigureOptions } from './figure-options.js';
import { modelSupportPlan } from './model-support.js';
import { smallMultiplesFrom, smallMultiplesPlan } from './small-multiples.js';
import { trajectoryPlan } from './trajectory.js';

export type { FigureFrame, RenderedFigure } from './chart-backend.js';
export type { FigureLineage, FigureLineageDocument, FigureModel } from './figure-input.js';
export { figureLineage, figureLineageName } from './figure-input.js';
export type { FigureFormat, FigureOptions, FigureOrientation, ResolvedFigureOptions } from './figure-options.js';
export { resolveFigureOptions, parseFigureWidth, singleColumnCm, doubleColumnCm, defaultDpi } from './figure-options.js';
export { pngInfo, withPngMetadata } from './png-metadata.js';
export { figureJobs, figureKinds, fileSlug, type FigureJob, type FigureKind } from './figure-set.js';
export * as figureStyle from './style.js';

/**
 * The trajectory figure of one lineage.
 *
 * @param lineageDocument - one entry of fit.json `lineages` (or `lineageDocument(fit)`)
 * @param options - format (png default, svg, pdf), width ('single' 9 cm default, 'double' 18 cm, or cm),
 *   dpi (600 default, PNG only), orientation ('stratigraphic' default or 'horizontal'),
 *   model (id to draw; default the best-supported), smoothed (band on/off, default off)
 * @returns the file's bytes, MIME type, size (pixels for PNG, points for vector) and where the plot landed
 * @throws InputError when an option is out of range or an axis cannot be labelled (the document itself is not checked here: it comes from a fit, or was checked when read)
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const figure = renderTrajectory(lineageDocument(fitLineage(lineage, [strictStasis], { intervals: false })), { format: 'svg' });
 * figure.mime; // 'image/svg+xml'
 * figure.width; // 255 (9 cm at 72 points an inch)
 */
export function renderTrajectory(lineageDocument: FigureLineageDocument, options: FigureOptions = {}): RenderedFigure {
  const resolved = resolveFigureOptions(options);
  return drawFigure(trajectoryPlan([figureLineage(lineageDocument)], resolved, false), resolved);
}

/**
 * Several sections of one trait on a shared time axis (ages line up across
 * sections); from `smallMultiplesFrom` (7) sections on, one small panel per
 * section on shared axes instead (src/render/figures/small-multiples.ts). Each section's horizons and its model's expected trajectory
 * (best-supported by default) are drawn, with the model's 95% envelope
 * lightly shaded in the section's colour (none where its variance is 0);
 * smoothed bands are left to the one-lineage figures so the sections stay legible.
 *
 * @param lineageDocuments - the lineage documents of the sections, in legend order
 *
 * @example
 * const section = (name) => lineageDocument(fitLineage(lineageFromArrays({ section: name, trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] }), [strictStasis], { intervals: false }));
 * const figure = renderSectionsTogether([section('A'), section('B')], { format: 'svg' });
 * [figure.mime, figure.width]; // ['image/svg+xml', 255]
 */
export function renderSectionsTogether(lineageDocuments: readonly FigureLineageDocument[], options: FigureOptions = {}): RenderedFigure {
  const resolved = resolveFigureOptions(options);
  if (lineageDocuments.length === 0) throw new Error('renderSectionsTogether needs at least one lineage');
  const lineages = lineageDocuments.map(figureLineage);
  // Many sections: one panel each on shared axes, so none has to share a colour, marker or dash with another.
  if (lineages.length >= smallMultiplesFrom) return drawFigure(smallMultiplesPlan(lineages, resolved), resolved);
  return drawFigure(trajectoryPlan(lineages, resolved, true), resolved);
}

/**
 * The model-support figure of one lineage: K, logL, AICc, ΔAICc and the
 * Akaike weight (as a bar) of every model, best marked, models not compared
 * shown as such. Width, format and dpi options as for `renderTrajectory`.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const figure = renderModelSupport(lineageDocument(fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })), { format: 'svg' });
 * [figure.mime, figure.width]; // ['image/svg+xml', 255]
 */
export function renderModelSupport(lineageDocument: FigureLineageDocument, options: FigureOptions = {}): RenderedFigure {
  const resolved = resolveFigureOptions(options);
  return drawFigure(modelSupportPlan(figureLineage(lineageDocument), resolved), resolved);
}
