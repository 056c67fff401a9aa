import type { ChartConfiguration, Plugin } from 'chart.js';
import { medianSorted } from 'simple-statistics';
import { measureText, type FigurePlan } from './chart-backend.js';
import type { FigureLineage } from './figure-input.js';
import { pointsPerCm, type ResolvedFigureOptions } from './figure-options.js';
import { horizonMarks, modelCurve, paddedLimits, timeAxisFor, traitAxisTitle, type HorizonMark, type ModelCurve } from './geometry.js';
import { drawInterval, drawMarker, drawStyledLine, drawTitleLines, fillBetween, font, hasEmphasis, styledWords, wrapStyled, wrapText, type Context } from './marks.js';
import { ink, lineWidth, modelInk, typeSize } from './style.js';
import { drawableLimits, fittedTicks, tickLabel } from './ticks.js';
import { capitalised } from '../words.js';

/**
 * The sections figure for many sections: one small panel per section on
 * shared axes (the same time and trait range in every panel, tick labels
 * on the outer panels only), each panel headed by its section's name and
 * model. Used from `smallMultiplesFrom` sections on, where one plot would
 * have to repeat colours, markers and dashes and its envelopes would pile
 * up; a panel of its own keeps every section apart whatever its number.
 */

/** From this many sections on, the sections figure is drawn as small multiples (the house styles tell six sections apart; a seventh would repeat one). */
export const smallMultiplesFrom = 7;

const margin = 6;
const panelGap = 5;
/** Narrowest panel, in points: room for a dozen horizons and their intervals. */
const minimumPanelWidth = 46;
const headSize = typeSize.note;

/** Where one section's panel landed, in points from the page's top-left corner. */
export interface PanelBox {
  readonly section: string;
  readonly left: number;
  readonly top: number;
  readonly right: number;
  readonly bottom: number;
}

/** A small-multiples plan: the page, and each panel with the shared axis limits its data are mapped by. */
export interface SmallMultiplesPlan extends FigurePlan {
  readonly panels: readonly PanelBox[];
  readonly columns: number;
  /** Shared limits of the horizontal and vertical axes (same in every panel). */
  readonly limits: { readonly x: { min: number; max: number }; readonly y: { min: number; max: number } };
  /** True when larger values of that axis are drawn left (x) or down (y): the age axis. */
  readonly reversed: { readonly x: boolean; readonly y: boolean };
}

function shortLabel(label: string): string {
  const cut = label.indexOf(' (');
  return cut > 0 ? label.slice(0, cut) : label;
}

/**
 * Plan the small-multiples sections figure.
 *
 * @param lineages - the sections of one trait, in panel order (left to right, top to bottom)
 *
 * @example
 * const section = (name) => figureLineage(lineageDocument(fitLineage(lineageFromArrays({ section: name, trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] }), [strictStasis], { intervals: false })));
 * const plan = smallMultiplesPlan([section('A'), section('B')], resolveFigureOptions({}));
 * plan.title; // 'Length: 2 sections'
 * plan.panels.length; // 2
 */
