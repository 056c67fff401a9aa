/**
 * The look of stratotrend's figures: one palette, one set of marker shapes
 * and dash patterns, and type sizes in points. Sizes are in points (1/72
 * inch) because every figure is drawn in points and scaled to the output
 * resolution, so a 7.5 pt label is 7.5 pt on the printed page at any dpi.
 *
 * The palette is our own. Its colours differ in lightness as well as in hue
 * (listed darkest first), so they stay apart for readers with red–green
 * colour vision deficiency and when printed in grayscale; every series also
 * differs by marker shape and dash pattern, so nothing depends on colour
 * alone.
 */

/** Type family (DejaVu is installed with the tool's runtime; the generic family is the fallback). */
export const fontFamily = "'DejaVu Sans', sans-serif";

/** Type sizes in points. */
export const typeSize = {
  title: 9,
  subtitle: 7.5,
  axisTitle: 8,
  tick: 7.5,
  legend: 7.5,
  table: 7.5,
  note: 6.5,
} as const;

/** Ink colours. */
export const ink = {
  /** Text, axes, horizon means and their intervals. */
  text: '#1c1d21',
  /** Secondary text (subtitles, notes, models not compared). */
  muted: '#5d6169',
  /** Axis lines and tick marks. */
  axis: '#3a3d44',
  /** Grid lines: light enough that a blank region stays blank in a pixel test (luminance about 233). */
  grid: '#e9e9ec',
  /** Thin line joining successive horizon means. */
  join: '#9a9ea6',
  background: '#ffffff',
} as const;

/** Colours of the fitted model's expected trajectory and envelope. */
export const modelInk = {
  line: '#1d4e89',
  band: 'rgba(84, 140, 196, 0.30)',
  bandEdge: 'rgba(29, 78, 137, 0.55)',
} as const;

/** Colours of the smoothed lineage mean and its band. */
export const smoothedInk = {
  line: '#b4531a',
  band: 'rgba(222, 137, 64, 0.22)',
} as const;

/** Weight bars of the model-support figure. */
export const supportInk = {
  bar: '#3f6fa6',
  bestBar: '#1d4e89',
  track: '#eef0f3',
  rule: '#1c1d21',
} as const;

/** A marker shape drawn at each horizon mean. */
export type MarkerShape = 'circle' | 'triangle' | 'square' | 'diamond' | 'triangle-down' | 'hexagon';

/** How one section is told apart from the others: colour, marker, whether the marker is filled, and a dash pattern. */
export interface SeriesStyle {
  readonly color: string;
  readonly marker: MarkerShape;
  readonly filled: boolean;
  /** Dash pattern in points (empty: solid). */
  readonly dash: readonly number[];
}

/**
 * Series styles for sections drawn together. The first four step up in
 * relative luminance (about 0.05, 0.18, 0.27, 0.36 by the WCAG 2 formula),
 * so they stay apart in grayscale and for red–green colour-blind readers;
 * all six differ in marker shape and dash pattern. After the sixth the
 * cycle repeats with open markers.
 */
export const seriesStyles: readonly SeriesStyle[] = [
  { color: '#1d3f7a', marker: 'circle', filled: true, dash: [] },
  { color: '#c8502a', marker: 'triangle', filled: true, dash: [4.5, 2] },
  { color: '#3a9e8c', marker: 'square', filled: true, dash: [1.2, 1.6] },
  { color: '#c99a2e', marker: 'diamond', filled: true, dash: [5, 1.8, 1.2, 1.8] },
  { color: '#7b4f9d', marker: 'triangle-down', filled: true, dash: [2.5, 2.5] },
  { color: '#8a8f98', marker: 'hexagon', filled: true, dash: [7, 2] },
];

/**
 * The style of the i-th section (0-based).
 *
 * @example
 * seriesStyle(0); // { color: '#1d3f7a', marker: 'circle', filled: true, dash: [] }
 * seriesStyle(9).filled; // false (the cycle repeats with open markers)
 */
export function seriesStyle(index: number): SeriesStyle {
  const base = seriesStyles[index % seriesStyles.length];
  return index < seriesStyles.length ? base : { ...base, filled: false };
}

/** Line widths in points. */
export const lineWidth = {
  axis: 0.6,
  grid: 0.4,
  interval: 0.75,
  model: 1.2,
  bandEdge: 0.4,
  smoothed: 1.0,
  join: 0.5,
  rule: 0.6,
} as const;

/** Marker radius and interval cap half-length in points. */
export const markerRadius = 2.3;
export const capHalfLength = 1.6;
