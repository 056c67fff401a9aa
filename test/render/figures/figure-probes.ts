/**
 * Helpers for the figure tests: decode a PNG into pixels, map data values to
 * pixels with the scales the chart reported, and read the text of SVG and
 * PDF output. Nothing here draws figures.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { inflateSync } from 'node:zlib';
import { createCanvas, loadImage } from 'canvas';
import type { FigureFrame } from '../../../src/render/figures/index.js';

/** Decoded RGBA pixels of a PNG. */
export interface Pixels {
  readonly width: number;
  readonly height: number;
  at(x: number, y: number): [number, number, number, number];
}

/** Decode a PNG with @napi-rs/canvas (its own decoder, independent of how the file was written). */
export async function decodePng(bytes: Uint8Array): Promise<Pixels> {
  const image = await loadImage(Buffer.from(bytes));
  const canvas = createCanvas(image.width, image.height);
  const context = canvas.getContext('2d');
  context.drawImage(image, 0, 0);
  const data = context.getImageData(0, 0, image.width, image.height).data;
  return {
    width: image.width,
    height: image.height,
    at(x, y) {
      const i = (Math.round(y) * image.width + Math.round(x)) * 4;
      return [data[i], data[i + 1], data[i + 2], data[i + 3]];
    },
  };
}

/** Output coordinate of a data value on one of the chart's scales (linear between the recorded ends). */
export function scalePixel(frame: FigureFrame, scale: 'x' | 'y', value: number): number {
  const s = frame.scales[scale];
  return s.pixelAtMin + ((value - s.min) / (s.max - s.min)) * (s.pixelAtMax - s.pixelAtMin);
}

