import { crc32 as zlibCrc32 } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { crc32, pixelsPerMetre, pngChunks, pngInfo, withPngMetadata } from '../../../src/render/figures/png-metadata.js';
import { decodePng } from './figure-probes.js';

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
  it('CRC-32 matches the published check value and node:zlib', () => {
    // Check value of CRC-32 (ISO-HDLC) over the ASCII digits "123456789" is 0xCBF43926 (CRC catalogue; common practice).
    expect(crc32(new TextEncoder().encode('123456789'))).toBe(0xcbf43926);
    // Every PNG ends with IEND whose CRC is AE 42 60 82 (PNG specification, 2nd edition, 5.6).
    expect(crc32(new TextEncoder().encode('IEND'))).toBe(0xae426082);
    const bytes = new TextEncoder().encode('stratigraphic trajectory figure');
    expect(crc32(bytes)).toBe(zlibCrc32(bytes));
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
