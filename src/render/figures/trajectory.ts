import type { Chart, ChartConfiguration, ChartDataset, Plugin, Scale, ScaleOptionsByType } from 'chart.js';
import { medianSorted } from 'simple-statistics';
import { measureText, type FigurePlan } from './chart-backend.js';
import { figureLineageName, type FigureLineage } from './figure-input.js';
import type { ResolvedFigureOptions } from './figure-options.js';
import { pointsPerCm } from './figure-options.js';
import { horizonMarks, modelCurve, paddedLimits, smoothedBand, timeAxisFor, traitAxisTitle, type HorizonMark, type ModelCurve } from './geometry.js';
import {
  drawInterval,
  drawLegend,
  drawMarker,
  drawStyledLine,
  fillBetween,
  font,
  hasEmphasis,
  layoutLegend,
  plainTitle,
  styledWords,
  withOpacity,
  wrapStyled,
  wrapText,
  type LegendEntry,
  type LegendLayout,
  type StyledWord,
} from './marks.js';
import { ink, lineWidth, markerRadius, modelInk, seriesStyle, smoothedInk, typeSize, type SeriesStyle } from './style.js';
import { drawableLimits, fittedTicks, roundStep, tickLabel, type RoundStep } from './ticks.js';
import { capitalised } from '../words.js';

/**
 * The first part of a model label, before any gloss in parentheses: "directional walk (random walk with drift)" → "directional walk".
 *
 * @example
 * shortModelLabel('directional walk (random walk with drift)'); // 'directional walk'
 */
export function shortModelLabel(label: string): string {
  const cut = label.indexOf(' (');
  return cut > 0 ? label.slice(0, cut) : label;
}

/**
 * A weight as the tables print it: two decimals, "< 0.01" below that.
 *
 * @example
 * formatWeight(0.004); // '< 0.01'
 * formatWeight(0.5); // '0.50'
 */
export function formatWeight(weight: number | null): string {
  if (weight === null) return '—';
  if (weight > 0 && weight < 0.005) return '< 0.01';
  return weight.toFixed(2);
}

/** One lineage as drawn: its horizons, its model curve and, when asked, its smoothed band. */
interface Series {
  readonly lineage: FigureLineage;
  readonly marks: readonly HorizonMark[];
  readonly curve: ModelCurve | null;
  readonly curveReason: string | null;
  readonly smoothed: ReturnType<typeof smoothedBand>;
  /** Null for the one-lineage look (ink markers, blue model). */
  readonly style: SeriesStyle | null;
}

/** Height-to-width ratio of the plot (before the legend): tall for time up the page. */
function aspect(options: ResolvedFigureOptions): number {
  const wide = options.widthCm > 12;
  if (options.orientation === 'stratigraphic') return wide ? 0.78 : 1.2;
  return wide ? 0.5 : 0.74;
}

/** Space around the figure's content, in points; the legend starts this far from the left edge. */
export const trajectoryMargin = 6;
const margin = trajectoryMargin;

/** Opacity of a section's envelope when several sections share a figure: light enough that two overlapping envelopes and the marks under them stay readable. */
const sectionEnvelopeOpacity = 0.13;
/** Opacity of the hairline edge of a section's envelope. */
const sectionEnvelopeEdgeOpacity = 0.3;

/** A trajectory figure's plan, with the legend as laid out (its lines are what is drawn). */
export interface TrajectoryPlan extends FigurePlan {
  readonly legend: LegendLayout;
}

/**
 * The dataset labels of a model's 95% envelope: its lower and upper bound,
 * each a list of points on the chart's axes (x, y as the orientation puts
 * trait and time). `section` is given when several sections share the
 * figure. The envelope is filled between the two, in the order drawn.
 *
 * @example
 * envelopeLabels('Varnek Draw'); // { lower: "envelope lower: Varnek Draw", upper: "envelope upper: Varnek Draw" }
 */
export function envelopeLabels(section?: string): { lower: string; upper: string } {
  const suffix = section === undefined ? '' : `: ${section}`;
  return { lower: `envelope lower${suffix}`, upper: `envelope upper${suffix}` };
}

