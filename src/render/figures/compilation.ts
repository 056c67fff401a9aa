import type { ChartConfiguration, ChartDataset, Plugin } from 'chart.js';
import type { CompilationSummary } from '../../compare/compilation.js';
import { drawFigure, measureText, type FigurePlan, type RenderedFigure } from './chart-backend.js';
import { pointsPerCm, resolveFigureOptions, type FigureOptions, type ResolvedFigureOptions } from './figure-options.js';
import { drawTitleLines, font, wrapText } from './marks.js';
import { ink, lineWidth, supportInk, typeSize } from './style.js';
import { shortModelLabel } from './trajectory.js';

/**
 * The compilation figure: one row per model; each lineage's Akaike weight for
 * that model is a dot (spread vertically by a fixed pattern so that many
 * lineages stay visible), the quartiles a bar and the median a tick; the row
 * label gives the model's wins. Same type, ink and table rules as the
 * model-support figure, so the two read alike.
 */

const margin = 6;
const labelGap = 6;

/**
 * A deterministic spread in [-0.5, 0.5) for the i-th dot of a row (golden-ratio sequence: even, no clumps).
 *
 * @example
 * dotOffset(0); // -0.5
 * dotOffset(1); // 0.1180339887498949 (the golden-ratio fraction 0.618... - 0.5)
 */
export function dotOffset(index: number): number {
  const fraction = (index * 0.6180339887498949) % 1;
  return fraction - 0.5;
}

/**
 * Plan the compilation figure.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const fit = fitLineage(lineage, [strictStasis, randomWalk], { intervals: false });
 * const plan = compilationPlan(summariseCompilation([fit, fit]), resolveFigureOptions({}));
 * plan.title; // 'Model support across 2 lineages'
 * plan.widthPoints; // 255.11811023622047 (to 1e-9; 9 cm in points, 9 / 2.54 × 72)
 */