export function smallMultiplesPlan(lineages: readonly FigureLineage[], options: ResolvedFigureOptions): SmallMultiplesPlan {
  const axis = timeAxisFor(lineages);
  const stratigraphic = options.orientation === 'stratigraphic';
  const items = lineages.map((lineage) => {
    const { curve, reason } = modelCurve(lineage, axis, options.model);
    return { lineage, marks: horizonMarks(lineage, axis), curve, reason };
  });
  // The page is drawn a whole number of points wide (drawFigure rounds), so the panels are laid out on that width.
  const widthPoints = Math.round(options.widthCm * pointsPerCm);
  const inner = widthPoints - 2 * margin;
  const times: number[] = [];
  const traits: number[] = [];
  for (const item of items) {
    for (const mark of item.marks) {
      times.push(mark.time);
      traits.push(mark.lower, mark.upper);
    }
    if (item.curve) {
      times.push(...item.curve.time);
      traits.push(...(item.curve.hasEnvelope ? [...item.curve.lower, ...item.curve.upper] : item.curve.mean));
    }
  }
  // Limits the drawing cannot lay out (spans near the double's underflow) are refused, as in the single-panel figure.
  const timeLimits = drawableLimits(paddedLimits(times), 'time axis');
  const traitLimits = drawableLimits(paddedLimits(traits), 'trait axis');
  const limits = stratigraphic ? { x: traitLimits, y: timeLimits } : { x: timeLimits, y: traitLimits };
  const reversed = stratigraphic ? { x: false, y: axis.reverse } : { x: axis.reverse, y: false };
  // The trait title may mark italics with asterisks (`*Invented taxon*`); the time title never does.
  const traitTitle = options.traitTitle ?? traitAxisTitle(lineages[0]);
  const horizontalTitle = stratigraphic ? traitTitle : axis.title;
  const verticalTitle = stratigraphic ? axis.title : traitTitle;
  const styledLinesOf = (title: string, width: number) =>
    hasEmphasis(title) ? wrapStyled(styledWords(title), width, typeSize.axisTitle, measureText) : wrapText(title, width, (text) => measureText(font(typeSize.axisTitle), text), { breakWords: true }).map((line) => [{ text: line, italic: false }]);
  const tickFont = font(typeSize.tick);
  const measureTick = (text: string) => measureText(tickFont, text);

  // Vertical tick labels sit left of the first column: take the widest label any round step could give.
  const verticalTicksFor = (length: number) => fittedTicks(limits.y, 4, length, () => 1.2 * typeSize.tick + 3);
  const probe = verticalTicksFor(400);
  const leftGutter = typeSize.axisTitle * 1.3 + 3 + Math.max(...probe.values.map((value) => measureTick(tickLabel(value, probe.step)))) + 4;
  const plotWidth = inner - leftGutter;
  const columns = Math.max(1, Math.min(lineages.length, Math.floor((plotWidth + panelGap) / (minimumPanelWidth + panelGap))));
  const rows = Math.ceil(lineages.length / columns);
  const panelWidth = (plotWidth - (columns - 1) * panelGap) / columns;
  const panelHeight = panelWidth * (stratigraphic ? 1 : 0.7);

  // Panel heads: the section's name (bold) and its model, wrapped to the panel; every head as tall as the tallest.
  const headMeasure = (weight: 'bold' | 'normal') => (text: string) => measureText(font(headSize, weight), text);
  // The model goes into each head only when the panels differ in it; otherwise the subtitle names it once.
  const modelWords = items.map((item) => (item.curve ? shortLabel(item.curve.label) + (item.curve.limit ? ' (limit)' : '') : 'no model line'));
  const oneModel = new Set(modelWords).size === 1 && items.every((item) => item.curve);
  const heads = items.map((item, index) => ({
    name: wrapText(item.lineage.section || 'lineage', panelWidth, headMeasure('bold'), { breakWords: true }),
    model: oneModel ? [] : wrapText(modelWords[index], panelWidth, headMeasure('normal'), { breakWords: true }),
  }));
  const headLines = Math.max(...heads.map((head) => head.name.length + head.model.length));
  const headHeight = headLines * headSize * 1.2 + 2;
  const rowHeight = headHeight + panelHeight + panelGap;

  const titleLines = options.show.title
    ? wrapText(`${capitalised(lineages[0].trait || 'trait')}: ${lineages.length} sections, one panel each`, inner, (text) => measureText(font(typeSize.title, 'bold'), text), { breakWords: true })
    : [];
  const which = options.linesCaption ?? (options.model ? `the ${shortLabel(items.find((item) => item.curve)?.curve?.label ?? options.model)} model fitted to each section` : "each section's best-supported model");
  const missing = items.filter((item) => !item.curve).map((item) => item.lineage.section || 'lineage');
  // Marker area proportional to n (--marker-area-by-n): the median n at the panels' marker size, held within 0.5–2 times its radius.
  const counts = options.markerByCount ? lineages.flatMap((lineage) => lineage.count ?? []).sort((a, b) => a - b) : [];
  const medianCount = counts.length === 0 ? null : medianSorted(counts);
  const panelMarker = 1.6;
  const markerSize = (n: number | null) => (medianCount === null || n === null ? panelMarker : panelMarker * Math.min(2, Math.max(0.5, Math.sqrt(n / medianCount))));
  const countWords = medianCount === null ? '' : ` Marker area proportional to n (median n = ${Number(medianCount.toPrecision(3))} at the usual size).`;
  const subtitle = options.show.subtitle
    ? wrapText(
        `Bars: 95% sampling intervals of the horizon means. Line and shading: expected trajectory and 95% envelope of ${which}${oneModel ? ` (${modelWords[0]} in every panel)` : ''}. All panels share their axes.${missing.length > 0 ? ` No line for ${missing.join(', ')}.` : ''}${countWords}`,
        inner,
        (text) => measureText(font(typeSize.subtitle), text),
        { breakWords: true },
      )
    : [];
  const titleHeight = titleLines.length * typeSize.title * 1.3;
  const subtitleHeight = subtitle.length * typeSize.subtitle * 1.3;
  const gridTop = margin + titleHeight + subtitleHeight + (titleLines.length + subtitle.length > 0 ? 4 : 0);
  const bottomGutter = typeSize.tick * 1.2 + 4 + typeSize.axisTitle * 1.3 + 2;
  const horizontalTitleLines = styledLinesOf(horizontalTitle, plotWidth);
  const heightPoints = Math.round(gridTop + rows * rowHeight - panelGap + bottomGutter + (horizontalTitleLines.length - 1) * typeSize.axisTitle * 1.3 + margin);

  const panels: PanelBox[] = items.map((item, index) => {
    const column = index % columns;
    const row = Math.floor(index / columns);
    const left = margin + leftGutter + column * (panelWidth + panelGap);
    const top = gridTop + row * rowHeight + headHeight;
    return { section: item.lineage.section || 'lineage', left, top, right: left + panelWidth, bottom: top + panelHeight };
  });
  const horizontalTicks = fittedTicks(limits.x, stratigraphic ? 3 : 4, panelWidth, (label) => measureTick(label) + 0.6 * typeSize.tick);
  const verticalTicks = verticalTicksFor(panelHeight);

  const toX = (panel: PanelBox, value: number) => {
    const share = (value - limits.x.min) / (limits.x.max - limits.x.min);
    return panel.left + (reversed.x ? 1 - share : share) * (panel.right - panel.left);
  };
  const toY = (panel: PanelBox, value: number) => {
    const share = (value - limits.y.min) / (limits.y.max - limits.y.min);
    return panel.bottom - (reversed.y ? 1 - share : share) * (panel.bottom - panel.top);
  };
  const at = (panel: PanelBox, time: number, value: number) => (stratigraphic ? { x: toX(panel, value), y: toY(panel, time) } : { x: toX(panel, time), y: toY(panel, value) });

  const drawPanel = (context: Context, panel: PanelBox, item: { lineage: FigureLineage; marks: readonly HorizonMark[]; curve: ModelCurve | null }, head: { name: string[]; model: string[] }) => {
    context.save();
    context.textAlign = 'left';
    context.textBaseline = 'alphabetic';
    let baseline = panel.top - headHeight + headSize;
    context.fillStyle = ink.text;
    context.font = font(headSize, 'bold');
    for (const line of head.name) {
      context.fillText(line, panel.left, baseline);
      baseline += headSize * 1.2;
    }
    context.fillStyle = ink.muted;
    context.font = font(headSize);
    for (const line of head.model) {
      context.fillText(line, panel.left, baseline);
      baseline += headSize * 1.2;
    }
    // Grid at the shared ticks, then the panel's frame.
    context.strokeStyle = ink.grid;
    context.lineWidth = lineWidth.grid;
    for (const value of horizontalTicks.values) {
      const x = toX(panel, value);
      context.beginPath();
      context.moveTo(x, panel.top);
      context.lineTo(x, panel.bottom);
      context.stroke();
    }
    for (const value of verticalTicks.values) {
      const y = toY(panel, value);
      context.beginPath();
      context.moveTo(panel.left, y);
      context.lineTo(panel.right, y);
      context.stroke();
    }
    context.strokeStyle = ink.axis;
    context.lineWidth = lineWidth.axis;
    context.strokeRect(panel.left, panel.top, panel.right - panel.left, panel.bottom - panel.top);
    context.beginPath();
    context.rect(panel.left, panel.top, panel.right - panel.left, panel.bottom - panel.top);
    context.clip();
    const curve = item.curve;
    if (curve) {
      if (curve.hasEnvelope) {
        fillBetween(context, curve.time.map((t, i) => at(panel, t, curve.lower[i])), curve.time.map((t, i) => at(panel, t, curve.upper[i])), modelInk.band, { color: modelInk.bandEdge, width: lineWidth.bandEdge });
      }
      context.strokeStyle = modelInk.line;
      context.lineWidth = lineWidth.model * 0.8;
      context.setLineDash([]);
      context.beginPath();
      curve.time.forEach((t, i) => {
        const point = at(panel, t, curve.mean[i]);
        if (i === 0) context.moveTo(point.x, point.y);
        else context.lineTo(point.x, point.y);
      });
      context.stroke();
    }
    for (const mark of item.marks) {
      const from = at(panel, mark.time, mark.lower);
      const to = at(panel, mark.time, mark.upper);
      drawInterval(context, from.x, from.y, to.x, to.y, ink.text, lineWidth.interval * 0.8);
    }
    item.marks.forEach((mark, i) => {
      const centre = at(panel, mark.time, mark.mean);
      drawMarker(context, 'circle', centre.x, centre.y, ink.text, !item.lineage.extrapolated[i], markerSize(item.lineage.count?.[i] ?? null));
    });
    context.restore();
  };

  const drawAxes = (context: Context) => {
    context.save();
    context.fillStyle = ink.text;
    context.font = tickFont;
    // Vertical tick labels left of each row's first panel.
    context.textAlign = 'right';
    context.textBaseline = 'middle';
    for (const panel of panels.filter((_, index) => index % columns === 0)) {
      for (const value of verticalTicks.values) context.fillText(tickLabel(value, verticalTicks.step), panel.left - 3, toY(panel, value));
    }
    // Horizontal tick labels under the lowest panel of each column.
    context.textAlign = 'center';
    context.textBaseline = 'top';
    for (let column = 0; column < columns; column++) {
      const lowest = panels.filter((_, index) => index % columns === column).at(-1);
      if (!lowest) continue;
      // Neighbouring columns meet: the end labels of each column are left to the middle ones when they would touch.
      const values = horizontalTicks.values;
      for (const value of values) {
        const x = toX(lowest, value);
        const half = measureTick(tickLabel(value, horizontalTicks.step)) / 2;
        if (x - half < lowest.left - panelGap / 2 + 0.5 || x + half > lowest.right + panelGap / 2 - 0.5) continue;
        context.fillText(tickLabel(value, horizontalTicks.step), x, lowest.bottom + 2);
      }
    }
    // Axis titles, once for all panels.
    context.font = font(typeSize.axisTitle);
    context.textBaseline = 'alphabetic';
    const gridBottom = Math.max(...panels.map((panel) => panel.bottom));
    horizontalTitleLines.forEach((line, k) => drawStyledLine(context, line, margin + leftGutter + plotWidth / 2, gridBottom + typeSize.tick * 1.2 + 4 + typeSize.axisTitle * (1 + 1.3 * k), typeSize.axisTitle, ink.text, measureText));
    const firstTop = panels[0].top;
    const middle = (firstTop + gridBottom) / 2;
    context.translate(margin + typeSize.axisTitle, middle);
    context.rotate(-Math.PI / 2);
    const verticalLines = styledLinesOf(verticalTitle, gridBottom - firstTop);
    verticalLines.forEach((line, k) => drawStyledLine(context, line, 0, (k - (verticalLines.length - 1)) * typeSize.axisTitle * 1.2, typeSize.axisTitle, ink.text, measureText));
    context.restore();
  };

  const plugin: Plugin = {
    id: 'stratotrendSmallMultiples',
    afterDraw(chart) {
      const context = chart.ctx;
      drawTitleLines(context, titleLines, subtitle, margin, margin);
      items.forEach((item, index) => drawPanel(context, panels[index], item, heads[index]));
      drawAxes(context);
    },
  };
  const configuration = (): ChartConfiguration => ({
    type: 'scatter',
    data: { datasets: [] },
    options: {
      locale: 'en-US',
      layout: { padding: 0 },
      scales: { x: { display: false, min: limits.x.min, max: limits.x.max }, y: { display: false, min: limits.y.min, max: limits.y.max } },
      plugins: { legend: { display: false }, tooltip: { enabled: false }, title: { display: false } },
    },
    plugins: [plugin],
  });
  const title = `${capitalised(lineages[0].trait || 'trait')}: ${lineages.length} sections`;
  return { widthPoints, heightPoints, title, configuration, panels, columns, limits, reversed };
}