/** An envelope to fill: the indices of its lower and upper datasets, and its look. */
interface EnvelopeFill {
  readonly lower: number;
  readonly upper: number;
  readonly fill: string;
  readonly edge: { readonly color: string; readonly width: number };
}

/**
 * Plan a trajectory figure for one lineage (`together` false) or for several
 * sections of one trait on a shared time axis (`together` true: each section
 * by colour, marker shape and dash pattern, its model's 95% envelope lightly
 * shaded in its colour).
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis], { intervals: false })));
 * const plan = trajectoryPlan([view], resolveFigureOptions({}), false);
 * plan.title; // 'A / length'
 * plan.widthPoints; // 255.11811023622047 (to 1e-9; 9 cm in points)
 */
export function trajectoryPlan(lineages: readonly FigureLineage[], options: ResolvedFigureOptions, together: boolean): TrajectoryPlan {
  const axis = timeAxisFor(lineages);
  const series: Series[] = lineages.map((lineage, index) => {
    const { curve, reason } = modelCurve(lineage, axis, options.model);
    return {
      lineage,
      marks: horizonMarks(lineage, axis),
      curve,
      curveReason: reason,
      // The band is the smoother of the model drawn, never another model's.
      smoothed: options.smoothed && !together && curve !== null && lineage.smoothed?.model === curve.id ? smoothedBand(lineage, axis) : null,
      style: together ? seriesStyle(index) : null,
    };
  });
  const widthPoints = options.widthCm * pointsPerCm;
  const innerWidth = widthPoints - 2 * margin;
  const legendMeasure = (text: string) => measureText(font(typeSize.legend), text);
  const scaling = options.markerByCount ? countScaling(lineages) : null;
  const markerSize = scaling ? (lineage: FigureLineage, index: number) => scaling.radius(lineage.count?.[index] ?? scaling.reference) : null;
  const legend = layoutLegend([...legendEntries(series, together), ...(scaling ? countLegend(scaling) : [])], innerWidth, legendMeasure);
  const title = together
    ? `${capitalised(lineages[0].trait || 'trait')}: ${lineages.length} sections`
    : figureLineageName(lineages[0]);
  const subtitleMeasure = (text: string) => measureText(font(typeSize.subtitle), text);
  const subtitle = options.show.subtitle ? wrapText(subtitleText(series, together, options), innerWidth, subtitleMeasure, { breakWords: true }) : [];
  const stratigraphic = options.orientation === 'stratigraphic';
  const markedTitle = options.traitTitle ?? traitAxisTitle(lineages[0]);
  // A trait title may mark italics with asterisks (taxon names): chart.js sets a title in one font, so such a title is drawn by the plugin instead.
  const traitTitle = plainTitle(markedTitle);
  const styledTrait = hasEmphasis(markedTitle) ? styledWords(markedTitle) : null;
  // chart.js squeezes a title wider than its box (it draws with maxWidth), so narrow figures wrap the title and the horizontal axis title instead.
  const titleLines = options.show.title ? wrapText(title, innerWidth, (text) => measureText(font(typeSize.title, 'bold'), text), { breakWords: true }) : [];
  // A horizontal axis title gets the plot's width: the figure less the vertical axis (about 40 pt of tick labels and title).
  const horizontalTitle = wrapText(stratigraphic ? traitTitle : axis.title, Math.max(40, innerWidth - 40), (text) => measureText(font(typeSize.axisTitle), text), { breakWords: true });
  const styledLines = styledTrait ? wrapStyled(styledTrait, stratigraphic ? Math.max(40, innerWidth - 40) : Number.POSITIVE_INFINITY, typeSize.axisTitle, measureText) : null;
  const styledTitle = styledLines ? { lines: styledLines, axis: stratigraphic ? ('x' as const) : ('y' as const) } : null;
  // The aspect allows for one line of title, subtitle and horizontal axis title; each further line (narrow figures wrap them) adds its own height, so the plot is not squeezed.
  // A title or subtitle left out (--leave-out) gives its line back, so the plot keeps its size.
  const extraSubtitle =
    (subtitle.length - 1) * typeSize.subtitle * 1.2 + (subtitle.length === 0 ? -6 : 0) + (titleLines.length - 1) * typeSize.title * 1.2 + (titleLines.length === 0 ? -2 : 0) + ((styledLines && stratigraphic ? styledLines.length : horizontalTitle.length) - 1) * typeSize.axisTitle * 1.2;
  // Narrow figures: the plot stays at least as tall as the vertical axis title is long (about 60 pt of title, subtitle and horizontal axis go above and below it).
  const verticalTitle = measureText(font(typeSize.axisTitle), stratigraphic ? axis.title : traitTitle);
  const chartPart = Math.max(widthPoints * aspect(options), verticalTitle + 60);
  const heightPoints = Math.round(chartPart + extraSubtitle + legend.height + 6);

  const configuration = (): ChartConfiguration => {
    const datasets: ChartDataset<'scatter'>[] = [];
    const at = (time: number, value: number) => (stratigraphic ? { x: value, y: time } : { x: time, y: value });
    // Invisible points at every extreme, so the axes take in intervals and envelopes as well as means.
    const extent: { x: number; y: number }[] = [];
    for (const item of series) {
      for (const mark of item.marks) extent.push(at(mark.time, mark.lower), at(mark.time, mark.upper));
      if (item.curve) {
        const curve = item.curve;
        curve.time.forEach((time, i) => {
          extent.push(at(time, curve.hasEnvelope ? curve.lower[i] : curve.mean[i]));
          if (curve.hasEnvelope) extent.push(at(time, curve.upper[i]));
        });
      }
      if (item.smoothed) item.smoothed.time.forEach((time, i) => extent.push(at(time, item.smoothed!.lower[i]), at(time, item.smoothed!.upper[i])));
    }
    datasets.push({ label: 'extent', order: 100, data: extent, pointRadius: 0, pointHoverRadius: 0, pointStyle: false, showLine: false });
    // Envelopes are carried as two invisible datasets each (lower and upper bound, in chart coordinates); the plugin fills between them behind everything else.
    const envelopes: EnvelopeFill[] = [];
    for (const item of series) {
      const curve = item.curve;
      // No width (a variance at 0, or strict stasis): nothing to shade, as for one lineage.
      if (!curve || !curve.hasEnvelope) continue;
      const labels = envelopeLabels(together ? item.lineage.section || 'lineage' : undefined);
      const bound = (label: string, values: readonly number[]): ChartDataset<'scatter'> => ({
        label,
        order: 90,
        data: curve.time.map((time, i) => at(time, values[i])),
        pointRadius: 0,
        pointHoverRadius: 0,
        pointStyle: false,
        showLine: false,
      });
      datasets.push(bound(labels.lower, curve.lower), bound(labels.upper, curve.upper));
      const style = item.style;
      envelopes.push({
        lower: datasets.length - 2,
        upper: datasets.length - 1,
        fill: style ? withOpacity(style.color, sectionEnvelopeOpacity) : modelInk.band,
        edge: style ? { color: withOpacity(style.color, sectionEnvelopeEdgeOpacity), width: lineWidth.bandEdge } : { color: modelInk.bandEdge, width: lineWidth.bandEdge },
      });
    }
    for (const item of series) {
      if (!together) {
        datasets.push({
          label: 'join',
          order: 30,
          data: item.marks.map((mark) => at(mark.time, mark.mean)),
          showLine: true,
          pointRadius: 0,
          pointStyle: false,
          borderJoinStyle: 'round',
          // A tension above 0 keeps chart.js off its fast path, which merges points by whole x units and jogs lines that run up the page.
          tension: 1e-6,
          borderColor: ink.join,
          borderWidth: lineWidth.join,
        });
      }
      if (item.curve) {
        const curve = item.curve;
        datasets.push({
          label: `model ${curve.id}`,
          order: 10,
          data: curve.time.map((time, i) => at(time, curve.mean[i])),
          showLine: true,
          pointRadius: 0,
          pointStyle: false,
          borderJoinStyle: 'round',
          // A tension above 0 keeps chart.js off its fast path, which merges points by whole x units and jogs lines that run up the page.
          tension: 1e-6,
          borderColor: item.style ? item.style.color : modelInk.line,
          borderWidth: lineWidth.model,
          borderDash: item.style ? [...item.style.dash] : [],
        });
      }
      // The model's guide (a moving or shifting optimum), dashed; left out of the extent, so an optimum far from the data does not squeeze the plot (the chart clips it).
      if (item.curve?.guide && !together) {
        const guide = item.curve.guide;
        datasets.push({
          label: 'guide',
          order: 15,
          data: guide.time.map((time, i) => at(time, guide.value[i])),
          showLine: true,
          pointRadius: 0,
          pointStyle: false,
          tension: 0,
          borderColor: modelInk.line,
          borderWidth: lineWidth.smoothed,
          borderDash: guideDash,
        });
      }
      if (item.smoothed) {
        const band = item.smoothed;
        datasets.push({
          label: 'smoothed',
          order: 20,
          data: band.time.map((time, i) => at(time, band.mean[i])),
          showLine: true,
          pointRadius: 0,
          pointStyle: false,
          borderJoinStyle: 'round',
          // A tension above 0 keeps chart.js off its fast path, which merges points by whole x units and jogs lines that run up the page.
          tension: 1e-6,
          borderColor: smoothedInk.line,
          borderWidth: lineWidth.smoothed,
          borderDash: [3.5, 1.8],
        });
      }
    }
    const xs = extent.map((point) => point.x);
    const ys = extent.map((point) => point.y);
    const timeValues = stratigraphic ? ys : xs;
    const traitValues = stratigraphic ? xs : ys;
    // Limits the chart library cannot lay out (spans near the double's underflow) are refused here, never handed to it.
    const timeScale = scaleOptions(stratigraphic ? axis.title : horizontalTitle, axis.reverse, drawableLimits(paddedLimits(timeValues), 'time axis'), stratigraphic ? 7 : 6);
    const traitScale = scaleOptions(stratigraphic ? horizontalTitle : traitTitle, false, drawableLimits(paddedLimits(traitValues), 'trait axis'), 5);
    if (styledTitle) {
      // Room for the plugin's title where chart.js would have set its own: the same line height and padding.
      const room = styledTitle.lines.length * typeSize.axisTitle * 1.2 + 3;
      const plain = traitScale as unknown as { title: { display: boolean }; afterFit?: (scale: Scale) => void };
      plain.title.display = false;
      plain.afterFit = (scale: Scale) => {
        if (scale.isHorizontal()) scale.height += room;
        else scale.width += room;
      };
    }
    return {
      type: 'scatter',
      data: { datasets },
      options: {
        locale: 'en-US',
        layout: { padding: { left: margin, right: margin + 4, top: margin - 2, bottom: legend.height + 6 } },
        scales: stratigraphic ? { x: traitScale, y: timeScale } : { x: timeScale, y: traitScale },
        plugins: {
          legend: { display: false },
          tooltip: { enabled: false },
          title: { display: titleLines.length > 0, text: titleLines.length > 1 ? titleLines : title, align: 'start', color: ink.text, font: { size: typeSize.title, weight: 'bold' }, padding: { top: 0, bottom: 2 } },
          subtitle: { display: subtitle.length > 0, text: subtitle, align: 'start', color: ink.muted, font: { size: typeSize.subtitle }, padding: { top: 0, bottom: 6 } },
        },
      },
      plugins: [marksPlugin(series, stratigraphic, envelopes, legend, styledTitle, markerSize)],
    };
  };
  return { widthPoints, heightPoints, title, configuration, legend };
}

