import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { drawingProgress, fittingProgress, readingProgress, searchProgress, stageProgress, terminalBar } from '../../src/io/progress.js';

// The one progress helper on cli-progress (issue 22): terminal only, stderr by
// default, never with --quiet. A fake terminal records what would be drawn.
function fakeStream(isTTY: boolean): { stream: NodeJS.WriteStream; text(): string } {
  const chunks: string[] = [];
  const writable = new Writable({
    write(chunk, _encoding, done) {
      chunks.push(String(chunk));
      done();
    },
  });
  Object.assign(writable, { isTTY, columns: 160 });
  return { stream: writable as unknown as NodeJS.WriteStream, text: () => chunks.join('') };
}

describe('progress bars', () => {
  it('draw nothing and cost nothing with --quiet or without a terminal', () => {
    for (const [quiet, isTTY] of [
      [true, true],
      [false, false],
    ] as const) {
      const { stream, text } = fakeStream(isTTY);
      expect(terminalBar('fitting', { quiet, stream })).toBeNull();
      expect(fittingProgress(100, { quiet }, stream)).toBeUndefined();
      expect(searchProgress({ quiet }, stream)).toBeUndefined();
      expect(readingProgress('big.csv', { quiet }, stream)).toBeUndefined();
      expect(drawingProgress(100, { quiet }, stream)).toBeUndefined();
      expect(stageProgress(quiet, stream).progress).toBeUndefined();
      expect(text()).toBe('');
    }
  });

  it('on a terminal: the label, the bar and the count, then the line cleared', () => {
    const { stream, text } = fakeStream(true);
    const bar = terminalBar('fitting lineages', { stream })!;
    bar.update(3, 10);
    expect(text()).toContain('fitting lineages [');
    expect(text()).toContain('3/10');
    const before = text().length;
    bar.stop();
    bar.stop();
    // cli-progress clears the line on stop with clearOnComplete: the escape "erase line" (ESC [ 2 K; ECMA-48, common practice).
    expect(text().slice(before)).toContain('\u001b[2K');
  });

  it('stages: one bar per stage, each label drawn', () => {
    const { stream, text } = fakeStream(true);
    const reporter = stageProgress(false, stream);
    const first = reporter.progress!.stage('null set', 4);
    first(4);
    const second = reporter.progress!.stage('drift grid', 8);
    second(2);
    reporter.stop();
    expect(text()).toContain('null set');
    expect(text()).toContain('4/4');
    expect(text()).toContain('drift grid');
    expect(text()).toContain('2/8');
  });

  it('reading: silent for a small file, bytes and rows for a large one', () => {
    const small = fakeStream(true);
    const quietRead = readingProgress('small.csv', {}, small.stream)!;
    quietRead({ bytes: 1000, totalBytes: 2000, rows: 10, done: false });
    quietRead({ bytes: 2000, totalBytes: 2000, rows: 20, done: true });
    expect(small.text()).toBe('');
    const large = fakeStream(true);
    const read = readingProgress('large.csv', {}, large.stream)!;
    read({ bytes: 5_000_000, totalBytes: 10_000_000, rows: 12_345, done: false });
    expect(large.text()).toContain('reading large.csv');
    expect(large.text()).toContain('12,345 rows');
    read({ bytes: 10_000_000, totalBytes: 10_000_000, rows: 24_690, done: true });
  });
});
