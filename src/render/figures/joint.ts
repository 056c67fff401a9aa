import type { ChartConfiguration, ChartDataset, Plugin, Scale } from 'chart.js';
import { drawFigure, measureText, type FigurePlan, type RenderedFigure } from './chart-backend.js';
import { pointsPerCm, resolveFigureOptions, type FigureOptions, type ResolvedFigureOptions } from './figure-options.js';
import { normal95, paddedLimits } from './geometry.js';
import { drawInterval, drawTitleLines, font, wrapText } from './marks.js';
import { ink, lineWidth, seriesStyle, typeSize } from './style.js';
import { roundStep, roundTicks, tickLabel } from './ticks.js';

/**
 * Figures of `stratotrend joint`, drawn from a group of joint.json (its
 * `series`): the trait-against-trait trajectory of a pair of traits and the
 * traits' stratigraphic panels side by side on one time axis.
 */

/** The part of a joint.json group the figures read. */
export interface JointFigureGroup {
  readonly section: string;
  readonly traits: readonly string[];
  readonly trait_units?: readonly (string | null)[];
  readonly time_unit: string;
  readonly series: {
    /** "age" when the vertical axis is age before present, else "time" (elapsed since the oldest horizon). */
    readonly axis: 'age' | 'time';
    readonly position: readonly number[];
    readonly mean: readonly (readonly (number | null)[])[];
    readonly sampling_covariance: readonly (readonly (readonly number[])[])[];
  };
}

const margin = 6;
/** chi^2_2(0.95) = -2 ln 0.05 (closed form): the 95% sampling ellipse of two means. */
const chiSquare2At95 = 5.991464547107979;

function unitOf(group: JointFigureGroup, j: number): string {
  const unit = group.trait_units?.[j];
  return unit ? `${group.traits[j]} (${unit})` : group.traits[j];
}

/** Colour of horizon i of n on a light-to-dark ramp (older lighter), so time order reads from the marks. */
function ageColour(i: number, n: number): string {
  const share = n <= 1 ? 1 : i / (n - 1);
  const light = [170, 196, 226];
  const dark = [16, 42, 92];
  const mix = light.map((value, c) => Math.round(value + (dark[c] - value) * share));
  return `rgb(${mix[0]}, ${mix[1]}, ${mix[2]})`;
}

/** 95% sampling ellipse of the means of traits j, l at one horizon, as points in data space. */
function ellipse(centre: [number, number], block: readonly (readonly number[])[], j: number, l: number): [number, number][] {
  const a = Math.max(block[j][j], 0);
  const b = block[j][l];
  const c = Math.max(block[l][l], 0);
  const l11 = Math.sqrt(a);
  const l21 = l11 > 0 ? b / l11 : 0;
  const l22 = Math.sqrt(Math.max(c - l21 * l21, 0));
  const radius = Math.sqrt(chiSquare2At95);
  return Array.from({ length: 49 }, (_, s) => {
    const angle = (2 * Math.PI * s) / 48;
    const u = radius * Math.cos(angle);
    const v = radius * Math.sin(angle);
    return [centre[0] + l11 * u, centre[1] + l21 * u + l22 * v];
  });
}

function titleBlock(title: string, subtitle: string, inner: number): { titleLines: string[]; lines: string[]; height: number } {
  const titleLines = wrapText(title, inner, (text) => measureText(font(typeSize.title, 'bold'), text));
  const lines = wrapText(subtitle, inner, (text) => measureText(font(typeSize.subtitle), text));
  return { titleLines, lines, height: titleLines.length * typeSize.title * 1.3 + lines.length * typeSize.subtitle * 1.3 + 6 };
}

/** Axis look shared by the joint figures; ticks at round values (1, 2 or 5 × 10^k) inside the limits, about `target` of them. */
const axisStyle = (title: string, limits: { min: number; max: number }, target = 5) => ({
  afterBuildTicks: (scale: Scale) => {
    const step = roundStep(limits.max - limits.min, target);
    scale.ticks = roundTicks(limits.min, limits.max, step).map((value) => ({ value, label: tickLabel(value, step) }));
  },
  title: { display: true, text: title, color: ink.text, font: { size: typeSize.axisTitle }, padding: 1 },
  ticks: { color: ink.text, font: { size: typeSize.tick }, padding: 2, maxRotation: 0, autoSkip: false },
  grid: { color: ink.grid, lineWidth: lineWidth.grid, tickLength: 3, tickColor: ink.axis },
  border: { display: true, color: ink.axis, width: lineWidth.axis },
});

/**
 * Plan the trajectory of trait `second` against trait `first` (indices into the group's traits).
 *
 * @example
 * const covariance = [[0.04, 0], [0, 0.04]];
 * const group = { section: 'A', traits: ['length', 'width'], time_unit: 'Myr', series: { axis: 'time', position: [0, 1, 2], mean: [[1, 2], [2, 2.5], [3, 3]], sampling_covariance: [covariance, covariance, covariance] } };
 * const plan = jointTrajectoryPlan(group, 0, 1, resolveFigureOptions({}));
 * plan.title; // 'A: width against length'
 * plan.widthPoints; // 255.11811023622047 (to 1e-9; 9 cm in points)
 */