/**
 * Marker area proportional to n: radius = r0 √(n / n_median), the median n
 * of the horizons drawn at the house radius r0, clamped to 0.5–2 r0 so a
 * single horizon of one specimen stays visible and a huge one does not
 * cover its neighbours (the clamp is stated in the legend).
 */
function countScaling(lineages: readonly FigureLineage[]): { reference: number; smallest: number; largest: number; radius(n: number): number } | null {
  const counts = lineages.flatMap((lineage) => lineage.count ?? []).sort((a, b) => a - b);
  if (counts.length === 0) return null;
  const reference = medianSorted(counts);
  const radius = (n: number) => markerRadius * Math.min(2, Math.max(0.5, Math.sqrt(n / reference)));
  return { reference, smallest: counts[0], largest: counts[counts.length - 1], radius };
}

function countLegend(scaling: { reference: number; smallest: number; largest: number }): LegendEntry[] {
  const round = (n: number) => Number(n.toPrecision(3));
  const clamped = scaling.smallest < scaling.reference / 4 || scaling.largest > scaling.reference * 4;
  return [
    {
      key: { marker: { shape: 'circle', color: ink.text } },
      text: `Marker area proportional to n (this size: median n = ${round(scaling.reference)}; n from ${round(scaling.smallest)} to ${round(scaling.largest)})${clamped ? ', areas held within ¼ to 4 times this' : ''}`,
    },
  ];
}

