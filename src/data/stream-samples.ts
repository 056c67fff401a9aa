import { createHash } from 'node:crypto';
import { createReadStream, statSync } from 'node:fs';
import { parse, type Parser } from 'csv-parse';
import { InputError } from './errors.js';
import {
  binaryMessage,
  binaryProblem,
  csvOptions,
  detectDelimiter,
  emptyMessage,
  headerOnlyMessage,
  LineCounter,
  longLineMessage,
  notUtf8Message,
  parseErrorOf,
  raggedRowError,
} from './read-table.js';
import { HorizonCollector, planColumns, type SampleOptions, type SampleSet } from './samples.js';

/** How far a stream has got, for a progress bar. */
export interface StreamProgress {
  /** Bytes read so far. */
  readonly bytes: number;
  /** Size of the file in bytes, or null when unknown (stdin). */
  readonly totalBytes: number | null;
  /** Data rows read so far. */
  readonly rows: number;
  /** True on the last call, when reading has ended. */
  readonly done: boolean;
}

/** Options of {@link streamSampleFile}. */
export interface StreamSampleOptions extends SampleOptions {
  /** Field delimiter; detected from the header line when omitted. */
  delimiter?: string;
  /** Called every few hundred kilobytes and once at the end. */
  onProgress?: (progress: StreamProgress) => void;
  /** Bytes read per chunk (default 64 KiB). */
  chunkBytes?: number;
}

/** What {@link streamSampleFile} read: the horizons and facts about the file. */
export interface StreamedSamples {
  readonly samples: SampleSet;
  /** SHA-256 of the bytes read, hex. */
  readonly sha256: string;
  readonly bytes: number;
  /** Data rows (specimens in specimen form). */
  readonly rows: number;
  /** Largest resident set size seen while reading (bytes), from process.memoryUsage(). */
  readonly peakResidentBytes: number;
  /** Largest V8 heap in use seen while reading (bytes). */
  readonly peakHeapBytes: number;
}

/**
 * Read a samples file as a stream, in memory bounded by the number of
 * horizons rather than rows: bytes are hashed, checked (binary, UTF-8, line
 * length) and parsed with the csv-parse stream API record by record, and
 * each row goes straight into a {@link HorizonCollector}, which keeps running
 * moments per horizon (specimen form) or one record per row (summary form).
 *
 * Gives exactly the messages and line numbers of the whole-file path
 * (`decodeText` → `readTable` → `readSamples`): when a file has several
 * problems the same one is reported, because problems are ranked in the
 * order the whole-file path checks them (binary → UTF-8 → empty → long line →
 * delimiter → parse → header only → ragged row → column and cell errors).
 *
 * @param source a path, or a readable stream (e.g. stdin) with its name.
 * @throws InputError for every problem the whole-file readers refuse.
 *
 * @example
 * const streamed = await streamSampleFile('sample-data/shell-length-specimens.csv', 'shell-length-specimens.csv');
 * const whole = readSamples(readTable(readInput('sample-data/shell-length-specimens.csv').text, 'shell-length-specimens.csv'));
 * streamed.samples.records.length; // 40 (one per horizon and lineage)
 * JSON.stringify(streamed.samples.records) === JSON.stringify(whole.records); // true (the whole-file path's horizons)
 */
