import type { MarkerShape } from './style.js';
import { capHalfLength, fontFamily, ink, lineWidth, markerRadius, typeSize } from './style.js';

/** The 2D drawing context the figures draw on (chart.js hands over the canvas context). */
export type Context = CanvasRenderingContext2D;

/**
 * A CSS font string in points-as-pixels (the figures' drawing unit is the point).
 *
 * @example
 * font(8); // "8px 'DejaVu Sans', sans-serif"
 * font(9, 'bold', 'italic'); // "italic bold 9px 'DejaVu Sans', sans-serif"
 */
export function font(size: number, weight: 'normal' | 'bold' = 'normal', style: 'normal' | 'italic' = 'normal'): string {
  return `${style === 'italic' ? 'italic ' : ''}${weight === 'bold' ? 'bold ' : ''}${size}px ${fontFamily}`;
}

/**
 * Trace a marker's outline centred at (x, y) with radius r (shapes of about equal area).
 *
 * @example
 * const calls = [];
 * // records the drawing calls
 * const context = new Proxy({}, { get: (_, name) => (...args) => { calls.push(name); }, set: () => true });
 * traceMarker(context, 'circle', 10, 20, 3);
 * calls; // ['beginPath', 'arc']
 */
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

/**
 * Draw a marker: filled in `color` with a thin white halo, or open (white inside, coloured edge).
 *
 * @example
 * const calls = [];
 * // records the drawing calls
 * const context = new Proxy({}, { get: (_, name) => (...args) => { calls.push(name); }, set: () => true });
 * drawMarker(context, 'square', 10, 20, '#000000');
 * calls; // ['save', 'setLineDash', 'beginPath', 'rect', 'fill', 'stroke', 'beginPath', 'rect', 'fill', 'restore']
 */
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

/**
 * Draw an interval from (x1, y1) to (x2, y2) with end caps across it.
 *
 * @example
 * const calls = [];
 * // records the drawing calls
 * const context = new Proxy({}, { get: (_, name) => (...args) => { calls.push(name); }, set: () => true });
 * drawInterval(context, 10, 20, 10, 40, '#000000');
 * calls.filter((name) => name === 'moveTo').length; // 3 (the line and its two caps)
 */
export function drawInterval(context: Context, x1: number, y1: number, x2: number, y2: number, color: string, width: number = lineWidth.interval): void {
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

/**
 * Fill the region between two lines given as point lists (same order), e.g. an envelope.
 *
 * @example
 * const calls = [];
 * // records the drawing calls
 * const context = new Proxy({}, { get: (_, name) => (...args) => { calls.push(name); }, set: () => true });
 * fillBetween(context, [{ x: 0, y: 1 }, { x: 1, y: 1 }], [{ x: 0, y: 2 }, { x: 1, y: 2 }], '#cccccc');
 * calls; // ['save', 'beginPath', 'moveTo', 'lineTo', 'lineTo', 'lineTo', 'closePath', 'fill', 'restore']
 */
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

/**
 * A colour given as #rrggbb at the given opacity, as a CSS rgba() string
 * (for fills that must let what lies under them show through).
 *
 * @param hex - colour as "#rrggbb"
 * @param opacity - 0 (transparent) to 1 (opaque)
 * @throws Error when the colour is not written as #rrggbb
 *
 * @example
 * withOpacity('#1d3f7a', 0.15); // "rgba(29, 63, 122, 0.15)"
 */
export function withOpacity(hex: string, opacity: number): string {
  const match = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!match) throw new Error(`withOpacity needs a colour written as #rrggbb, got "${hex}"`);
  const [red, green, blue] = match.slice(1).map((part) => parseInt(part, 16));
  return `rgba(${red}, ${green}, ${blue}, ${opacity})`;
}