// The round-tick helpers (1–2–5 × 10^k steps, labels that fit) live in ticks.ts, shared with the power curve.
export { tickStep } from './ticks.js';

/**
 * One linear axis. Its ticks are set here, after chart.js has built its own
 * (`afterBuildTicks`), because chart.js does not keep to a given step: with
 * both limits and a step set it treats (max − min) / step as a whole number
 * whenever it is within step / 1000 of one, which for steps of 500 and more
 * is always, and then spaces ticks (max − min) / count apart from min
 * (labels such as −536,282.0); and its label skipping keeps every other
 * tick (2.5, 3.5 … on a step of 0.5). So chart.js neither chooses, skips
 * nor rotates ticks: every tick is a multiple of a 1, 2 or 5 × 10^k step
 * coarse enough that the labels fit.
 */
function scaleOptions(title: string | readonly string[], reverse: boolean, limits: { min: number; max: number }, ticks: number): ScaleOptionsByType<'linear'> {
  let chosen: RoundStep = roundStep(limits.max - limits.min, ticks);
  const tickFont = font(typeSize.tick);
  return {
    type: 'linear',
    reverse,
    min: limits.min,
    max: limits.max,
    title: { display: true, text: typeof title === 'string' ? title : title.length > 1 ? [...title] : title[0], color: ink.text, font: { size: typeSize.axisTitle }, padding: { top: 2, bottom: 1 } },
    afterBuildTicks(scale: Scale) {
      const horizontal = scale.isHorizontal();
      // Along a horizontal axis a label needs its width and a gap of about two thirds of the type size; up a vertical one, a line of type and 3 pt.
      const extent = horizontal ? (label: string) => measureText(tickFont, label) + 0.6 * typeSize.tick : () => 1.2 * typeSize.tick + 3;
      const fitted = fittedTicks(limits, ticks, horizontal ? scale.width : scale.height, extent);
      chosen = fitted.step;
      const values = reverse ? [...fitted.values].reverse() : fitted.values;
      scale.ticks = values.map((value) => ({ value }));
    },
    ticks: { color: ink.text, font: { size: typeSize.tick }, padding: 2, autoSkip: false, maxRotation: 0, callback: (value: number | string) => tickLabel(Number(value), chosen) },
    grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis, tickWidth: lineWidth.axis },
    border: { color: ink.axis, width: lineWidth.axis },
  } as unknown as ScaleOptionsByType<'linear'>;
}

