import type { ChartConfiguration, Plugin, Scale } from 'chart.js';
import { drawFigure, measureText, type FigurePlan, type RenderedFigure } from './chart-backend.js';
import { pointsPerCm, resolveFigureOptions, type FigureOptions } from './figure-options.js';
import { drawLegend, font, layoutLegend, wrapText, type LegendLayout } from './marks.js';
import { ink, lineWidth, seriesStyles, typeSize, type MarkerShape } from './style.js';
import { fittedTicks, tickLabel, type RoundStep } from './ticks.js';
import { traitUnitLabel } from '../units.js';

/** What the power-curve figure needs: the grid of `power --json` and a few words about the design. */
export interface PowerCurveInput {
  readonly grid: readonly { readonly drift: number; readonly drift_sd: number; readonly p_best: number; readonly p_weight: number; readonly p_lrt: number }[];
  /** Lineage name for the title. */
  readonly lineage: string;
  readonly horizons: number;
  readonly replicates: number;
  readonly timeUnit: string;
  /**
   * Unit of the trait (`--trait-unit`, the power document's `input.trait_unit`),
   * already "ln mm" style when the trait was logged; null or absent: "trait units".
   */
  readonly traitUnit?: string | null;
  readonly weightThreshold: number;
  readonly targetPower: number;
  readonly level: number;
  /** Pooled within-horizon sd, to state the drift in sd per time unit. */
  readonly withinSd: number;
}

const margin = 6;

/**
 * Tick options of one linear axis of the power curve: chart.js's own ticks
 * are replaced after it builds them (`afterBuildTicks`) by the multiples of
 * a 1, 2 or 5 × 10^k step inside the axis (`fittedTicks`, common practice
 * for axis labelling), coarsened until the labels fit the axis length, and
 * labelled with the step's decimals. Left to itself chart.js labels the
 * axis ends, so a drift grid ending at 0.1237 showed "0.1237" (the same
 * cure as the trajectory figure's `scaleOptions`).
 */
function roundTickOptions(limits: { min: number; max: number }, target: number): Record<string, unknown> {
  let chosen: RoundStep | null = null;
  const tickFont = font(typeSize.tick);
  return {
    afterBuildTicks(scale: Scale) {
      // A flat or undefined axis has no round ticks to give: keep chart.js's.
      if (!(limits.max > limits.min) || !Number.isFinite(limits.max - limits.min)) return;
      const horizontal = scale.isHorizontal();
      // Along a horizontal axis a label needs its width and a gap of about two thirds of the type size; up a vertical one, a line of type and 3 pt.
      const extent = horizontal ? (label: string) => measureText(tickFont, label) + 0.6 * typeSize.tick : () => 1.2 * typeSize.tick + 3;
      const fitted = fittedTicks(limits, target, horizontal ? scale.width : scale.height, extent);
      chosen = fitted.step;
      scale.ticks = fitted.values.map((value) => ({ value }));
    },
    ticks: {
      color: ink.text,
      font: { size: typeSize.tick },
      autoSkip: false,
      maxRotation: 0,
      callback: (value: number | string) => (chosen === null ? String(value) : tickLabel(Number(value), chosen)),
    },
  };
}

/**
 * The power curve of a design: the probability of each decision rule
 * (directional walk best by AICc; its Akaike weight above the threshold;
 * the bootstrap likelihood-ratio test rejecting the random walk) against the
 * true drift, with the target power and the test level as reference lines.
 * House look of `src/render/figures/` (palette, type sizes, lines).
 */
