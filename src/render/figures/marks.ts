import type { MarkerShape } from './style.js';
import { capHalfLength, fontFamily, ink, lineWidth, markerRadius, typeSize } from './style.js';

/** The 2D drawing context the figures draw on (chart.js hands over the canvas context). */
export type Context = CanvasRenderingContext2D;

/** A CSS font string in points-as-pixels (the figures' drawing unit is the point). */
export function font(size: number, weight: 'normal' | 'bold' = 'normal', style: 'normal' | 'italic' = 'normal'): string {
  return `${style === 'italic' ? 'italic ' : ''}${weight === 'bold' ? 'bold ' : ''}${size}px ${fontFamily}`;
}

/** Trace a marker's outline centred at (x, y) with radius r (shapes of about equal area). */
export function traceMarker(context: Context, shape: MarkerShape, x: number, y: number, r: number): void {
  context.beginPath();
  switch (shape) {
    case 'circle':
      context.arc(x, y, r, 0, 2 * Math.PI);
      break;
    case 'square': {
      const h = r * 0.89;
      context.rect(x - h, y - h, 2 * h, 2 * h);
      break;
    }
    case 'diamond': {
      const h = r * 1.25;
      context.moveTo(x, y - h);
      context.lineTo(x + h, y);
      context.lineTo(x, y + h);
      context.lineTo(x - h, y);
      context.closePath();
      break;
    }
    case 'triangle':
    case 'triangle-down': {
      const s = shape === 'triangle' ? 1 : -1;
      const h = r * 1.35;
      context.moveTo(x, y - s * h);
      context.lineTo(x + h * 0.95, y + s * h * 0.6);
      context.lineTo(x - h * 0.95, y + s * h * 0.6);
      context.closePath();
      break;
    }
    case 'hexagon': {
      const h = r * 1.08;
      for (let k = 0; k < 6; k++) {
        const angle = (Math.PI / 3) * k + Math.PI / 6;
        const px = x + h * Math.cos(angle);
        const py = y + h * Math.sin(angle);
        if (k === 0) context.moveTo(px, py);
        else context.lineTo(px, py);
      }
      context.closePath();
      break;
    }
  }
}

/** Draw a marker: filled in `color` with a thin white halo, or open (white inside, coloured edge). */
export function drawMarker(context: Context, shape: MarkerShape, x: number, y: number, color: string, filled = true, r = markerRadius): void {
  context.save();
  context.setLineDash([]);
  traceMarker(context, shape, x, y, r);
  context.lineWidth = filled ? 0.6 : 0.9;
  context.strokeStyle = filled ? ink.background : color;
  context.fillStyle = filled ? color : ink.background;
  context.fill();
  context.stroke();
  if (filled) {
    // The halo is outside the shape; the fill is redrawn so the edge stays crisp.
    traceMarker(context, shape, x, y, r - 0.3);
    context.fill();
  }
  context.restore();
}

/** Draw an interval from (x1, y1) to (x2, y2) with end caps across it. */
export function drawInterval(context: Context, x1: number, y1: number, x2: number, y2: number, color: string, width = lineWidth.interval): void {
  const length = Math.hypot(x2 - x1, y2 - y1);
  context.save();
  context.setLineDash([]);
  context.strokeStyle = color;
  context.lineWidth = width;
  context.beginPath();
  context.moveTo(x1, y1);
  context.lineTo(x2, y2);
  if (length > 0) {
    const nx = (-(y2 - y1) / length) * capHalfLength;
    const ny = ((x2 - x1) / length) * capHalfLength;
    context.moveTo(x1 - nx, y1 - ny);
    context.lineTo(x1 + nx, y1 + ny);
    context.moveTo(x2 - nx, y2 - ny);
    context.lineTo(x2 + nx, y2 + ny);
  }
  context.stroke();
  context.restore();
}

/** Fill the region between two lines given as point lists (same order), e.g. an envelope. */
export function fillBetween(context: Context, lower: readonly { x: number; y: number }[], upper: readonly { x: number; y: number }[], fill: string, edge?: { color: string; width: number; dash?: readonly number[] }): void {
  if (lower.length < 2) return;
  context.save();
  context.beginPath();
  context.moveTo(lower[0].x, lower[0].y);
  for (const point of lower.slice(1)) context.lineTo(point.x, point.y);
  for (const point of [...upper].reverse()) context.lineTo(point.x, point.y);
  context.closePath();
  context.fillStyle = fill;
  context.fill();
  if (edge) {
    context.strokeStyle = edge.color;
    context.lineWidth = edge.width;
    context.setLineDash([...(edge.dash ?? [])]);
    for (const line of [lower, upper]) {
      context.beginPath();
      context.moveTo(line[0].x, line[0].y);
      for (const point of line.slice(1)) context.lineTo(point.x, point.y);
      context.stroke();
    }
  }
  context.restore();
}

