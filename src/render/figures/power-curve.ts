import type { ChartConfiguration, Plugin, Scale } from 'chart.js';
import { drawFigure, measureText, type FigurePlan, type RenderedFigure } from './chart-backend.js';
import { pointsPerCm, resolveFigureOptions, type FigureOptions } from './figure-options.js';
import { drawLegend, font, layoutLegend, withOpacity, wrapText, type LegendLayout } from './marks.js';
import { ink, lineWidth, seriesStyles, typeSize, type MarkerShape } from './style.js';
import { drawableLimits, fittedTicks, tickLabel, type RoundStep } from './ticks.js';
import { squaredLabel, traitUnitLabel } from '../units.js';
import { capitalised } from '../words.js';

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
  /**
   * The step variance the replicates were simulated with, printed on the
   * figure (`settings.step_variance` of the power document); absent for a
   * document from before it was printed.
   */
  readonly stepVariance?: number;
  /**
   * Several assumed step variances (increasing, the power document's
   * `assumptions`): each gets its three curves, the largest drawn solid and
   * the smaller ones faded; `grid` is then the largest's. Absent or one
   * entry: one set of curves.
   */
  readonly assumptions?: readonly { readonly stepVariance: number; readonly source: string; readonly grid: PowerCurveInput['grid'] }[];
}

/**
 * The assumed step variances of a `power --json` document for the figure
 * (`assumptions`: step variance, why it was assumed, its grid), or undefined
 * for a document written before they were recorded.
 *
 * @example
 * powerCurveAssumptions({}); // undefined (a document from before assumptions were recorded)
 * powerCurveAssumptions({ assumptions: [{ step_variance: 0.1, source: 'upper end of the 95% interval of the fitted step variance', grid: [] }] }); // [{ stepVariance: 0.1, source: 'upper end of its 95% interval', grid: [] }]
 */
export function powerCurveAssumptions(document: { assumptions?: unknown }): PowerCurveInput['assumptions'] {
  if (!Array.isArray(document.assumptions)) return undefined;
  return (document.assumptions as { step_variance: number; source: string; grid: PowerCurveInput['grid'] }[]).map((entry) => ({
    stepVariance: entry.step_variance,
    source: entry.source.startsWith('upper end') ? 'upper end of its 95% interval' : entry.source,
    grid: entry.grid,
  }));
}

/**
 * The assumed step variance(s) of a power document in words, for its figure caption (empty for a document without them).
 *
 * @example
 * powerAssumptionCaption({ settings: { step_variance: 0.05 } }); // 'Assumed step variance 0.05.'
 * powerAssumptionCaption({ assumptions: [{ step_variance: 0.01, source: 'fitted', grid: [] }, { step_variance: 0.1, source: 'upper end', grid: [] }] }); // "Assumed step variance 0.01 (fitted) and 0.1 (upper end of its 95% interval); the smaller's curves are faded."
 */
export function powerAssumptionCaption(document: { settings?: Record<string, unknown>; assumptions?: unknown }): string {
  const assumptions = powerCurveAssumptions(document);
  const show = (value: number): string => String(Number(value.toPrecision(4)));
  if (assumptions && assumptions.length > 1) return `Assumed step variance ${assumptions.map((entry) => `${show(entry.stepVariance)} (${entry.source})`).join(' and ')}; the smaller's curves are faded.`;
  const value = assumptions?.[0]?.stepVariance ?? document.settings?.step_variance;
  return typeof value === 'number' ? `Assumed step variance ${show(value)}.` : '';
}

/**
 * The assumed step variance(s) in words for the figure: "Assumed step variance 0.05 (trait units)² per Myr."
 *
 * @example
 * const input = { grid: [], lineage: 'A / length', horizons: 12, replicates: 99, timeUnit: 'Myr', weightThreshold: 0.9, targetPower: 0.8, level: 0.05, withinSd: 0.5, stepVariance: 0.05 };
 * assumedVarianceWords(input); // 'Assumed step variance 0.05 (trait units)² per Myr.'
 * assumedVarianceWords({ ...input, traitUnit: 'mm' }); // 'Assumed step variance 0.05 mm² per Myr.'
 */