export async function streamSampleFile(
  source: string | NodeJS.ReadableStream,
  file: string,
  options: StreamSampleOptions = {},
): Promise<StreamedSamples> {
  const totalBytes = typeof source === 'string' ? safeSize(source) : null;
  const input = typeof source === 'string' ? createReadStream(source, { highWaterMark: options.chunkBytes ?? 65536 }) : source;
  const hash = createHash('sha256');
  const strict = new TextDecoder('utf-8', { fatal: true });
  const lossy = new TextDecoder('utf-8');
  const problems: { utf8?: InputError; long?: InputError; delimiter?: InputError; parse?: InputError; ragged?: InputError; samples?: InputError } = {};

  let bytes = 0;
  let first = true;
  let utf8Valid = true;
  const lines = new LineCounter();
  let sawText = false;
  let lastProgress = 0;
  let peakResident = 0;
  let peakHeap = 0;
  const sampleMemory = (): void => {
    const usage = process.memoryUsage();
    if (usage.rss > peakResident) peakResident = usage.rss;
    if (usage.heapUsed > peakHeap) peakHeap = usage.heapUsed;
  };

  // Parsing state.
  let pending = '';
  let parser: Parser | null = null;
  let parsing = true;
  let lastGoodLine = 0;
  let header: string[] | null = null;
  let headerLine = 0;
  let collector: HorizonCollector | null = null;
  let rows = 0;
  const detected = options.delimiter === undefined;
  let delimiter = options.delimiter ?? ',';
  let parserDone: Promise<void> = Promise.resolve();

  const onRecord = (entry: { record: string[]; info: { lines: number } }): void => {
    lastGoodLine = entry.info.lines;
    const { record, info } = entry;
    if (!record.some((cell) => cell !== '')) return;
    if (header === null) {
      const rawHeader = record.map((name) => name.trim());
      header = rawHeader.map((name) => name.toLowerCase());
      headerLine = info.lines;
      try {
        collector = new HorizonCollector(planColumns(header, file, rawHeader), options, rawHeader);
      } catch (error) {
        problems.samples ??= asInputError(error);
      }
      return;
    }
    rows += 1;
    if (record.length !== header.length) {
      problems.ragged ??= raggedRowError(record, header, info.lines, file, delimiter, detected);
      return;
    }
    if (problems.ragged || problems.samples || !collector) return;
    try {
      (collector as HorizonCollector).add(info.lines, record);
    } catch (error) {
      problems.samples = asInputError(error);
    }
  };

  let finishParser: () => void = () => undefined;
  const startParser = (): void => {
    const active = parse(csvOptions(delimiter));
    parser = active;
    parserDone = new Promise<void>((resolveDone) => {
      finishParser = resolveDone;
      active.on('data', onRecord);
      active.on('error', (error) => {
        problems.parse ??= parseErrorOf(error, file, lastGoodLine);
        parsing = false;
        resolveDone();
      });
      active.on('end', () => resolveDone());
    });
  };
  /** Stop parsing after a problem that outranks anything the parser could still find. */
  const stopParsing = (): void => {
    parsing = false;
    if (parser !== null) {
      const active = parser as Parser;
      active.removeAllListeners('data');
      active.on('error', () => undefined);
      active.destroy();
      finishParser();
    }
  };

  /** The delimiter from the header when none was given; false (parsing stopped, the problem kept) when it cannot be told. */
  const settleDelimiter = (): boolean => {
    if (options.delimiter !== undefined) return true;
    try {
      delimiter = detectDelimiter(pending, file);
      return true;
    } catch (error) {
      problems.delimiter = asInputError(error);
      parsing = false;
      return false;
    }
  };

  const feed = async (text: string): Promise<void> => {
    if (!parsing) return;
    if (parser === null) {
      pending += text;
      const firstLine = firstCompleteLine(pending);
      if (firstLine === null) return;
      if (!settleDelimiter()) return;
      startParser();
      text = pending;
      pending = '';
    }
    const active = parser as unknown as Parser;
    if (!active.write(text)) {
      await new Promise<void>((resolveDrain) => {
        const done = (): void => {
          active.off('drain', done);
          active.off('error', done);
          active.off('close', done);
          resolveDrain();
        };
        active.on('drain', done);
        active.on('error', done);
        active.on('close', done);
      });
    }
  };

  for await (const chunk of input as AsyncIterable<Buffer | string>) {
    const buffer = typeof chunk === 'string' ? Buffer.from(chunk) : chunk;
    hash.update(buffer);
    bytes += buffer.length;
    const problem = binaryProblem(buffer, first);
    if (problem) {
      if (typeof source === 'string') (input as ReturnType<typeof createReadStream>).destroy();
      throw new InputError(problem, { file });
    }
    let text: string;
    if (utf8Valid) {
      try {
        text = strict.decode(buffer, { stream: true });
        lossy.decode(buffer, { stream: true });
      } catch {
        utf8Valid = false;
        text = lossy.decode(buffer, { stream: true });
        const at = text.indexOf('\uFFFD');
        const before = new LineCounter();
        before.line = lines.line;
        before.add(text.slice(0, at < 0 ? text.length : at));
        problems.utf8 = new InputError(notUtf8Message, { file, line: before.line });
        stopParsing();
      }
    } else {
      text = lossy.decode(buffer, { stream: true });
    }
    if (first) {
      text = text.replace(/^\uFEFF/, '');
      first = false;
    }
    if (!sawText && /\S/.test(text)) sawText = true;
    lines.add(text);
    if (lines.firstLongLine !== null && !problems.long) {
      problems.long = new InputError(longLineMessage, { file, line: lines.firstLongLine });
      stopParsing();
    }
    await feed(text);
    if (bytes - lastProgress >= 262144) {
      lastProgress = bytes;
      sampleMemory();
      options.onProgress?.({ bytes, totalBytes, rows, done: false });
    }
  }
  const tail = utf8Valid ? strict.decode() : lossy.decode();
  if (tail !== '') await feed(tail);
  if (parsing && parser === null && pending !== '') {
    // The whole file is one line without a line break.
    if (settleDelimiter()) {
      startParser();
      (parser as unknown as Parser).write(pending);
    }
  }
  if (parser !== null) {
    const active = parser as Parser;
    if (parsing) active.end();
    else stopParsing();
    await parserDone;
  }
  sampleMemory();
  options.onProgress?.({ bytes, totalBytes, rows, done: true });

  if (problems.utf8) throw problems.utf8;
  if (!sawText) throw new InputError(emptyMessage, { file });
  if (problems.long) throw problems.long;
  if (problems.delimiter) throw problems.delimiter;
  if (problems.parse) throw problems.parse;
  if (header === null) throw new InputError(emptyMessage, { file });
  if (rows === 0) throw new InputError(headerOnlyMessage, { file, line: headerLine });
  if (problems.ragged) throw problems.ragged;
  if (problems.samples) throw problems.samples;
  const samples = (collector as unknown as HorizonCollector).finish();
  return { samples, sha256: hash.digest('hex'), bytes, rows, peakResidentBytes: peakResident, peakHeapBytes: peakHeap };
}

function asInputError(error: unknown): InputError {
  if (error instanceof InputError) return error;
  throw error;
}

function safeSize(path: string): number | null {
  try {
    return statSync(path).size;
  } catch {
    return null;
  }
}


/** The first non-blank line of text when it is complete (followed by a line break other than a final lone CR), else null. */
function firstCompleteLine(text: string): string | null {
  const pieces = text.split(/\r\n|\n|\r(?!$)/);
  for (let i = 0; i < pieces.length - 1; i++) if (pieces[i].trim() !== '') return pieces[i];
  return null;
}