/** What a legend entry shows in its key (any combination). */
export interface LegendKey {
  readonly line?: { readonly color: string; readonly width: number; readonly dash?: readonly number[] };
  readonly band?: { readonly fill: string; readonly edge?: string };
  readonly marker?: { readonly shape: MarkerShape; readonly color: string; readonly filled?: boolean };
  /** An interval through the key, drawn along the horizontal. */
  readonly interval?: { readonly color: string };
}

/** One legend entry. */
export interface LegendEntry {
  readonly key: LegendKey;
  readonly text: string;
}

/** Width of a legend key in points. */
export const legendKeyWidth = 16;
const legendGap = 4;
const legendRowHeight = typeSize.legend * 1.45;

/** Legend entries placed in rows: each row's entries with their x offsets. */
export interface LegendLayout {
  readonly rows: readonly { readonly entries: readonly { readonly entry: LegendEntry; readonly x: number }[] }[];
  readonly height: number;
}

/**
 * Place legend entries left to right, wrapping to a new row when the next
 * entry would pass `width`.
 *
 * @param measure - text width in points for the legend font
 */
export function layoutLegend(entries: readonly LegendEntry[], width: number, measure: (text: string) => number): LegendLayout {
  const rows: { entries: { entry: LegendEntry; x: number }[] }[] = [];
  let current: { entry: LegendEntry; x: number }[] = [];
  let x = 0;
  for (const entry of entries) {
    const entryWidth = legendKeyWidth + legendGap + measure(entry.text);
    if (current.length > 0 && x + entryWidth > width) {
      rows.push({ entries: current });
      current = [];
      x = 0;
    }
    current.push({ entry, x });
    x += entryWidth + 10;
  }
  if (current.length > 0) rows.push({ entries: current });
  return { rows, height: rows.length * legendRowHeight };
}

/** Draw a legend laid out by `layoutLegend` with its top-left corner at (left, top). */
export function drawLegend(context: Context, layout: LegendLayout, left: number, top: number): void {
  context.save();
  context.font = font(typeSize.legend);
  context.textBaseline = 'middle';
  context.textAlign = 'left';
  layout.rows.forEach((row, r) => {
    const y = top + legendRowHeight * (r + 0.5);
    for (const { entry, x } of row.entries) {
      const kx = left + x;
      const { key } = entry;
      if (key.band) {
        context.fillStyle = key.band.fill;
        context.fillRect(kx, y - 3.2, legendKeyWidth, 6.4);
        if (key.band.edge) {
          context.strokeStyle = key.band.edge;
          context.lineWidth = lineWidth.bandEdge;
          context.setLineDash([]);
          context.strokeRect(kx, y - 3.2, legendKeyWidth, 6.4);
        }
      }
      if (key.line) {
        context.strokeStyle = key.line.color;
        context.lineWidth = key.line.width;
        context.setLineDash([...(key.line.dash ?? [])]);
        context.beginPath();
        context.moveTo(kx, y);
        context.lineTo(kx + legendKeyWidth, y);
        context.stroke();
        context.setLineDash([]);
      }
      if (key.interval) drawInterval(context, kx + 2, y, kx + legendKeyWidth - 2, y, key.interval.color);
      if (key.marker) drawMarker(context, key.marker.shape, kx + legendKeyWidth / 2, y, key.marker.color, key.marker.filled ?? true);
      context.fillStyle = ink.text;
      context.fillText(entry.text, kx + legendKeyWidth + legendGap, y);
    }
  });
  context.restore();
}

/** Break text into lines no wider than `width` (at spaces). */
export function wrapText(text: string, width: number, measure: (text: string) => number): string[] {
  const words = text.split(/\s+/).filter((word) => word !== '');
  const lines: string[] = [];
  let line = '';
  for (const word of words) {
    const candidate = line === '' ? word : `${line} ${word}`;
    if (line !== '' && measure(candidate) > width) {
      lines.push(line);
      line = word;
    } else {
      line = candidate;
    }
  }
  if (line !== '') lines.push(line);
  return lines;
}
