/**
 * The streaming reader (src/data/stream-samples.ts) against the whole-file
 * reader on a large specimen file, and on byte-level edge cases at chunk
 * boundaries. The summaries are also checked against a direct two-pass
 * computation (common practice: mean = sum / n, variance = sum of squared
 * deviations / (n - 1)).
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { decodeText, readTable } from '../../src/data/read-table.js';
import { readSamples } from '../../src/data/samples.js';
import { streamSampleFile } from '../../src/data/stream-samples.js';

/** Deterministic pseudo-random values (a linear congruential generator, Numerical Recipes constants). */
function values(count: number, seed = 12345): number[] {
  let state = seed >>> 0;
  return Array.from({ length: count }, () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return 4 + state / 2 ** 32;
  });
}

describe('streaming reader', () => {
  it('summarises 100,000 specimens exactly like the whole-file reader and a two-pass computation', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-stream-'));
    const path = join(folder, 'specimens.csv');
    const draws = values(100_000);
    const lines = ['section,trait,age,value'];
    const groups = new Map<string, number[]>();
    draws.forEach((value, i) => {
      const section = i % 3 === 0 ? 'Brann Hollow' : 'Quell Reach';
      const age = (10 - (i % 40) * 0.1).toFixed(1);
      const text = value.toFixed(5);
      lines.push(`${section},length,${age},${text}`);
      const key = `${section}|${Number(age)}`;
      const group = groups.get(key);
      if (group) group.push(Number(text));
      else groups.set(key, [Number(text)]);
    });
    writeFileSync(path, lines.join('\n') + '\n');
    const streamed = await streamSampleFile(path, 'specimens.csv', { chunkBytes: 4096 });
    const whole = readSamples(readTable(decodeText(Buffer.from(lines.join('\n') + '\n'), 'specimens.csv'), 'specimens.csv'));
    expect(streamed.samples).toEqual(whole);
    expect(streamed.rows).toBe(100_000);
    expect(streamed.peakResidentBytes).toBeGreaterThan(0);
    for (const record of streamed.samples.records) {
      const group = groups.get(`${record.section}|${record.position}`) as number[];
      const mean = group.reduce((sum, v) => sum + v, 0) / group.length;
      const variance = group.reduce((sum, v) => sum + (v - mean) ** 2, 0) / (group.length - 1);
      expect(record.n).toBe(group.length);
      expect(Math.abs(record.mean - mean)).toBeLessThan(1e-12 * mean);
      expect(Math.abs(record.variance - variance)).toBeLessThan(1e-9 * variance);
    }
  });

  it.each([1, 2, 3, 5, 7])('splits a BOM, multi-byte characters and CRLF across chunks of %i bytes', async (chunkBytes) => {
    const text = '\uFEFFsection;age;value\r\nVallée Noire;2;1,5\r\nVallée Noire;2;1,7\r\nVallée Noire;1;1,9\r\nVallée Noire;1;2,0\r\n';
    const bytes = Buffer.from(text, 'utf8');
    const chunks: Buffer[] = [];
    for (let at = 0; at < bytes.length; at += chunkBytes) chunks.push(bytes.subarray(at, at + chunkBytes));
    const streamed = await streamSampleFile(Readable.from(chunks), 'split.csv', { decimalComma: true });
    expect(streamed.samples).toEqual(readSamples(readTable(decodeText(bytes, 'split.csv'), 'split.csv'), { decimalComma: true }));
    expect(streamed.samples.records.map((record) => record.section)).toEqual(['Vallée Noire', 'Vallée Noire']);
    expect(streamed.samples.records[0].mean).toBeCloseTo(1.6, 12);
  });
});