function subtitleText(series: readonly Series[], together: boolean, options: ResolvedFigureOptions): string {
  if (together) {
    const which = options.linesCaption ?? (options.model ? `the ${shortModelLabel(series.find((s) => s.curve)?.curve?.label ?? options.model)} model fitted to each section` : "each section's best-supported model");
    const missing = series.filter((s) => !s.curve).map((s) => s.lineage.section || 'lineage');
    const drawn = series.filter((s) => s.curve);
    const flat = drawn.filter((s) => !s.curve!.hasEnvelope).map((s) => s.lineage.section || 'lineage');
    const shading = flat.length === drawn.length ? '' : '; shading: its 95% envelope';
    const noEnvelope = drawn.length === 0 || flat.length === 0 ? '' : flat.length === drawn.length ? ' No envelopes: every model drawn has its variance at 0.' : ` No envelope for ${flat.join(', ')} (variance at 0).`;
    const limits = drawn.filter((s) => s.curve!.limit !== null).map((s) => `${s.lineage.section || 'lineage'}: ${shortModelLabel(s.curve!.label)} with ${s.curve!.limit}.`);
    return `Bars: 95% sampling intervals of the horizon means. Lines: expected trajectory of ${which}${shading}.${noEnvelope}${missing.length > 0 ? ` No line for ${missing.join(', ')}.` : ''}${limits.length > 0 ? ` ${limits.join(' ')}` : ''}`;
  }
  const item = series[0];
  if (!item.curve) return `No model trajectory drawn: ${item.curveReason}.`;
  const curve = item.curve;
  const support = curve.weight === null ? '' : `, Akaike weight ${formatWeight(curve.weight)}`;
  const best = curve.isBest ? 'best-supported model' : `model drawn (best supported: ${shortModelLabel(item.lineage.models.find((m) => m.id === item.lineage.bestModel)?.label ?? 'none')})`;
  const spans = item.lineage.time[item.lineage.time.length - 1] > 0;
  const flat = curve.hasEnvelope || curve.id === 'strict-stasis' || !spans ? '' : ' Its envelope has no width: the variance is estimated at 0.';
  const limit = curve.limit === null ? '' : ` ${capitalised(curve.limit)}.`;
  const noBand = options.smoothed && !item.smoothed ? ` No smoothed band: the fit holds no smoother under ${shortModelLabel(curve.label)}.` : '';
  return `${capitalised(curve.label)}: ${best}${support}.${limit}${flat}${noBand}`;
}

