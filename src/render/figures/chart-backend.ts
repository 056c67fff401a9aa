import { createHash } from 'node:crypto';
import { createRequire } from 'node:module';
import type { Chart, ChartConfiguration, Plugin } from 'chart.js';
import { usageError } from '../../data/errors.js';
import type { ResolvedFigureOptions } from './figure-options.js';
import { withPngMetadata } from './png-metadata.js';
import { fontFamily, ink } from './style.js';

/**
 * The drawing edge of the figures: chart.js through chartjs-node-canvas on
 * the prebuilt @napi-rs/canvas (package.json routes `canvas` to it). The
 * chart stack is loaded with `require` on the first figure drawn, never at
 * import, so commands that draw nothing never pay for it.
 *
 * Every figure is laid out in points (1/72 inch): PNG output is drawn at a
 * device pixel ratio of dpi / 72, so type sizes are print sizes at any dpi;
 * SVG and PDF are drawn in points directly.
 */

type ChartClass = typeof Chart;

/** Largest PNG drawn, in pixels (about 400 MB of canvas memory). */
const maximumPixels = 100e6;

interface NodeCanvasRenderer {
  renderToBufferSync(configuration: ChartConfiguration, mime?: string): Buffer;
}

interface ChartStack {
  readonly Chart: ChartClass;
  readonly canvas: typeof import('canvas');
  renderer(width: number, height: number): NodeCanvasRenderer;
}

let stack: ChartStack | null = null;

function loadChartStack(): ChartStack {
  if (stack) return stack;
  const require = createRequire(import.meta.url);
  const { ChartJSNodeCanvas } = require('chartjs-node-canvas') as {
    ChartJSNodeCanvas: new (options: { width: number; height: number; chartCallback?: (chart: ChartClass) => void }) => NodeCanvasRenderer;
  };
  const canvas = require('canvas') as typeof import('canvas');
  let chartClass: ChartClass | null = null;
  const renderers = new Map<string, NodeCanvasRenderer>();
  const configure = (chart: ChartClass) => {
    chart.defaults.font.family = fontFamily;
    chart.defaults.color = ink.text;
    chartClass ??= chart;
  };
  const renderer = (width: number, height: number): NodeCanvasRenderer => {
    const key = `${width}x${height}`;
    let found = renderers.get(key);
    if (!found) {
      found = new ChartJSNodeCanvas({ width, height, chartCallback: configure });
      renderers.set(key, found);
    }
    return found;
  };
  renderer(100, 100);
  if (!chartClass) throw new Error('chartjs-node-canvas did not hand over the chart.js class');
  stack = { Chart: chartClass, canvas, renderer };
  return stack;
}

/** Where the plot area and the axes ended up, in output units (pixels for PNG, points for SVG and PDF). */
export interface FigureFrame {
  readonly plotArea: { readonly left: number; readonly top: number; readonly right: number; readonly bottom: number };
  /** Each scale: its value range and the output coordinate of each end (a value maps linearly in between). */
  readonly scales: Readonly<Record<string, { readonly min: number; readonly max: number; readonly pixelAtMin: number; readonly pixelAtMax: number; readonly axis: 'x' | 'y' }>>;
}

/** A drawn figure. */
export interface RenderedFigure {
  readonly bytes: Uint8Array;
  readonly mime: 'image/png' | 'image/svg+xml' | 'application/pdf';
  /** Width and height: pixels for PNG, points (1/72 inch) for SVG and PDF. */
  readonly width: number;
  readonly height: number;
  /** Physical width in cm. */
  readonly widthCm: number;
  readonly frame: FigureFrame;
}

/** What a figure module hands to the backend: the page size in points and a chart configuration builder. */
export interface FigurePlan {
  readonly widthPoints: number;
  readonly heightPoints: number;
  /** Title for file metadata. */
  readonly title: string;
  /** A fresh chart.js configuration (chart.js mutates what it is given). */
  configuration(): ChartConfiguration;
}

function backgroundPlugin(width: number, height: number): Plugin {
  return {
    id: 'stratotrendBackground',
    beforeDraw(chart) {
      const context = chart.ctx;
      context.save();
      context.setTransform(1, 0, 0, 1, 0, 0);
      context.fillStyle = ink.background;
      context.fillRect(0, 0, width, height);
      context.restore();
    },
  };
}

function frameRecorder(scale: number, store: { frame: FigureFrame | null }): Plugin {
  return {
    id: 'stratotrendFrame',
    afterDraw(chart) {
      const area = chart.chartArea;
      const scales: Record<string, FigureFrame['scales'][string]> = {};
      for (const [id, axisScale] of Object.entries(chart.scales)) {
        if (axisScale.min === undefined || !Number.isFinite(axisScale.min)) continue;
        scales[id] = {
          min: axisScale.min,
          max: axisScale.max,
          pixelAtMin: axisScale.getPixelForValue(axisScale.min) * scale,
          pixelAtMax: axisScale.getPixelForValue(axisScale.max) * scale,
          axis: axisScale.isHorizontal() ? 'x' : 'y',
        };
      }
      store.frame = {
        plotArea: { left: area.left * scale, top: area.top * scale, right: area.right * scale, bottom: area.bottom * scale },
        scales,
      };
    },
  };
}