/** Rec. 709 luma of a pixel (0 black – 255 white). */
export function luma([r, g, b]: readonly number[]): number {
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** Darkest luma in a (2k+1)² neighbourhood, so a probe tolerates sub-pixel rounding of line positions. */
export function darkestNear(pixels: Pixels, x: number, y: number, k = 2): number {
  let darkest = 255;
  for (let dy = -k; dy <= k; dy++) for (let dx = -k; dx <= k; dx++) darkest = Math.min(darkest, luma(pixels.at(x + dx, y + dy)));
  return darkest;
}

/** Blank: white paper or the very light grid (every channel at least 224). */
export function isBlank(pixel: readonly number[]): boolean {
  return pixel[0] >= 224 && pixel[1] >= 224 && pixel[2] >= 224;
}

/** Distance from point p to segment ab. */
export function segmentDistance(p: { x: number; y: number }, a: { x: number; y: number }, b: { x: number; y: number }): number {
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  const length2 = dx * dx + dy * dy;
  const t = length2 === 0 ? 0 : Math.max(0, Math.min(1, ((p.x - a.x) * dx + (p.y - a.y) * dy) / length2));
  return Math.hypot(p.x - (a.x + t * dx), p.y - (a.y + t * dy));
}

/** Whether point p is inside a polygon (even–odd rule). */
export function insidePolygon(p: { x: number; y: number }, polygon: readonly { x: number; y: number }[]): boolean {
  let inside = false;
  for (let i = 0, j = polygon.length - 1; i < polygon.length; j = i++) {
    const a = polygon[i];
    const b = polygon[j];
    if (a.y > p.y !== b.y > p.y && p.x < ((b.x - a.x) * (p.y - a.y)) / (b.y - a.y) + a.x) inside = !inside;
  }
  return inside;
}

/** Keep a failing figure for inspection: writes NAME-changed.png in a temporary folder and returns its path. */
export function keepChanged(name: string, bytes: Uint8Array): string {
  const folder = join(tmpdir(), 'stratotrend-figure-tests');
  mkdirSync(folder, { recursive: true });
  const path = join(folder, `${name}-changed.png`);
  writeFileSync(path, bytes);
  return path;
}

/**
 * Check that an SVG document is well formed enough to parse: one root
 * <svg>, every element closed in order, and return its text content (the
 * words of each <text> element, in document order, joined by spaces).
 *
 * @throws Error naming the first unbalanced tag
 */
export function svgText(svg: string): { root: Record<string, string>; text: string } {
  const body = svg.replace(/^<\?xml[^>]*\?>/, '').replace(/<!--[\s\S]*?-->/g, '');
  const stack: string[] = [];
  const words: string[] = [];
  let root: Record<string, string> | null = null;
  const tag = /<(\/?)([A-Za-z][\w:-]*)((?:\s+[\w:-]+\s*=\s*"[^"]*")*)\s*(\/?)>|([^<]+)/g;
  let match: RegExpExecArray | null;
  let consumed = 0;
  while ((match = tag.exec(body)) !== null) {
    if (match.index !== consumed) throw new Error(`unparsable SVG near byte ${consumed}: ${body.slice(consumed, consumed + 40)}`);
    consumed = tag.lastIndex;
    const [, closing, name, attributes, selfClosing, textNode] = match;
    if (textNode !== undefined) {
      if (stack[stack.length - 1] === 'text' || stack[stack.length - 1] === 'tspan') {
        const decoded = textNode.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&apos;/g, "'").replace(/&#(\d+);/g, (_m, code) => String.fromCodePoint(Number(code))).replace(/&#x([0-9a-f]+);/gi, (_m, code) => String.fromCodePoint(parseInt(code, 16))).replace(/&amp;/g, '&');
        if (decoded.trim() !== '') words.push(decoded.trim());
      } else if (textNode.trim() !== '') {
        throw new Error(`stray text outside elements: ${textNode.slice(0, 40)}`);
      }
      continue;
    }
    if (closing) {
      const open = stack.pop();
      if (open !== name) throw new Error(`</${name}> closes <${open}>`);
      continue;
    }
    if (!root) {
      if (name !== 'svg') throw new Error(`root element is <${name}>, not <svg>`);
      root = Object.fromEntries([...attributes.matchAll(/([\w:-]+)\s*=\s*"([^"]*)"/g)].map((m) => [m[1], m[2]]));
    } else if (stack.length === 0) {
      throw new Error(`second root element <${name}>`);
    }
    if (!selfClosing) stack.push(name);
  }
  if (consumed !== body.length) throw new Error('SVG ends mid-tag');
  if (stack.length > 0) throw new Error(`unclosed <${stack.join('>, <')}>`);
  if (!root) throw new Error('no <svg> element');
  return { root, text: words.join(' ') };
}

/** What a PDF file says: page size, and the text shown on its pages. */
export interface PdfContent {
  readonly version: string;
  readonly mediaBox: number[];
  readonly text: string;
}

/**
 * Read a single-page PDF as written by Skia: check the header, the trailer
 * and the cross-reference offset, inflate the page's content stream, and
 * turn its Tj/TJ glyph strings back into text through each font's
 * ToUnicode CMap (PDF 1.7, ISO 32000-1:2008, sections 7.5, 9.10.3).
 */
export function readPdf(bytes: Uint8Array): PdfContent {
  const buffer = Buffer.from(bytes);
  const latin = buffer.toString('latin1');
  const version = /^%PDF-(\d\.\d)/.exec(latin);
  if (!version) throw new Error('no %PDF header');
  if (!/%%EOF\s*$/.test(latin)) throw new Error('no %%EOF trailer');
  const startxref = /startxref\s+(\d+)\s+%%EOF\s*$/.exec(latin);
  if (!startxref) throw new Error('no startxref');
  const xrefAt = Number(startxref[1]);
  if (!latin.startsWith('xref', xrefAt) && !/^\d+ 0 obj/.test(latin.slice(xrefAt))) throw new Error(`startxref ${xrefAt} does not point at a cross-reference section`);
  const objects = new Map<number, { dictionary: string; stream: Buffer | null }>();
  // Objects are found by their headers; a stream is skipped by its /Length, so binary font data is never scanned as text.
  const header = /(\d+) 0 obj\b/g;
  let match: RegExpExecArray | null;
  while ((match = header.exec(latin)) !== null) {
    const from = header.lastIndex;
    const streamAt = latin.indexOf('stream', from);
    const endAt = latin.indexOf('endobj', from);
    if (endAt < 0) throw new Error(`object ${match[1]} has no endobj`);
    if (streamAt < 0 || endAt < streamAt) {
      objects.set(Number(match[1]), { dictionary: latin.slice(from, endAt), stream: null });
      header.lastIndex = endAt;
      continue;
    }
    const dictionary = latin.slice(from, streamAt);
    let start = streamAt + 'stream'.length;
    if (latin[start] === '\r') start++;
    if (latin[start] === '\n') start++;
    const length = Number(/\/Length (\d+)/.exec(dictionary)?.[1]);
    if (!Number.isFinite(length)) throw new Error(`stream of object ${match[1]} has no /Length`);
    if (!latin.slice(start + length, start + length + 20).includes('endstream')) throw new Error(`stream of object ${match[1]} does not end at its /Length`);
    let raw = buffer.subarray(start, start + length);
    if (/\/FlateDecode/.test(dictionary)) raw = inflateSync(raw);
    objects.set(Number(match[1]), { dictionary, stream: raw });
    header.lastIndex = start + length;
  }
  const page = [...objects.values()].find((object) => /\/Type \/Page\b/.test(object.dictionary));
  if (!page) throw new Error('no page object');
  const mediaBox = /\/MediaBox \[([^\]]+)\]/.exec(page.dictionary)?.[1].trim().split(/\s+/).map(Number) ?? [];
  const fonts = new Map<string, Map<number, string>>();
  for (const [, name, reference] of (/\/Font <<([^>]*)>>/.exec(page.dictionary)?.[1] ?? '').matchAll(/\/(\w+) (\d+) 0 R/g)) {
    const font = objects.get(Number(reference));
    const cmapReference = /\/ToUnicode (\d+) 0 R/.exec(font?.dictionary ?? '')?.[1];
    const cmap = cmapReference ? objects.get(Number(cmapReference))?.stream?.toString('latin1') ?? '' : '';
    fonts.set(name, parseToUnicode(cmap));
  }
  const contentReference = /\/Contents (\d+) 0 R/.exec(page.dictionary)?.[1];
  const content = objects.get(Number(contentReference))?.stream?.toString('latin1') ?? '';
  let font = new Map<number, string>();
  let text = '';
  let match2: RegExpExecArray | null;
  const operators = /\/(\w+)\s+[\d.]+\s+Tf|<([0-9A-Fa-f]*)>\s*Tj|\[((?:\s*(?:<[0-9A-Fa-f]*>|-?[\d.]+))*)\s*\]\s*TJ|\bET\b/g;
  while ((match2 = operators.exec(content)) !== null) {
    if (match2[1]) font = fonts.get(match2[1]) ?? new Map();
    const strings = match2[2] !== undefined ? [match2[2]] : match2[3] !== undefined ? [...match2[3].matchAll(/<([0-9A-Fa-f]*)>/g)].map((m) => m[1]) : [];
    for (const hex of strings) {
      for (let i = 0; i + 4 <= hex.length; i += 4) text += font.get(parseInt(hex.slice(i, i + 4), 16)) ?? '\uFFFD';
    }
  }
  return { version: version[1], mediaBox, text };
}

function parseToUnicode(cmap: string): Map<number, string> {
  const map = new Map<number, string>();
  const utf16 = (hex: string) => String.fromCharCode(...(hex.match(/.{4}/g) ?? []).map((unit) => parseInt(unit, 16)));
  for (const block of cmap.matchAll(/beginbfchar([\s\S]*?)endbfchar/g)) {
    for (const [, code, unicode] of block[1].matchAll(/<([0-9A-Fa-f]+)>\s*<([0-9A-Fa-f]+)>/g)) map.set(parseInt(code, 16), utf16(unicode));
  }
  for (const block of cmap.matchAll(/beginbfrange([\s\S]*?)endbfrange/g)) {
    for (const [, low, high, target] of block[1].matchAll(/<([0-9A-Fa-f]+)>\s*<([0-9A-Fa-f]+)>\s*(<[0-9A-Fa-f]+>|\[[^\]]*\])/g)) {
      const from = parseInt(low, 16);
      const to = parseInt(high, 16);
      if (target.startsWith('[')) {
        [...target.matchAll(/<([0-9A-Fa-f]+)>/g)].forEach((m, k) => map.set(from + k, utf16(m[1])));
      } else {
        const base = parseInt(target.slice(1, -1), 16);
        for (let code = from; code <= to; code++) map.set(code, String.fromCharCode(base + code - from));
      }
    }
  }
  return map;
}