/** What a legend entry shows in its key (any combination). */
export interface LegendKey {
  readonly line?: { readonly color: string; readonly width: number; readonly dash?: readonly number[] };
  readonly band?: { readonly fill: string; readonly edge?: string };
  /** A band split into side-by-side strips, one per fill: one key for bands drawn in several colours. */
  readonly swatches?: readonly string[];
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
/** Space between a legend key and its text, in points. */
export const legendGap = 4;
/** Space between two entries on one legend row, in points. */
const legendEntryGap = 10;
const legendRowHeight = typeSize.legend * 1.45;
/** Distance between the lines of one wrapped legend entry. */
const legendLineHeight = typeSize.legend * 1.2;

/** A legend entry placed on a row: its x offset (points from the legend's left edge) and its text broken into lines. */
export interface PlacedLegendEntry {
  readonly entry: LegendEntry;
  readonly x: number;
  /** The entry's text as drawn, one line after another (one line unless it was wrapped). */
  readonly lines: readonly string[];
}

/** Legend entries placed in rows; a row is as tall as its longest wrapped entry. */
export interface LegendLayout {
  readonly rows: readonly { readonly entries: readonly PlacedLegendEntry[]; readonly lines: number }[];
  readonly height: number;
}

/**
 * Place legend entries left to right, wrapping to a new row when the next
 * entry would pass `width`. An entry whose text is too long for a row of
 * its own is broken into lines under its text column (at spaces, and inside
 * a word only when the word alone is too long), so no text runs past
 * `width`; such an entry has its row to itself.
 *
 * @param width - room for the legend in points
 * @param measure - text width in points for the legend font
 *
 * @example
 * // 5 points a character
 * const measure = (text) => 5 * text.length;
 * const entries = [{ text: 'horizon mean', key: { marker: { shape: 'circle', color: '#000000' } } }, { text: 'model', key: { line: { color: '#000000', width: 1 } } }];
 * layoutLegend(entries, 100, measure).rows.map((row) => row.entries.map((placed) => placed.entry.text)); // [['horizon mean'], ['model']] (16 + 4 + 60 + 10 leaves too little room)
 * layoutLegend(entries, 200, measure).rows.length; // 1
 */
export function layoutLegend(entries: readonly LegendEntry[], width: number, measure: (text: string) => number): LegendLayout {
  const rows: { entries: PlacedLegendEntry[]; lines: number }[] = [];
  let current: PlacedLegendEntry[] = [];
  let x = 0;
  const textRoom = Math.max(1, width - legendKeyWidth - legendGap);
  const closeRow = () => {
    if (current.length > 0) rows.push({ entries: current, lines: Math.max(...current.map((placed) => placed.lines.length)) });
    current = [];
    x = 0;
  };
  for (const entry of entries) {
    const entryWidth = legendKeyWidth + legendGap + measure(entry.text);
    if (current.length > 0 && x + entryWidth > width) closeRow();
    if (entryWidth > width) {
      current.push({ entry, x: 0, lines: wrapText(entry.text, textRoom, measure, { breakWords: true }) });
      closeRow();
      continue;
    }
    current.push({ entry, x, lines: [entry.text] });
    x += entryWidth + legendEntryGap;
  }
  closeRow();
  const height = rows.reduce((sum, row) => sum + legendRowHeight + (row.lines - 1) * legendLineHeight, 0);
  return { rows, height };
}

/**
 * Draw a legend laid out by `layoutLegend` with its top-left corner at (left, top).
 *
 * @example
 * const calls = [];
 * // records the drawing calls
 * const context = new Proxy({}, { get: (_, name) => (...args) => { calls.push(name); }, set: () => true });
 * const layout = layoutLegend([{ text: 'horizon mean', key: { marker: { shape: 'circle', color: '#000000' } } }], 200, (text) => 5 * text.length);
 * drawLegend(context, layout, 0, 0);
 * calls.filter((name) => name === 'fillText').length; // 1
 */
export function drawLegend(context: Context, layout: LegendLayout, left: number, top: number): void {
  context.save();
  context.font = font(typeSize.legend);
  context.textBaseline = 'middle';
  context.textAlign = 'left';
  let rowTop = top;
  for (const row of layout.rows) {
    const y = rowTop + legendRowHeight / 2;
    for (const { entry, x, lines } of row.entries) {
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
      if (key.swatches && key.swatches.length > 0) {
        const strip = legendKeyWidth / key.swatches.length;
        key.swatches.forEach((fill, i) => {
          context.fillStyle = fill;
          context.fillRect(kx + i * strip, y - 3.2, strip, 6.4);
        });
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
      lines.forEach((line, k) => context.fillText(line, kx + legendKeyWidth + legendGap, y + k * legendLineHeight));
    }
    rowTop += legendRowHeight + (row.lines - 1) * legendLineHeight;
  }
  context.restore();
}

/**
 * Break text into lines no wider than `width` (at spaces). A word wider
 * than `width` stays whole on a line of its own, unless `breakWords` is set:
 * then it is cut between characters into pieces that fit (at least one
 * character a piece).
 *
 * @param measure - text width in points for the font the text is drawn in
 *
 * @example
 * // 5 points a character
 * const measure = (text) => 5 * text.length;
 * wrapText('Horizon mean with interval', 60, measure); // ['Horizon mean', 'with', 'interval']
 * wrapText('Horizonmeanwith', 30, measure, { breakWords: true }); // ['Horizo', 'nmeanw', 'ith']
 */
export function wrapText(text: string, width: number, measure: (text: string) => number, options: { readonly breakWords?: boolean } = {}): string[] {
  const words = text.split(/\s+/).filter((word) => word !== '');
  const pieces = options.breakWords ? words.flatMap((word) => (measure(word) > width ? cutWord(word, width, measure) : [word])) : words;
  const lines: string[] = [];
  let line = '';
  for (const word of pieces) {
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

/** Cut one word into the longest leading pieces that fit `width` (whole characters, never an empty piece). */
function cutWord(word: string, width: number, measure: (text: string) => number): string[] {
  const characters = [...word];
  const pieces: string[] = [];
  let piece = '';
  for (const character of characters) {
    if (piece !== '' && measure(piece + character) > width) {
      pieces.push(piece);
      piece = character;
    } else {
      piece += character;
    }
  }
  if (piece !== '') pieces.push(piece);
  return pieces;
}

/** A word of a title with its slant: `*Invented taxon* length` gives "Invented" and "taxon" italic. */
export interface StyledWord {
  readonly text: string;
  readonly italic: boolean;
  /** True when this piece continues the previous word without a space (a word whose slant changes inside it). */
  readonly glued?: boolean;
}

/**
 * True when the text marks a part in italics with asterisks (`*Invented taxon*`).
 *
 * @example
 * hasEmphasis('*Invented taxon* length'); // true
 * hasEmphasis('length'); // false
 */
export function hasEmphasis(text: string): boolean {
  return /\*[^*]+\*/.test(text);
}

/**
 * Split a title into words, each italic when it lies between a pair of
 * asterisks (the markers themselves are dropped; an unpaired one is kept as
 * a character). A word whose slant changes inside it ("*Aus*-like") comes
 * as two pieces, the second `glued`.
 *
 * @example
 * styledWords('*Invented taxon* length').map((w) => `${w.italic ? '/' : ''}${w.text}`); // ["/Invented", "/taxon", "length"]
 */
export function styledWords(text: string): StyledWord[] {
  const words: StyledWord[] = [];
  let inWord = false;
  text.split(/(\*[^*]+\*)/).forEach((part) => {
    const italic = part.length > 2 && part.startsWith('*') && part.endsWith('*');
    const body = italic ? part.slice(1, -1) : part;
    for (const piece of body.split(/(\s+)/)) {
      if (piece === '') continue;
      if (/^\s+$/.test(piece)) {
        inWord = false;
        continue;
      }
      words.push(inWord ? { text: piece, italic, glued: true } : { text: piece, italic });
      inWord = true;
    }
  });
  return words;
}

/**
 * The title without its asterisks.
 *
 * @example
 * plainTitle('*Invented taxon* length'); // 'Invented taxon length'
 */
export function plainTitle(text: string): string {
  return text.replace(/\*([^*]+)\*/g, '$1');
}

function wordFont(size: number, word: StyledWord): string {
  return font(size, 'normal', word.italic ? 'italic' : 'normal');
}

/**
 * Width of a line of styled words in points (a space between words unless glued).
 *
 * @example
 * // 5 points a character in every font
 * const measure = (font, text) => 5 * text.length;
 * styledWidth(styledWords('*Aus* length'), 8)(measure); // 50 (15 + a space of 5 + 30)
 */
export function styledWidth(line: readonly StyledWord[], size: number): (measure: (font: string, text: string) => number) => number {
  return (measure) => line.reduce((sum, word, i) => sum + measure(wordFont(size, word), word.text) + (i > 0 && !word.glued ? measure(font(size), ' ') : 0), 0);
}

/**
 * Break styled words into lines no wider than `width` (a word wider than the line keeps a line of its own).
 *
 * @example
 * // 5 points a character in every font
 * const measure = (font, text) => 5 * text.length;
 * wrapStyled(styledWords('*Aus bus* shell length'), 40, 8, measure).map((line) => line.map((word) => word.text).join(' ')); // ['Aus bus', 'shell', 'length']
 */
export function wrapStyled(words: readonly StyledWord[], width: number, size: number, measure: (font: string, text: string) => number): StyledWord[][] {
  const lines: StyledWord[][] = [];
  let line: StyledWord[] = [];
  for (const word of words) {
    const candidate = [...line, word];
    if (line.length > 0 && !word.glued && styledWidth(candidate, size)(measure) > width) {
      lines.push(line);
      line = [word];
    } else {
      line = candidate;
    }
  }
  if (line.length > 0) lines.push(line);
  return lines;
}

/**
 * Draw one line of styled words centred on x at baseline y, one run of text per change of slant (the space between runs is left as a gap, so no run starts or ends with a space).
 *
 * @example
 * const calls = [];
 * // records the drawing calls
 * const context = new Proxy({}, { get: (_, name) => (...args) => { calls.push(name); }, set: () => true });
 * drawStyledLine(context, styledWords('*Aus* length'), 50, 10, 8, '#000000', (font, text) => 5 * text.length);
 * calls; // ['save', 'fillText', 'fillText', 'restore'] (one run in italics, one upright)
 */
export function drawStyledLine(context: Context, line: readonly StyledWord[], x: number, y: number, size: number, color: string, measure: (font: string, text: string) => number): void {
  const runs: { text: string; italic: boolean; spaced: boolean }[] = [];
  line.forEach((word, i) => {
    const space = i > 0 && !word.glued;
    const last = runs[runs.length - 1];
    if (last && last.italic === word.italic) last.text += (space ? ' ' : '') + word.text;
    else runs.push({ text: word.text, italic: word.italic, spaced: space });
  });
  const runFont = (run: { italic: boolean }) => font(size, 'normal', run.italic ? 'italic' : 'normal');
  const spaceWidth = measure(font(size), ' ');
  const total = runs.reduce((sum, run) => sum + measure(runFont(run), run.text) + (run.spaced ? spaceWidth : 0), 0);
  context.save();
  context.fillStyle = color;
  context.textAlign = 'left';
  context.textBaseline = 'alphabetic';
  let left = x - total / 2;
  for (const run of runs) {
    if (run.spaced) left += spaceWidth;
    context.font = runFont(run);
    context.fillText(run.text, left, y);
    left += measure(runFont(run), run.text);
  }
  context.restore();
}

/**
 * Draw a figure's title lines (bold, in the text ink) and below them its
 * subtitle lines (muted), left-aligned at `left`, the first baseline one
 * title size below `top`, lines 1.3 sizes apart: the heading every figure
 * with a title shares. The context's state is restored afterwards.
 *
 * @example
 * const drawn = [];
 * const canvas = { fillText: (text, x, y) => drawn.push([text, x, y]), save() {}, restore() {} };
 * drawTitleLines(canvas, ['Shell length'], ['2 sections'], 6, 6);
 * drawn[0]; // ['Shell length', 6, 15] (baseline: 6 + title size 9)
 * drawn[1][2]; // 25.2 (to 1e-12; 6 + 1.3 × title size 9 + subtitle size 7.5)
 */
export function drawTitleLines(context: Context, titleLines: readonly string[], subtitleLines: readonly string[], left: number, top: number): void {
  context.save();
  context.textAlign = 'left';
  context.textBaseline = 'alphabetic';
  context.fillStyle = ink.text;
  context.font = font(typeSize.title, 'bold');
  titleLines.forEach((line, k) => context.fillText(line, left, top + typeSize.title * (1.3 * k + 1)));
  const below = top + titleLines.length * typeSize.title * 1.3;
  context.font = font(typeSize.subtitle);
  context.fillStyle = ink.muted;
  subtitleLines.forEach((line, k) => context.fillText(line, left, below + typeSize.subtitle * (1.3 * k + 1)));
  context.restore();
}