function prepared(plan: FigurePlan, ratio: number, background: boolean, store: { frame: FigureFrame | null }): ChartConfiguration {
  const configuration = plan.configuration();
  const options = (configuration.options ??= {});
  options.responsive = false;
  options.animation = false;
  options.devicePixelRatio = ratio;
  const width = plan.widthPoints * (background ? ratio : 1);
  const height = plan.heightPoints * (background ? ratio : 1);
  configuration.plugins = [backgroundPlugin(width + 1, height + 1), ...(configuration.plugins ?? []), frameRecorder(background ? ratio : 1, store)];
  return configuration;
}

/**
 * Draw a figure plan in the requested format.
 *
 * PNG: the canvas is `widthPoints` × `heightPoints` CSS units drawn at a
 * device pixel ratio that gives round(width_cm / 2.54 × dpi) pixels across,
 * with a pHYs chunk stating the dpi. SVG: width and height in pt with a
 * viewBox in points, text kept as text. PDF: one page of the figure's size.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const view = figureLineage(lineageDocument(fitLineage(lineage, [strictStasis], { intervals: false })));
 * const options = resolveFigureOptions({ format: 'svg' });
 * const figure = drawFigure(trajectoryPlan([view], options, false), options);
 * figure.mime; // 'image/svg+xml'
 * figure.width; // 255 (9 cm at 72 points an inch: 9 / 2.54 × 72, rounded)
 */
export function drawFigure(plan: FigurePlan, options: ResolvedFigureOptions): RenderedFigure {
  const chartStack = loadChartStack();
  const store: { frame: FigureFrame | null } = { frame: null };
  const widthPoints = Math.round(plan.widthPoints);
  const heightPoints = Math.round(plan.heightPoints);
  const sized: FigurePlan = { ...plan, widthPoints, heightPoints, configuration: plan.configuration };
  const widthCm = options.widthCm;
  if (options.format === 'png') {
    const pixelWidth = Math.round((widthCm / 2.54) * options.dpi);
    // A quarter pixel over, so chart.js's floor(width × ratio) lands on pixelWidth exactly.
    const ratio = (pixelWidth + 0.25) / widthPoints;
    const pixels = pixelWidth * Math.floor(heightPoints * ratio);
    if (pixels > maximumPixels) {
      throw usageError(`a ${options.widthCm} cm figure at ${options.dpi} dpi would have ${Math.round(pixels / 1e6)} million pixels (at most ${maximumPixels / 1e6} million); lower --dpi or --figure-width, or use --figure-format svg or pdf`);
    }
    const configuration = prepared(sized, ratio, true, store);
    const buffer = chartStack.renderer(widthPoints, heightPoints).renderToBufferSync(configuration, 'image/png');
    const bytes = withPngMetadata(new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength), options.dpi, {
      Title: plan.title,
      Software: 'stratotrend',
    });
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    return { bytes, mime: 'image/png', width: view.getUint32(16), height: view.getUint32(20), widthCm, frame: requireFrame(store) };
  }
  if (options.format === 'svg') {
    const { canvas } = chartStack;
    const surface = canvas.createCanvas(widthPoints, heightPoints, canvas.SvgExportFlag.NoPrettyXML) as unknown as import('canvas').SvgCanvas & { style?: object };
    surface.style = {};
    const configuration = prepared(sized, 1, false, store);
    const chart = new chartStack.Chart(surface.getContext('2d') as unknown as CanvasRenderingContext2D, configuration);
    const content = surface.getContent().toString('utf8');
    chart.destroy();
    const resized = content.replace(/<svg([^>]*?)\swidth="[^"]*"\s+height="[^"]*"/, `<svg$1 width="${widthPoints}pt" height="${heightPoints}pt" viewBox="0 0 ${widthPoints} ${heightPoints}"`);
    const svg = stableIds(wholeTextElements(resized));
    return { bytes: new TextEncoder().encode(svg), mime: 'image/svg+xml', width: widthPoints, height: heightPoints, widthCm, frame: requireFrame(store) };
  }
  const { canvas } = chartStack;
  const document = new canvas.PDFDocument({ title: plan.title, creator: 'stratotrend', producer: 'stratotrend' });
  const page = document.beginPage(widthPoints, heightPoints);
  // chart.js needs a context that knows its canvas; a PDF page's context does not, so it is wrapped.
  let target: object = page;
  const surface: Record<string, unknown> = { width: widthPoints, height: heightPoints, style: {} };
  const context = new Proxy(page, {
    get(_page, property) {
      if (property === 'canvas') return surface;
      const value = Reflect.get(target, property, target);
      return typeof value === 'function' ? value.bind(target) : value;
    },
    set(_page, property, value) {
      return Reflect.set(target, property, value, target);
    },
  });
  surface.getContext = () => context;
  const configuration = prepared(sized, 1, false, store);
  const chart = new chartStack.Chart(context as unknown as CanvasRenderingContext2D, configuration);
  document.endPage();
  const bytes = document.close();
  // Destroying the chart clears its canvas; point it at a scratch context so the closed page is left alone.
  target = canvas.createCanvas(1, 1).getContext('2d');
  chart.destroy();
  return { bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), mime: 'application/pdf', width: widthPoints, height: heightPoints, widthCm, frame: requireFrame(store) };
}

