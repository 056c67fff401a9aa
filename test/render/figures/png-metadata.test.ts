import { describe, expect, it } from 'vitest';
import { pixelsPerMetre, pngChunks, pngInfo, withPngMetadata } from '../../../src/render/figures/png-metadata.js';
import { decodePng } from './figure-probes.js';

/**
 * CRC-32 written straight from the sample code of the PNG specification
 * (W3C, PNG 2nd edition, 2003, annex D: table of polynomial 0xEDB88320), the
 * reference the CRCs the code writes (through node:zlib) are checked against.
 */
function annexDCrc32(bytes: Uint8Array): number {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  let c = 0xffffffff;
  for (const byte of bytes) c = table[(c ^ byte) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/** A 2 × 1 RGBA PNG (one red, one blue pixel), encoded by @napi-rs/canvas, independent of the code under test. */
async function tinyPng(): Promise<Uint8Array> {
  const { createCanvas } = await import('canvas');
  const canvas = createCanvas(2, 1);
  const context = canvas.getContext('2d');
  context.fillStyle = '#ff0000';
  context.fillRect(0, 0, 1, 1);
  context.fillStyle = '#0000ff';
  context.fillRect(1, 0, 1, 1);
  return new Uint8Array(canvas.toBuffer('image/png'));
}

describe('PNG metadata', () => {
  it('the CRC-32 reference of this test (PNG annex D) gives the published check values', () => {
    // Check value of CRC-32 (ISO-HDLC) over the ASCII digits "123456789" is 0xCBF43926 (CRC catalogue; common practice).
    expect(annexDCrc32(new TextEncoder().encode('123456789'))).toBe(0xcbf43926);
    // Every PNG ends with IEND whose CRC is AE 42 60 82 (PNG specification, 2nd edition, 5.6).
    expect(annexDCrc32(new TextEncoder().encode('IEND'))).toBe(0xae426082);
  });

  it('every chunk written carries the CRC of PNG annex D over its type and data', async () => {
    const png = withPngMetadata(await tinyPng(), 600, { Software: 'stratotrend', Title: 'trajectory ×' });
    const view = new DataView(png.buffer, png.byteOffset, png.byteLength);
    let offset = 8;
    let checked = 0;
    while (offset < png.length) {
      const length = view.getUint32(offset);
      expect(view.getUint32(offset + 8 + length)).toBe(annexDCrc32(png.subarray(offset + 4, offset + 8 + length)));
      checked++;
      offset += 12 + length;
    }
    expect(checked).toBeGreaterThanOrEqual(5);
  });

  it('pixels per metre for a dpi: round(dpi / 0.0254)', () => {
    // 600 / 0.0254 = 23622.05; 300 / 0.0254 = 11811.02 (closed form).
    expect(pixelsPerMetre(600)).toBe(23622);
    expect(pixelsPerMetre(300)).toBe(11811);
  });

  it('writes one pHYs chunk right after IHDR, keeps the image, and reads back', async () => {
    const original = await tinyPng();
    const stamped = withPngMetadata(original, 600, { Software: 'stratotrend' });
    const chunks = pngChunks(stamped).map((chunk) => chunk.type);
    expect(chunks[0]).toBe('IHDR');
    expect(chunks[1]).toBe('pHYs');
    expect(chunks.filter((type) => type === 'pHYs')).toHaveLength(1);
    const info = pngInfo(stamped);
    expect(info.width).toBe(2);
    expect(info.height).toBe(1);
    expect(info.dpiX).toBeCloseTo(23622 * 0.0254, 9);
    expect(info.text.Software).toBe('stratotrend');
    // Restamping replaces the density instead of adding a second chunk.
    const again = withPngMetadata(stamped, 300);
    expect(pngChunks(again).filter((chunk) => chunk.type === 'pHYs')).toHaveLength(1);
    expect(pngInfo(again).dpiX).toBeCloseTo(11811 * 0.0254, 9);
    // The pixels are untouched: decoded by @napi-rs/canvas's own decoder.
    const pixels = await decodePng(stamped);
    expect(pixels.at(0, 0).slice(0, 3)).toEqual([255, 0, 0]);
    expect(pixels.at(1, 0).slice(0, 3)).toEqual([0, 0, 255]);
  });

  it('rejects a damaged file', async () => {
    const damaged = new Uint8Array(await tinyPng());
    damaged[20] ^= 0xff;
    expect(() => pngChunks(damaged)).toThrow(/CRC/);
    expect(() => pngChunks(new Uint8Array([1, 2, 3]))).toThrow(/signature/);
  });
});
