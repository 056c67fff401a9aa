import type { ChartConfiguration, Plugin } from 'chart.js';
import { drawFigure, measureText, type FigurePlan, type RenderedFigure } from './chart-backend.js';
import { pointsPerCm, resolveFigureOptions, type FigureOptions } from './figure-options.js';
import { font, wrapText } from './marks.js';
import { ink, lineWidth, seriesStyles, typeSize } from './style.js';
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
      layout: { padding: { left: margin, right: margin + 4, top: margin - 2, bottom: note.length * typeSize.note * 1.3 + 8 } },
      scales: {
        x: {
          type: 'linear',
          min: minimumDrift,
          max: maximumDrift,
          title: { display: true, text: `true drift (${traitUnits} per ${input.timeUnit})`, color: ink.text, font: { size: typeSize.axisTitle } },
          ticks: { color: ink.text, font: { size: typeSize.tick }, maxTicksLimit: 8 },
          grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis },
          border: { color: ink.axis, width: lineWidth.axis },
        },
        y: {
          type: 'linear',
          min: 0,
          max: 1,
          title: { display: true, text: 'probability', color: ink.text, font: { size: typeSize.axisTitle } },
          ticks: { color: ink.text, font: { size: typeSize.tick }, stepSize: 0.2 },
          grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis },
          border: { color: ink.axis, width: lineWidth.axis },
        },
      },
      plugins: {
        legend: {
          display: true,
          position: 'bottom',
          align: 'start',
          labels: { usePointStyle: true, boxWidth: 4, boxHeight: 4, font: { size: typeSize.legend }, color: ink.text, padding: 4, filter: (item: { text: string }) => !item.text.startsWith('target power') && !item.text.startsWith('test level') },
        },
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