/** The Latin ligatures U+FB00–U+FB06 (Unicode Alphabetic Presentation Forms) as letters. */
const ligatures = ['ff', 'fi', 'fl', 'ffi', 'ffl', 'ſt', 'st'];

/**
 * Skia writes each run of a drawn string as its own `<text>` with one x per
 * glyph, and each space between words as an empty `<text x="" y="">`; a
 * vector editor then shows a string as loose words (and one common renderer
 * draws the empty elements broken). This joins the words of one drawn
 * string back into one `<text>` (the runs between which skia put empty
 * elements, with the same attributes and baseline), one space per empty
 * element, and places every `<text>` by its first glyph only (x, y of the
 * first glyph; the font lays out the rest). Skia writes the glyph of a
 * ligature as its presentation form ("ﬁ"); the letters are put back, so the
 * text reads and searches as drawn.
 *
 * @example
 * wholeTextElements('<text fill="#000" x="1, 5, " y="9, ">ab</text><text fill="#000" x="" y=""></text><text fill="#000" x="14, " y="9, ">c</text>'); // '<text fill="#000" x="1" y="9">ab c</text>'
 */
export function wholeTextElements(svg: string): string {
  const element = /<text([^>]*?) x="([^"]*)" y="([^"]*)"([^>]*)>([^<]*)<\/text>/g;
  const first = (list: string) => list.split(',')[0].trim();
  let out = '';
  let last = 0;
  // The string being joined: its opening attributes, position, words, and the spaces owed before the next word.
  let open: { attributes: string; x: string; y: string; text: string; spaces: number } | null = null;
  const close = () => {
    if (open) out += `<text${open.attributes} x="${open.x}" y="${open.y}">${open.text}</text>`;
    open = null;
  };
  for (const match of svg.matchAll(element)) {
    const [whole, before, x, y, after, glyphs] = match;
    const text = glyphs.replace(/[\uFB00-\uFB06]/g, (ligature) => ligatures[ligature.charCodeAt(0) - 0xfb00]);
    const index = match.index ?? 0;
    const adjacent = index === last;
    if (!adjacent) {
      close();
      out += svg.slice(last, index);
    }
    last = index + whole.length;
    const attributes = `${before}${after}`;
    const empty = text === '' && x.trim() === '';
    if (empty) {
      // A space: it belongs to the string being joined (skia writes none at the start of a string).
      if (open && open.attributes === attributes) open.spaces += 1;
      continue;
    }
    if (open && open.attributes === attributes && open.spaces > 0 && first(y) === open.y) {
      open.text += ' '.repeat(open.spaces) + text;
      open.spaces = 0;
      continue;
    }
    close();
    open = { attributes, x: first(x), y: first(y), text, spaces: 0 };
  }
  close();
  return out + svg.slice(last);
}

/**
 * Skia numbers SVG clip paths from a process-wide counter, so the same
 * figure drawn twice would differ. Ids are renamed in order of appearance
 * with a prefix from the figure's own content: the file is deterministic,
 * and several figures embedded in one HTML page never share an id.
 */
function stableIds(svg: string): string {
  const ids: string[] = [];
  for (const match of svg.matchAll(/\sid="([^"]+)"/g)) if (!ids.includes(match[1])) ids.push(match[1]);
  if (ids.length === 0) return svg;
  const escape = (id: string) => id.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const pattern = new RegExp(`(id="|url\\(#|href="#)(${ids.map(escape).join('|')})(?=[")])`, 'g');
  const numbered = (prefix: string) => svg.replace(pattern, (_match, lead: string, id: string) => `${lead}${prefix}-${ids.indexOf(id) + 1}`);
  const prefix = `st${createHash('sha256').update(numbered('id')).digest('hex').slice(0, 8)}`;
  return numbered(prefix);
}

function requireFrame(store: { frame: FigureFrame | null }): FigureFrame {
  if (!store.frame) throw new Error('the chart did not draw (no frame recorded)');
  return store.frame;
}

/**
 * Text width in points for a CSS font string, measured with the same type engine that draws the figures.
 *
 * @example
 * measureText(font(10), 'iiii') < measureText(font(10), 'WWWW'); // true
 * measureText(font(10), ''); // 0
 */
export function measureText(font: string, text: string): number {
  const { canvas } = loadChartStack();
  measuringContext ??= canvas.createCanvas(10, 10).getContext('2d');
  measuringContext.font = font;
  return measuringContext.measureText(text).width;
}

let measuringContext: ReturnType<import('canvas').Canvas['getContext']> | null = null;