export function jointTrajectoryPlan(group: JointFigureGroup, first: number, second: number, options: ResolvedFigureOptions): FigurePlan {
  const widthPoints = options.widthCm * pointsPerCm;
  const both = group.series.mean.map((row, i) => ({ i, x: row[first], y: row[second] })).filter((point): point is { i: number; x: number; y: number } => point.x !== null && point.y !== null);
  const ellipses = both.map((point) => ellipse([point.x, point.y], group.series.sampling_covariance[point.i], first, second));
  const xLimits = paddedLimits(ellipses.flat().map((point) => point[0]));
  const yLimits = paddedLimits(ellipses.flat().map((point) => point[1]));
  const title = `${group.section ? `${group.section}: ` : ''}${group.traits[second]} against ${group.traits[first]}`;
  const oldest = group.series.position[both[0]?.i ?? 0];
  const youngest = group.series.position[both[both.length - 1]?.i ?? 0];
  const axisWord = group.series.axis === 'age' ? 'age' : 'time';
  const missing = group.series.mean.length - both.length;
  const subtitle = `Horizon means joined in time order, light (oldest, ${axisWord} ${oldest} ${group.time_unit}) to dark (youngest, ${axisWord} ${youngest} ${group.time_unit}); ellipses: 95% sampling region of each pair of means${missing > 0 ? `; ${missing} ${missing === 1 ? 'horizon' : 'horizons'} lacking one of the traits left out` : ''}.`;
  const header = titleBlock(title, subtitle, widthPoints - 2 * margin);
  const heightPoints = Math.round(widthPoints * 0.85 + header.height);
  const plugin: Plugin<'scatter'> = {
    id: 'stratotrendJointTrajectory',
    beforeDatasetsDraw(chart) {
      const context = chart.ctx;
      const x = chart.scales.x;
      const y = chart.scales.y;
      context.save();
      ellipses.forEach((points, index) => {
        context.beginPath();
        points.forEach(([u, v], s) => (s === 0 ? context.moveTo(x.getPixelForValue(u), y.getPixelForValue(v)) : context.lineTo(x.getPixelForValue(u), y.getPixelForValue(v))));
        context.closePath();
        context.fillStyle = ageColour(index, both.length).replace('rgb', 'rgba').replace(')', ', 0.16)');
        context.fill();
        context.strokeStyle = ageColour(index, both.length);
        context.lineWidth = lineWidth.grid * 1.5;
        context.stroke();
      });
      context.restore();
    },
    afterDraw(chart) {
      drawTitleLines(chart.ctx, header.titleLines, header.lines, margin, margin);
    },
  };
  const configuration = (): ChartConfiguration => {
    const datasets: ChartDataset<'scatter'>[] = [{
      label: 'horizon means',
      data: both.map((point) => ({ x: point.x, y: point.y })),
      showLine: true,
      borderColor: ink.join,
      borderWidth: lineWidth.grid * 2,
      pointRadius: 2.6,
      pointBackgroundColor: both.map((_, index) => ageColour(index, both.length)),
      pointBorderColor: ink.text,
      pointBorderWidth: 0.4,
    }];
    return scatterConfiguration(datasets, {
      x: { type: 'linear', min: xLimits.min, max: xLimits.max, ...axisStyle(unitOf(group, first), xLimits) },
      y: { type: 'linear', min: yLimits.min, max: yLimits.max, ...axisStyle(unitOf(group, second), yLimits) },
    }, header.height, plugin);
  };
  return { widthPoints, heightPoints, title, configuration };
}

/** The chart both joint figures draw: a scatter chart on the given axes, below a title block `headerHeight` high, with our drawing plugin and none of chart.js's own legend, tooltip or title. */
function scatterConfiguration(datasets: unknown[], scales: Record<string, unknown>, headerHeight: number, plugin: Plugin): ChartConfiguration {
  return {
    type: 'scatter',
    data: { datasets: datasets as never },
    options: {
      locale: 'en-US',
      layout: { padding: { left: margin, right: margin + 2, top: headerHeight + margin, bottom: margin } },
      scales: scales as never,
      plugins: { legend: { display: false }, tooltip: { enabled: false }, title: { display: false } },
    },
    plugins: [plugin],
  };
}

/**
 * Plan the stratigraphic panels: one per trait, side by side, sharing the vertical time axis (older at the bottom).
 *
 * @example
 * const covariance = [[0.04, 0], [0, 0.04]];
 * const group = { section: 'A', traits: ['length', 'width'], time_unit: 'Myr', series: { axis: 'time', position: [0, 1, 2], mean: [[1, 2], [2, 2.5], [3, 3]], sampling_covariance: [covariance, covariance, covariance] } };
 * jointPanelsPlan(group, resolveFigureOptions({})).title; // 'A: length, width through the section'
 */