/** Dash of a model's guide line (longer than the smoothed mean's, so the two stay apart). */
const guideDash = [6, 3];

function legendEntries(series: readonly Series[], together: boolean): LegendEntry[] {
  if (together) {
    const extrapolated = series.some((item) => item.lineage.extrapolated.some((flag) => flag));
    const open: LegendEntry[] = extrapolated ? [{ key: { marker: { shape: 'circle', color: ink.text, filled: false } }, text: 'Open marker: age extrapolated' }] : [];
    // One entry for every shaded band (a strip of each section's tint), not one per section.
    const shaded = series.filter((item) => item.curve?.hasEnvelope).map((item) => withOpacity(item.style!.color, 2 * sectionEnvelopeOpacity));
    const bands: LegendEntry[] = shaded.length > 0 ? [{ key: { swatches: shaded }, text: shaded.length > 1 ? "Shading: 95% envelope of each section's model" : "Shading: 95% envelope of the model" }] : [];
    return [...series.map((item) => {
      const style = item.style!;
      const name = item.lineage.section || 'lineage';
      return {
        key: {
          line: item.curve ? { color: style.color, width: lineWidth.model, dash: style.dash } : undefined,
          marker: { shape: style.marker, color: style.color, filled: style.filled },
        },
        text: item.curve ? `${name}: ${shortModelLabel(item.curve.label)}` : name,
      };
    }), ...bands, ...open];
  }
  const item = series[0];
  const entries: LegendEntry[] = [
    { key: { interval: { color: ink.text }, marker: { shape: 'circle', color: ink.text } }, text: 'Horizon mean with 95% sampling interval' },
  ];
  if (item.lineage.extrapolated.some((flag) => flag)) {
    entries.push({ key: { marker: { shape: 'circle', color: ink.text, filled: false } }, text: 'Age extrapolated beyond the age model' });
  }
  if (item.curve) {
    entries.push({ key: { line: { color: modelInk.line, width: lineWidth.model } }, text: `Expected trajectory, ${shortModelLabel(item.curve.label)}` });
    if (item.curve.hasEnvelope) entries.push({ key: { band: { fill: modelInk.band, edge: modelInk.bandEdge } }, text: '95% envelope of the model' });
    if (item.curve.guide) entries.push({ key: { line: { color: modelInk.line, width: lineWidth.smoothed, dash: guideDash } }, text: item.curve.guide.words });
  }
  if (item.smoothed) {
    const band = item.smoothed;
    const wide = band.upper.some((upper, i) => upper > band.lower[i]);
    entries.push({
      key: { band: wide ? { fill: smoothedInk.band } : undefined, line: { color: smoothedInk.line, width: lineWidth.smoothed, dash: [3.5, 1.8] } },
      text: `Smoothed mean (${shortModelLabel(item.lineage.models.find((m) => m.id === band.model)?.label ?? band.model)})${wide ? ' with 95% band' : ', band of zero width'}`,
    });
  }
  return entries;
}

