/**
 * PNG chunk surgery for figure metadata: the physical pixel density (pHYs),
 * which journals read as the figure's dpi, and plain-text chunks (tEXt).
 * Chunk layout, the pHYs unit (pixels per metre) and the CRC-32 follow the
 * PNG specification (W3C, Portable Network Graphics (PNG) Specification,
 * 2nd edition, 2003, sections 5.3, 11.3.5.3 and annex D). The CRC-32 is
 * `node:zlib`'s `crc32` (Node 20.15 or newer, hence `engines` in
 * package.json): the same reflected polynomial as PNG's annex D.
 */

import { crc32 } from 'node:zlib';

const signature = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];


/** One chunk of a PNG file. */
export interface PngChunk {
  readonly type: string;
  readonly data: Uint8Array;
}

/**
 * Split a PNG file into its chunks, checking the signature and each CRC.
 *
 * @throws Error when the bytes are not a well-formed PNG
 *
 * @example
 * // The smallest PNG: one pixel (IHDR, IDAT, IEND), written as base64.
 * const png = Uint8Array.from(Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==', 'base64'));
 * pngChunks(png).map((chunk) => chunk.type); // ['IHDR', 'IDAT', 'IEND']
 * pngChunks(withPngMetadata(png, 600)).map((chunk) => chunk.type); // ['IHDR', 'pHYs', 'IDAT', 'IEND']
 * pngChunks(png.subarray(1));
 * // throws: not a PNG file (bad signature)
 */
export function pngChunks(png: Uint8Array): PngChunk[] {
  if (png.length < 8 || signature.some((byte, i) => png[i] !== byte)) throw new Error('not a PNG file (bad signature)');
  const view = new DataView(png.buffer, png.byteOffset, png.byteLength);
  const chunks: PngChunk[] = [];
  let offset = 8;
  while (offset < png.length) {
    if (offset + 12 > png.length) throw new Error(`PNG chunk at byte ${offset} is truncated`);
    const length = view.getUint32(offset);
    const typeAndData = png.subarray(offset + 4, offset + 8 + length);
    if (offset + 12 + length > png.length) throw new Error(`PNG chunk at byte ${offset} is truncated`);
    const type = String.fromCharCode(...typeAndData.subarray(0, 4));
    const stored = view.getUint32(offset + 8 + length);
    if (crc32(typeAndData) !== stored) throw new Error(`PNG chunk ${type} at byte ${offset} has a bad CRC`);
    chunks.push({ type, data: typeAndData.subarray(4) });
    offset += 12 + length;
    if (type === 'IEND') break;
  }
  if (chunks[0]?.type !== 'IHDR' || chunks[chunks.length - 1]?.type !== 'IEND') throw new Error('PNG lacks IHDR or IEND');
  return chunks;
}

function encodeChunk(type: string, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(12 + data.length);
  const view = new DataView(out.buffer);
  view.setUint32(0, data.length);
  for (let i = 0; i < 4; i++) out[4 + i] = type.charCodeAt(i);
  out.set(data, 8);
  view.setUint32(8 + data.length, crc32(out.subarray(4, 8 + data.length)));
  return out;
}

/**
 * Pixels per metre for a dpi: round(dpi / 0.0254).
 *
 * @example
 * pixelsPerMetre(600); // 23622 (600 / 0.0254, rounded)
 */
export function pixelsPerMetre(dpi: number): number {
  return Math.round(dpi / 0.0254);
}

/**
 * Rewrite a PNG with a pHYs chunk giving `dpi` on both axes (replacing any
 * pHYs already there) and the given tEXt chunks (Latin-1 keywords and text),
 * placed right after IHDR as the specification requires for pHYs.
 *
 * @param png - a PNG file
 * @param dpi - dots per inch, stored as pixels per metre (unit 1)
 * @param text - keyword → text, e.g. { Software: 'stratotrend' }
 *
 * @example
 * const png = Uint8Array.from(Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==', 'base64'));
 * const tagged = withPngMetadata(png, 600, { Software: 'stratotrend' });
 * pngInfo(tagged).text; // { Software: 'stratotrend' }
 * pngInfo(tagged).dpiX; // 599.9988 (to 1e-9; 23622 pixels per metre × 0.0254)
 */
export function withPngMetadata(png: Uint8Array, dpi: number, text: Readonly<Record<string, string>> = {}): Uint8Array {
  const chunks = pngChunks(png).filter((chunk) => chunk.type !== 'pHYs');
  const density = new Uint8Array(9);
  const view = new DataView(density.buffer);
  view.setUint32(0, pixelsPerMetre(dpi));
  view.setUint32(4, pixelsPerMetre(dpi));
  density[8] = 1;
  const added: Uint8Array[] = [encodeChunk('pHYs', density)];
  for (const [keyword, value] of Object.entries(text)) {
    const latin = (s: string) => Uint8Array.from([...s].map((ch) => (ch.charCodeAt(0) < 256 ? ch.charCodeAt(0) : 0x3f)));
    const body = new Uint8Array(keyword.length + 1 + value.length);
    body.set(latin(keyword.slice(0, 79)), 0);
    body.set(latin(value), keyword.length + 1);
    added.push(encodeChunk('tEXt', body));
  }
  const parts: Uint8Array[] = [Uint8Array.from(signature), encodeChunk('IHDR', chunks[0].data), ...added, ...chunks.slice(1).map((chunk) => encodeChunk(chunk.type, chunk.data))];
  const total = parts.reduce((sum, part) => sum + part.length, 0);
  const out = new Uint8Array(total);
  let offset = 0;
  for (const part of parts) {
    out.set(part, offset);
    offset += part.length;
  }
  return out;
}

/** What a PNG says about itself: pixel size, dpi (null without pHYs in metres) and tEXt chunks. */
export interface PngInfo {
  readonly width: number;
  readonly height: number;
  readonly dpiX: number | null;
  readonly dpiY: number | null;
  readonly text: Readonly<Record<string, string>>;
}

/**
 * Read the pixel size, pHYs density (as dpi) and tEXt chunks of a PNG.
 *
 * @example
 * const png = Uint8Array.from(Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==', 'base64'));
 * pngInfo(png); // { width: 1, height: 1, dpiX: null, dpiY: null, text: {} }
 */
export function pngInfo(png: Uint8Array): PngInfo {
  const chunks = pngChunks(png);
  const header = new DataView(chunks[0].data.buffer, chunks[0].data.byteOffset, chunks[0].data.byteLength);
  let dpiX: number | null = null;
  let dpiY: number | null = null;
  const text: Record<string, string> = {};
  for (const chunk of chunks) {
    if (chunk.type === 'pHYs' && chunk.data.length === 9 && chunk.data[8] === 1) {
      const view = new DataView(chunk.data.buffer, chunk.data.byteOffset, 9);
      dpiX = view.getUint32(0) * 0.0254;
      dpiY = view.getUint32(4) * 0.0254;
    }
    if (chunk.type === 'tEXt') {
      const zero = chunk.data.indexOf(0);
      const decode = (bytes: Uint8Array) => String.fromCharCode(...bytes);
      text[decode(chunk.data.subarray(0, zero))] = decode(chunk.data.subarray(zero + 1));
    }
  }
  return { width: header.getUint32(0), height: header.getUint32(4), dpiX, dpiY, text };
}