export function powerCurvePlan(input: PowerCurveInput, options: FigureOptions = {}): { plan: FigurePlan; resolved: ReturnType<typeof resolveFigureOptions> } {
  const resolved = resolveFigureOptions(options);
  const widthPoints = resolved.widthCm * pointsPerCm;
  const heightPoints = widthPoints * 1.05;
  const inner = widthPoints - 2 * margin;
  const title = `Power to detect a trend: ${input.lineage}`;
  const traitUnits = traitUnitLabel(input.traitUnit, false, 'trait units');
  const subtitle = wrapText(
    `${input.replicates} simulated directional walks per drift on this design (N = ${input.horizons} horizons, its own times and sampling variances). ` +
      `1 within-horizon sd per ${input.timeUnit} = ${Number(input.withinSd.toPrecision(3))} ${traitUnits} per ${input.timeUnit}. Dashed: ${Math.round(input.targetPower * 100)}% power; dotted: the ${Math.round(input.level * 100)}% level.`,
    inner,
    (text) => measureText(font(typeSize.subtitle), text),
  );
  const note = wrapText(
    'Power depends on the assumed step variance, sampling, time-averaging and the age model; a design that cannot detect a trend does not show there was none.',
    inner,
    (text) => measureText(font(typeSize.note), text),
  );
  const series = [
    { key: 'p_lrt' as const, label: `bootstrap likelihood-ratio test at ${Math.round(input.level * 100)}%`, style: seriesStyles[0], point: 'circle' },
    { key: 'p_best' as const, label: 'directional walk best by AICc', style: seriesStyles[1], point: 'triangle' },
    { key: 'p_weight' as const, label: `Akaike weight > ${input.weightThreshold}`, style: seriesStyles[2], point: 'rect' },
  ];
  // Our own legend, one entry per line (chart.js's packs entries side by side), keyed like the curves: line, dash and marker.
  const markerOf = (point: string): MarkerShape => (point === 'rect' ? 'square' : point === 'triangle' ? 'triangle' : 'circle');
  const legendMeasure = (text: string) => measureText(font(typeSize.legend), text);
  const legendParts = series.map((item) =>
    layoutLegend([{ key: { line: { color: item.style.color, width: lineWidth.model, dash: item.style.dash }, marker: { shape: markerOf(item.point), color: item.style.color } }, text: capitalised(item.label) }], inner, legendMeasure),
  );
  const legend: LegendLayout = { rows: legendParts.flatMap((part) => part.rows), height: legendParts.reduce((sum, part) => sum + part.height, 0) };
  const noteHeight = note.length * typeSize.note * 1.3;
  const maximumDrift = Math.max(...input.grid.map((point) => point.drift));
  const minimumDrift = Math.min(0, ...input.grid.map((point) => point.drift));
  const notePlugin: Plugin = {
    id: 'stratotrendPowerNote',
    afterDraw(chart) {
      const context = chart.ctx;
      context.save();
      context.font = font(typeSize.note);
      context.fillStyle = ink.muted;
      context.textBaseline = 'top';
      note.forEach((line, i) => context.fillText(line, margin, chart.height - margin - (note.length - i) * typeSize.note * 1.3));
      context.restore();
      drawLegend(context, legend, margin, chart.height - margin - noteHeight - 4 - legend.height);
    },
  };
  const configuration = (): ChartConfiguration => ({
    type: 'scatter',
    data: {
      datasets: [
        ...series.map((item) => ({
          label: item.label,
          data: input.grid.map((point) => ({ x: point.drift, y: point[item.key] })),
          showLine: true,
          borderColor: item.style.color,
          backgroundColor: item.style.color,
          borderWidth: lineWidth.model,
          borderDash: [...item.style.dash],
          pointStyle: item.point,
          pointRadius: 2.4,
          tension: 1e-6,
          // Points at the axis ends (the largest drift, probabilities 0 and 1) are drawn whole, not cut at the plot's edge.
          clip: false,
        })),
        {
          label: `target power ${input.targetPower}`,
          data: [{ x: minimumDrift, y: input.targetPower }, { x: maximumDrift, y: input.targetPower }],
          showLine: true,
          borderColor: ink.muted,
          borderWidth: lineWidth.rule,
          borderDash: [2, 2],
          pointRadius: 0,
          pointStyle: false,
        },
        {
          label: `test level ${input.level}`,
          data: [{ x: minimumDrift, y: input.level }, { x: maximumDrift, y: input.level }],
          showLine: true,
          borderColor: ink.join,
          borderWidth: lineWidth.rule,
          borderDash: [0.8, 1.6],
          pointRadius: 0,
          pointStyle: false,
        },
      ],
    } as ChartConfiguration['data'],
    options: {
      locale: 'en-US',
      layout: { padding: { left: margin, right: margin + 4, top: margin - 2, bottom: noteHeight + 8 + legend.height + 4 } },
      scales: {
        x: {
          type: 'linear',
          min: minimumDrift,
          max: maximumDrift,
          title: { display: true, text: `true drift (${traitUnits} per ${input.timeUnit})`, color: ink.text, font: { size: typeSize.axisTitle } },
          ...roundTickOptions({ min: minimumDrift, max: maximumDrift }, 6),
          grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis },
          border: { color: ink.axis, width: lineWidth.axis },
        },
        y: {
          type: 'linear',
          min: 0,
          max: 1,
          title: { display: true, text: 'probability', color: ink.text, font: { size: typeSize.axisTitle } },
          ...roundTickOptions({ min: 0, max: 1 }, 6),
          grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis },
          border: { color: ink.axis, width: lineWidth.axis },
        },
      },
      plugins: {
        legend: { display: false },
        tooltip: { enabled: false },
        title: { display: true, text: title, align: 'start', color: ink.text, font: { size: typeSize.title, weight: 'bold' }, padding: { top: 0, bottom: 2 } },
        subtitle: { display: true, text: subtitle, align: 'start', color: ink.muted, font: { size: typeSize.subtitle }, padding: { top: 0, bottom: 6 } },
      },
    },
    plugins: [notePlugin],
  }) as ChartConfiguration;
  return { plan: { widthPoints, heightPoints, title, configuration }, resolved };
}

/** Draw the power curve (PNG by default; svg and pdf as the other figures). */
export function renderPowerCurve(input: PowerCurveInput, options: FigureOptions = {}): RenderedFigure {
  const { plan, resolved } = powerCurvePlan(input, options);
  return drawFigure(plan, resolved);
}

function capitalised(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}