function marksPlugin(
  series: readonly Series[],
  stratigraphic: boolean,
  envelopes: readonly EnvelopeFill[],
  legend: LegendLayout,
  styledTitle: { readonly lines: readonly (readonly StyledWord[])[]; readonly axis: 'x' | 'y' } | null,
  markerSize: ((lineage: FigureLineage, index: number) => number) | null,
): Plugin<'scatter'> {
  const pixel = (chart: Chart, time: number, value: number) => {
    const x = chart.scales.x.getPixelForValue(stratigraphic ? value : time);
    const y = chart.scales.y.getPixelForValue(stratigraphic ? time : value);
    return { x, y };
  };
  const clip = (chart: Chart) => {
    const area = chart.chartArea;
    chart.ctx.save();
    chart.ctx.beginPath();
    chart.ctx.rect(area.left, area.top, area.right - area.left, area.bottom - area.top);
    chart.ctx.clip();
  };
  return {
    id: 'stratotrendTrajectory',
    beforeDatasetsDraw(chart) {
      clip(chart);
      // Drawn from the envelope datasets themselves, so what is shaded is what the configuration carries.
      const points = (index: number) => (chart.data.datasets[index].data as { x: number; y: number }[]).map((point) => ({ x: chart.scales.x.getPixelForValue(point.x), y: chart.scales.y.getPixelForValue(point.y) }));
      for (const envelope of envelopes) fillBetween(chart.ctx, points(envelope.lower), points(envelope.upper), envelope.fill, envelope.edge);
      for (const item of series) {
        if (item.smoothed) {
          const band = item.smoothed;
          fillBetween(
            chart.ctx,
            band.time.map((t, i) => pixel(chart, t, band.lower[i])),
            band.time.map((t, i) => pixel(chart, t, band.upper[i])),
            smoothedInk.band,
            { color: smoothedInk.line, width: lineWidth.bandEdge, dash: [1.5, 1.5] },
          );
        }
      }
      chart.ctx.restore();
    },
    afterDatasetsDraw(chart) {
      clip(chart);
      for (const item of series) {
        const color = item.style ? item.style.color : ink.text;
        for (const mark of item.marks) {
          const from = pixel(chart, mark.time, mark.lower);
          const to = pixel(chart, mark.time, mark.upper);
          drawInterval(chart.ctx, from.x, from.y, to.x, to.y, color);
        }
      }
      for (const item of series) {
        const style = item.style;
        item.marks.forEach((mark, i) => {
          const centre = pixel(chart, mark.time, mark.mean);
          const filled = (style ? style.filled : true) && !item.lineage.extrapolated[i];
          drawMarker(chart.ctx, style ? style.marker : 'circle', centre.x, centre.y, style ? style.color : ink.text, filled, markerSize ? markerSize(item.lineage, i) : markerRadius);
        });
      }
      chart.ctx.restore();
    },
    afterDraw(chart) {
      drawLegend(chart.ctx, legend, margin, chart.height - legend.height - 4);
      if (styledTitle) {
        const scale = chart.scales[styledTitle.axis];
        const area = chart.chartArea;
        const size = typeSize.axisTitle;
        const lineHeight = size * 1.2;
        const count = styledTitle.lines.length;
        if (styledTitle.axis === 'x') {
          // The lines' block sits at the foot of the scale (1 pt padding below, as chart.js sets its titles).
          styledTitle.lines.forEach((line, k) => drawStyledLine(chart.ctx, line, (area.left + area.right) / 2, scale.bottom - 1 - (count - 1 - k) * lineHeight - size * 0.28, size, ink.text, measureText));
        } else {
          chart.ctx.save();
          chart.ctx.translate(scale.left + 1, (area.top + area.bottom) / 2);
          chart.ctx.rotate(-Math.PI / 2);
          styledTitle.lines.forEach((line, k) => drawStyledLine(chart.ctx, line, 0, k * lineHeight + size * 0.92, size, ink.text, measureText));
          chart.ctx.restore();
        }
      }
    },
  };
}