export function assumedVarianceWords(input: PowerCurveInput): string {
  const unit = `${squaredLabel(traitUnitLabel(input.traitUnit, false, 'trait units'))} per ${input.timeUnit}`;
  const show = (value: number): string => String(Number(value.toPrecision(4)));
  if (input.assumptions && input.assumptions.length > 1) {
    const parts = input.assumptions.map((entry, index) => `${show(entry.stepVariance)} (${entry.source}${index < input.assumptions!.length - 1 ? '; faded curves' : '; solid curves'})`);
    return `Assumed step variance ${parts.join(' and ')} ${unit}.`;
  }
  const value = input.assumptions?.[0]?.stepVariance ?? input.stepVariance;
  return value === undefined ? '' : `Assumed step variance ${show(value)} ${unit}.`;
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
 *
 * @example
 * const grid = [{ drift: 0, drift_sd: 0, p_best: 0.1, p_weight: 0.05, p_lrt: 0.05 }, { drift: 0.5, drift_sd: 1, p_best: 0.8, p_weight: 0.7, p_lrt: 0.75 }];
 * const input = { grid, lineage: 'A / length', horizons: 12, replicates: 99, timeUnit: 'Myr', weightThreshold: 0.9, targetPower: 0.8, level: 0.05, withinSd: 0.5, stepVariance: 0.05 };
 * const { plan } = powerCurvePlan(input);
 * plan.title; // 'Power to detect a trend: A / length'
 * plan.heightPoints; // 267.8740157480315 (to 1e-9; 1.05 × the 9 cm width in points)
 */
export function powerCurvePlan(input: PowerCurveInput, options: FigureOptions = {}): { plan: FigurePlan; resolved: ReturnType<typeof resolveFigureOptions> } {
  const resolved = resolveFigureOptions(options);
  const widthPoints = resolved.widthCm * pointsPerCm;
  // Several assumed step variances double the legend: the figure grows so the plot keeps its height.
  const heightPoints = widthPoints * (input.assumptions && input.assumptions.length > 1 ? 1.45 : 1.05);
  const inner = widthPoints - 2 * margin;
  const title = `Power to detect a trend: ${input.lineage}`;
  const traitUnits = traitUnitLabel(input.traitUnit, false, 'trait units');
  const subtitle = wrapText(
    `${input.replicates} simulated directional walks per drift on this design (N = ${input.horizons} horizons, its own times and sampling variances). ` +
      `1 within-horizon sd per ${input.timeUnit} = ${Number(input.withinSd.toPrecision(3))} ${traitUnits} per ${input.timeUnit}. ${assumedVarianceWords(input)}${assumedVarianceWords(input) ? ' ' : ''}Dashed: ${Math.round(input.targetPower * 100)}% power; dotted: the ${Math.round(input.level * 100)}% level.`,
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
  // Every assumption's curves; the last (largest step variance) solid, the others faded.
  const curves = input.assumptions && input.assumptions.length > 1 ? input.assumptions : [{ stepVariance: input.stepVariance ?? Number.NaN, source: '', grid: input.grid }];
  const several = curves.length > 1;
  const allPoints = curves.flatMap((curve) => curve.grid);
  const maximumDrift = Math.max(...allPoints.map((point) => point.drift));
  const minimumDrift = Math.min(0, ...allPoints.map((point) => point.drift));
  // A power document read back (report --attach) may carry any numbers: limits chart.js cannot lay out are refused, not handed to it.
  if (maximumDrift !== minimumDrift) drawableLimits({ min: minimumDrift, max: maximumDrift }, 'drift axis');
  // Our own legend, one entry per line (chart.js's packs entries side by side), keyed like the curves: line, dash and marker.
  const markerOf = (point: string): MarkerShape => (point === 'rect' ? 'square' : point === 'triangle' ? 'triangle' : 'circle');
  const legendMeasure = (text: string) => measureText(font(typeSize.legend), text);
  const legendParts = series.map((item) =>
    layoutLegend([{ key: { line: { color: item.style.color, width: lineWidth.model, dash: item.style.dash }, marker: { shape: markerOf(item.point), color: item.style.color } }, text: capitalised(item.label) }], inner, legendMeasure),
  );
  const legend: LegendLayout = { rows: legendParts.flatMap((part) => part.rows), height: legendParts.reduce((sum, part) => sum + part.height, 0) };
  const noteHeight = note.length * typeSize.note * 1.3;
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
        ...curves.flatMap((curve, index) => {
          const faded = index < curves.length - 1;
          const color = (hex: string): string => (faded ? withOpacity(hex, 0.4) : hex);
          return series.map((item) => ({
            label: several ? `${item.label}, step variance ${Number(curve.stepVariance.toPrecision(4))}` : item.label,
            data: curve.grid.map((point) => ({ x: point.drift, y: point[item.key] })),
            showLine: true,
            borderColor: color(item.style.color),
            backgroundColor: color(item.style.color),
            borderWidth: faded ? lineWidth.model * 0.7 : lineWidth.model,
            borderDash: [...item.style.dash],
            pointStyle: item.point,
            pointRadius: faded ? 1.8 : 2.4,
            tension: 1e-6,
            // Points at the axis ends (the largest drift, probabilities 0 and 1) are drawn whole, not cut at the plot's edge.
            clip: false,
          }));
        }),
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

/**
 * Draw the power curve (PNG by default; svg and pdf as the other figures).
 *
 * @example
 * const grid = [{ drift: 0, drift_sd: 0, p_best: 0.1, p_weight: 0.05, p_lrt: 0.05 }, { drift: 0.5, drift_sd: 1, p_best: 0.8, p_weight: 0.7, p_lrt: 0.75 }];
 * const input = { grid, lineage: 'A / length', horizons: 12, replicates: 99, timeUnit: 'Myr', weightThreshold: 0.9, targetPower: 0.8, level: 0.05, withinSd: 0.5, stepVariance: 0.05 };
 * const figure = renderPowerCurve(input, { format: 'svg' });
 * [figure.mime, figure.width]; // ['image/svg+xml', 255]
 */
export function renderPowerCurve(input: PowerCurveInput, options: FigureOptions = {}): RenderedFigure {
  const { plan, resolved } = powerCurvePlan(input, options);
  return drawFigure(plan, resolved);
}