export function compilationPlan(summary: CompilationSummary, options: ResolvedFigureOptions): FigurePlan {
  const widthPoints = options.widthCm * pointsPerCm;
  const inner = widthPoints - 2 * margin;
  const rows = summary.models;
  const labels = rows.map((model) => shortModelLabel(model.label));
  const winsText = rows.map((model) => `${model.wins} win${model.wins === 1 ? '' : 's'} (${(100 * model.winShare).toFixed(0)}%)`);
  const labelWidth = Math.max(
    ...labels.map((label) => measureText(font(typeSize.table, 'bold'), label)),
    ...winsText.map((text) => measureText(font(typeSize.note), text)),
  );
  const rowHeight = 22;
  const title = `Model support across ${summary.lineages} lineage${summary.lineages === 1 ? '' : 's'}`;
  const subtitle = wrapText(
    `Akaike weight of each model in each lineage (dots); bar: quartiles; tick: median. Wins: lineages where the model has the lowest AICc (${summary.compared} compared).`,
    inner,
    (text) => measureText(font(typeSize.subtitle), text),
  );
  const notes = wrapText(
    'Wins count support, not mechanism: a good fit to a random walk does not by itself tell drift from selection, and support depends on sampling, time-averaging and each age model; weigh it with the specialist’s judgement.',
    inner,
    (text) => measureText(font(typeSize.note), text),
  );
  const titleHeight = typeSize.title * 1.3;
  const subtitleHeight = subtitle.length * typeSize.subtitle * 1.3;
  const top = margin + titleHeight + subtitleHeight + 8;
  const axisHeight = typeSize.tick * 1.3 + typeSize.axisTitle * 1.3 + 8;
  const notesHeight = notes.length * typeSize.note * 1.3 + 6;
  const heightPoints = Math.round(top + rows.length * rowHeight + axisHeight + notesHeight + margin);
  const plotLeft = margin + labelWidth + labelGap;
  const dotRadius = summary.lineages > 300 ? 0.9 : summary.lineages > 60 ? 1.3 : 1.8;

  const plugin: Plugin<'scatter'> = {
    id: 'stratotrendCompilation',
    beforeDatasetsDraw(chart) {
      const context = chart.ctx;
      const area = chart.chartArea;
      const x = chart.scales.x;
      const y = chart.scales.y;
      context.save();
      rows.forEach((model, i) => {
        const centre = y.getPixelForValue(i);
        context.fillStyle = supportInk.track;
        context.fillRect(area.left, centre - rowHeight * 0.36, area.right - area.left, rowHeight * 0.72);
        const { lowerQuartile, upperQuartile } = model.weight;
        if (lowerQuartile !== null && upperQuartile !== null) {
          context.fillStyle = 'rgba(84, 140, 196, 0.35)';
          const left = x.getPixelForValue(lowerQuartile);
          context.fillRect(left, centre - rowHeight * 0.36, Math.max(0.8, x.getPixelForValue(upperQuartile) - left), rowHeight * 0.72);
        }
      });
      context.restore();
    },
    afterDraw(chart) {
      const context = chart.ctx;
      const area = chart.chartArea;
      const x = chart.scales.x;
      const y = chart.scales.y;
      context.save();
      rows.forEach((model, i) => {
        const centre = y.getPixelForValue(i);
        if (model.weight.median !== null) {
          const at = x.getPixelForValue(model.weight.median);
          context.strokeStyle = supportInk.bestBar;
          context.lineWidth = lineWidth.model * 1.4;
          context.beginPath();
          context.moveTo(at, centre - rowHeight * 0.42);
          context.lineTo(at, centre + rowHeight * 0.42);
          context.stroke();
        }
        context.textAlign = 'left';
        context.fillStyle = ink.text;
        context.font = font(typeSize.table, 'bold');
        context.fillText(labels[i], margin, centre - 1);
        context.font = font(typeSize.note);
        context.fillStyle = ink.muted;
        context.fillText(winsText[i], margin, centre + typeSize.note + 0.5);
      });
      context.textBaseline = 'alphabetic';
      drawTitleLines(context, [title], subtitle, margin, margin);
      context.strokeStyle = supportInk.rule;
      context.lineWidth = lineWidth.rule;
      context.beginPath();
      context.moveTo(margin, area.top - 3);
      context.lineTo(area.right, area.top - 3);
      context.stroke();
      context.font = font(typeSize.note);
      context.fillStyle = ink.muted;
      const notesTop = area.bottom + axisHeight + 2;
      notes.forEach((line, k) => context.fillText(line, margin, notesTop + typeSize.note * (1.3 * k + 1)));
      context.restore();
    },
  };

  const configuration = (): ChartConfiguration => {
    const datasets: ChartDataset<'scatter'>[] = rows.map((model, i) => ({
      label: model.id,
      data: model.weights
        .map((weight, k) => (weight === null ? null : { x: weight, y: i + 0.62 * dotOffset(k) }))
        .filter((point): point is { x: number; y: number } => point !== null),
      pointRadius: dotRadius,
      pointHoverRadius: 0,
      pointBackgroundColor: 'rgba(29, 78, 137, 0.55)',
      pointBorderWidth: 0,
      showLine: false,
    }));
    return {
      type: 'scatter',
      data: { datasets },
      options: {
        locale: 'en-US',
        layout: { padding: { left: plotLeft, right: margin + 2, top, bottom: notesHeight + margin } },
        scales: {
          x: {
            type: 'linear',
            min: 0,
            max: 1,
            title: { display: true, text: 'Akaike weight', color: ink.text, font: { size: typeSize.axisTitle }, padding: 1 },
            ticks: { stepSize: 0.25, color: ink.text, font: { size: typeSize.tick }, padding: 2, maxRotation: 0, autoSkip: false, callback: (value) => String(Number(value)) },
            grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis },
            border: { display: true, color: ink.axis, width: lineWidth.axis },
          },
          y: { type: 'linear', min: -0.5, max: rows.length - 0.5, reverse: true, display: false, grid: { display: false } },
        },
        plugins: { legend: { display: false }, tooltip: { enabled: false }, title: { display: false } },
      },
      plugins: [plugin as Plugin],
    };
  };
  return { widthPoints, heightPoints, title, configuration };
}

/**
 * Draw the compilation figure of a batch fit (see `summariseCompilation`).
 *
 * @param summary - the cross-lineage summary
 * @param options - format (png default, svg, pdf), width ('single' 9 cm default, 'double', or cm), dpi (PNG)
 * @returns the file's bytes, MIME type and size
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const figure = renderCompilation(summariseCompilation([fitLineage(lineage, [strictStasis], { intervals: false })]), { format: 'svg' });
 * [figure.mime, figure.width]; // ['image/svg+xml', 255] (9 cm at 72 points an inch)
 */
export function renderCompilation(summary: CompilationSummary, options: FigureOptions = {}): RenderedFigure {
  const resolved = resolveFigureOptions(options);
  return drawFigure(compilationPlan(summary, resolved), resolved);
}