export function jointPanelsPlan(group: JointFigureGroup, options: ResolvedFigureOptions): FigurePlan {
  const k = group.traits.length;
  const widthPoints = options.widthCm * pointsPerCm;
  const title = `${group.section ? `${group.section}: ` : ''}${group.traits.join(', ')} through the section`;
  const subtitle = 'Horizon means with 95% sampling intervals (±1.96 standard errors), one panel per trait on one time axis; a trait not measured at a horizon has no mark there.';
  const header = titleBlock(title, subtitle, widthPoints - 2 * margin);
  const heightPoints = Math.round(widthPoints * 0.9 + header.height);
  const positions = group.series.position;
  const timeLimits = paddedLimits([...positions]);
  const limitsOf = (j: number) => {
    const values: number[] = [];
    group.series.mean.forEach((row, i) => {
      const value = row[j];
      if (value === null) return;
      const half = normal95 * Math.sqrt(Math.max(group.series.sampling_covariance[i][j][j], 0));
      values.push(value - half, value + half);
    });
    return paddedLimits(values);
  };
  const plugin: Plugin<'scatter'> = {
    id: 'stratotrendJointPanels',
    afterDatasetsDraw(chart) {
      const context = chart.ctx;
      const y = chart.scales.y;
      context.save();
      for (let j = 0; j < k; j++) {
        const x = chart.scales[`x${j}`] as Scale;
        const colour = seriesStyle(j).color;
        group.series.mean.forEach((row, i) => {
          const value = row[j];
          if (value === null) return;
          const half = normal95 * Math.sqrt(Math.max(group.series.sampling_covariance[i][j][j], 0));
          const at = y.getPixelForValue(positions[i]);
          drawInterval(context, x.getPixelForValue(value - half), at, x.getPixelForValue(value + half), at, colour);
        });
      }
      context.restore();
    },
    afterDraw(chart) {
      drawTitleLines(chart.ctx, header.titleLines, header.lines, margin, margin);
    },
  };
  const configuration = (): ChartConfiguration => {
    const datasets: ChartDataset<'scatter'>[] = group.traits.map((trait, j) => ({
      label: trait,
      xAxisID: `x${j}`,
      data: group.series.mean.flatMap((row, i) => (row[j] === null ? [] : [{ x: row[j] as number, y: positions[i] }])),
      showLine: true,
      spanGaps: true,
      borderColor: ink.join,
      borderWidth: lineWidth.grid * 2,
      pointRadius: 2.2,
      pointBackgroundColor: seriesStyle(j).color,
      pointBorderWidth: 0,
    }));
    const scales: Record<string, unknown> = {
      y: {
        type: 'linear',
        min: timeLimits.min,
        max: timeLimits.max,
        // Ages: older (larger) at the bottom; elapsed time: older (smaller) at the bottom.
        reverse: group.series.axis === 'age',
        ...axisStyle(group.series.axis === 'age' ? `Age (${group.time_unit} before present)` : `Time since the oldest horizon (${group.time_unit})`, timeLimits, 8),
      },
    };
    group.traits.forEach((_, j) => {
      const limits = limitsOf(j);
      scales[`x${j}`] = { type: 'linear', position: 'bottom', stack: 'traits', min: limits.min, max: limits.max, ...axisStyle(unitOf(group, j), limits, k > 2 ? 3 : 4) };
    });
    return scatterConfiguration(datasets, scales, header.height, plugin);
  };
  return { widthPoints, heightPoints, title, configuration };
}

/**
 * Draw the trajectory of trait `second` against trait `first` of a joint.json group.
 *
 * @example
 * const covariance = [[0.04, 0], [0, 0.04]];
 * const group = { section: 'A', traits: ['length', 'width'], time_unit: 'Myr', series: { axis: 'time', position: [0, 1, 2], mean: [[1, 2], [2, 2.5], [3, 3]], sampling_covariance: [covariance, covariance, covariance] } };
 * const figure = renderJointTrajectory(group, 0, 1, { format: 'svg' });
 * [figure.mime, figure.width]; // ['image/svg+xml', 255]
 */
export function renderJointTrajectory(group: JointFigureGroup, first: number, second: number, options: FigureOptions = {}): RenderedFigure {
  const resolved = resolveFigureOptions(options);
  return drawFigure(jointTrajectoryPlan(group, first, second, resolved), resolved);
}

/**
 * Draw the stratigraphic panels of a joint.json group.
 *
 * @example
 * const covariance = [[0.04, 0], [0, 0.04]];
 * const group = { section: 'A', traits: ['length', 'width'], time_unit: 'Myr', series: { axis: 'time', position: [0, 1, 2], mean: [[1, 2], [2, 2.5], [3, 3]], sampling_covariance: [covariance, covariance, covariance] } };
 * const figure = renderJointPanels(group, { format: 'svg' });
 * [figure.mime, figure.width]; // ['image/svg+xml', 255]
 */
export function renderJointPanels(group: JointFigureGroup, options: FigureOptions = {}): RenderedFigure {
  const resolved = resolveFigureOptions(options);
  return drawFigure(jointPanelsPlan(group, resolved), resolved);
}
