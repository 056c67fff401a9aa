import { parse } from 'csv-parse/sync';
import { InputError } from './errors.js';

/** One data row with the physical line it starts on (1-based, header is line 1). */
export interface TableRow {
  readonly line: number;
  readonly cells: readonly string[];
}

/** A parsed delimited text table: normalised header names and rows. */
export interface Table {
  readonly file: string;
  /** Header names, trimmed and lower-cased. */
  readonly header: readonly string[];
  /** Header names as written (trimmed), for messages. */
  readonly rawHeader?: readonly string[];
  readonly rows: readonly TableRow[];
  readonly delimiter: string;
}

/** How to read a table. */
export interface ReadTableOptions {
  /** Field delimiter; detected from the header line when omitted (comma, semicolon or tab). */
  delimiter?: string;
}

/** Longest physical line accepted as a record (characters); also the longest record. */
export const longestLine = 1_000_000;

/**
 * The csv-parse options every reader of data tables uses (whole-file and streaming alike).
 *
 * @example
 * csvOptions(';').delimiter; // ';'
 */
export function csvOptions(delimiter: string): Record<string, unknown> {
  return {
    delimiter,
    // Mixed line endings (a file edited on two systems) and old CR-only files.
    record_delimiter: ['\r\n', '\n', '\r'],
    info: true,
    relax_column_count: true,
    skip_empty_lines: true,
    trim: true,
    max_record_size: longestLine,
  };
}

/**
 * Name a delimiter in words for messages.
 *
 * @example
 * delimiterName('\t'); // 'tab'
 * delimiterName('|'); // '"|"'
 */
export function delimiterName(delimiter: string): string {
  return delimiter === ',' ? 'comma' : delimiter === ';' ? 'semicolon' : delimiter === '\t' ? 'tab' : `"${delimiter}"`;
}

/**
 * Turn bytes into text, refusing what is not UTF-8 text: UTF-16 (a
 * spreadsheet's "Unicode text" export), a zip container (.xlsx, .ods), NUL
 * bytes (any other binary file) and byte sequences that are not UTF-8,
 * naming the line of the first bad byte.
 *
 * @throws InputError naming the file (and line for bad UTF-8).
 * @example
 * decodeText(Buffer.from('age,n\n'), 'a.csv'); // 'age,n\n'
 */
export function decodeText(bytes: Uint8Array, file: string): string {
  const problem = binaryProblem(bytes);
  if (problem) throw new InputError(problem, { file });
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    const lossy = new TextDecoder('utf-8').decode(bytes);
    const at = lossy.indexOf('\uFFFD');
    throw new InputError(notUtf8Message, { file, line: lineOfOffset(lossy, at) });
  }
}

/** The message for text that is not UTF-8. */
export const notUtf8Message = 'is not UTF-8 text (an invalid byte sequence on this line, e.g. a Latin-1 accented letter); save the file as "CSV UTF-8"';

/**
 * 1-based line number of a character offset in text (CRLF, LF and CR each end a line).
 *
 * @example
 * lineOfOffset('a\r\nb\rc', 5); // 3 (CRLF and a lone CR each end a line)
 */
export function lineOfOffset(text: string, offset: number): number {
  const counter = new LineCounter();
  counter.add(text.slice(0, offset));
  return counter.line;
}

/**
 * Counts physical lines of text fed in pieces (CRLF, LF and a lone CR each
 * end one line, as csv-parse counts them) and notes the first line longer
 * than {@link longestLine}.
 * @example
 * const counter = new LineCounter();
 * counter.add('a\r'); counter.add('\nb\n');
 * counter.line; // 3 (a CRLF split over two pieces ends one line)
 */
export class LineCounter {
  /** The line the next character is on (1-based). */
  line = 1;
  /** First line longer than {@link longestLine}, or null. */
  firstLongLine: number | null = null;
  private length = 0;
  private afterReturn = false;

  add(text: string): void {
    for (let i = 0; i < text.length; i++) {
      const code = text.charCodeAt(i);
      if (code === 10) {
        if (!this.afterReturn) this.line += 1;
        this.afterReturn = false;
        this.length = 0;
      } else if (code === 13) {
        this.line += 1;
        this.afterReturn = true;
        this.length = 0;
      } else {
        this.afterReturn = false;
        if (++this.length > longestLine && this.firstLongLine === null) this.firstLongLine = this.line;
      }
    }
  }
}

/**
 * Why the start of a file shows it is not UTF-8 text, or null. Looks at the
 * first bytes for UTF-16 and zip signatures and at every byte for NUL.
 * @example
 * binaryProblem(new TextEncoder().encode('age,n\n')); // null
 * binaryProblem(Uint8Array.of(0xff, 0xfe, 0x61, 0)); // 'is UTF-16 text (a spreadsheet "Unicode text" export); save it as "CSV UTF-8"'
 */
export function binaryProblem(bytes: Uint8Array, start = true): string | null {
  if (start && bytes.length >= 2 && ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))) {
    return 'is UTF-16 text (a spreadsheet "Unicode text" export); save it as "CSV UTF-8"';
  }
  if (start && bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04) {
    return 'looks like a spreadsheet workbook or zip archive, expected comma-separated text; export the sheet as CSV';
  }
  if (bytes.includes(0)) return binaryMessage;
  return null;
}

/** The message for a file with NUL bytes. */
export const binaryMessage = 'looks like a binary file (contains NUL bytes), expected comma-separated text';

/** The message for an empty file. */
export const emptyMessage = 'the file is empty, expected a header line and data rows';

/** The message for a line longer than {@link longestLine}. */
export const longLineMessage = `line is longer than ${longestLine} characters, too long to be a record`;

/**
 * One user-facing message for a csv-parse error.
 *
 * @param lastGoodLine the last line of the last record read without error.
 * @example
 * parseErrorOf({ code: 'CSV_QUOTE_NOT_CLOSED' }, 'a.csv', 4).line; // 5 (the line after the last good record)
 */
export function parseErrorOf(error: unknown, file: string, lastGoodLine: number): InputError {
  const csvError = error as { code?: string; message?: string; lines?: number };
  const line = csvError.lines;
  switch (csvError.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return new InputError('a quoted field opened on this line is never closed (a " without its closing "); close the quote or remove it', { file, line: lastGoodLine + 1 });
    case 'INVALID_OPENING_QUOTE':
    case 'CSV_INVALID_OPENING_QUOTE':
      return new InputError('has a " inside an unquoted field; quote the whole field and double the inner quote ("")', { file, line });
    case 'CSV_INVALID_CLOSING_QUOTE':
      return new InputError('has text after the closing " of a quoted field; put the whole field inside the quotes', { file, line });
    case 'CSV_MAX_RECORD_SIZE':
      return new InputError(`a record starting after line ${lastGoodLine} is longer than ${longestLine} characters (an unclosed quote?), too long to be a record`, { file, line: lastGoodLine + 1 });
    default: {
      const detail = (csvError.message ?? String(error)).replace(/^Invalid [^:]*: /, '');
      return new InputError(`cannot be read as delimited text (${detail})`, { file, line });
    }
  }
}

/**
 * The message for a data row whose field count differs from the header's,
 * with a hint when the delimiter or a decimal comma is the likely cause.
 * @example
 * raggedRowError(['1', '5', '2', '0', '3'], ['age', 'n', 'mean', 'sd'], 3, 'a.csv', ',', true).message; // 'a.csv line 3: has 5 fields but the header has 4 (ragged row), got "1,5,2,0,3"; if numbers use a decimal comma, the file needs a semicolon or tab delimiter'
 */
export function raggedRowError(fields: readonly string[], header: readonly string[], line: number, file: string, delimiter: string, detected: boolean): InputError {
  const shown = fields.join(delimiter === '\t' ? '\\t' : delimiter);
  const value = shown.length > 60 ? `${shown.slice(0, 57)}...` : shown;
  let hint = '';
  if (delimiter === ',' && fields.length > header.length && fields.some((cell) => /^\d+$/.test(cell))) {
    hint = '; if numbers use a decimal comma, the file needs a semicolon or tab delimiter';
  } else {
    const other = [',', ';', '\t'].find((candidate) => candidate !== delimiter && fields.some((cell) => cell.includes(candidate)));
    if (other) hint = `; this row seems to use a ${delimiterName(other)} delimiter, but the ${detected ? 'header (detected)' : '--delimiter option'} says ${delimiterName(delimiter)}: use one delimiter throughout`;
  }
  return new InputError(`has ${fields.length} field${fields.length === 1 ? '' : 's'} but the header has ${header.length} (ragged row), got "${value}"${hint}`, { file, line });
}

/**
 * Parse CSV text (UTF-8 BOM, CRLF, quoted fields, surrounding spaces and
 * trailing blank lines accepted) into a header and rows, each row keeping its
 * line number.
 *
 * @throws InputError for an empty file, a binary file, a ragged row, a line too long.
 * @example
 * readTable('Mean,n\n1.5,3\n', 'a.csv').rows[0]; // { line: 2, cells: ['1.5', '3'] }
 */
export function readTable(text: string, file: string, options: ReadTableOptions = {}): Table {
  if (text.includes('\u0000')) throw new InputError(binaryMessage, { file });
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '') throw new InputError(emptyMessage, { file });
  const counter = new LineCounter();
  counter.add(body);
  if (counter.firstLongLine !== null) throw new InputError(longLineMessage, { file, line: counter.firstLongLine });
  const detected = options.delimiter === undefined;
  const delimiter = options.delimiter ?? detectDelimiter(body, file);
  let lastGoodLine = 0;
  let records: Array<{ record: string[]; info: { lines: number } }>;
  try {
    const parseOptions = {
      ...csvOptions(delimiter),
      on_record: (record: unknown, context: { lines: number }) => {
        lastGoodLine = context.lines;
        return record;
      },
    };
    records = parse(body, parseOptions as unknown as import('csv-parse/sync').Options<string[], string[]>) as unknown as Array<{ record: string[]; info: { lines: number } }>;
  } catch (error) {
    throw parseErrorOf(error, file, lastGoodLine);
  }
  const nonBlank = records.filter((entry) => entry.record.some((cell) => cell !== ''));
  if (nonBlank.length === 0) throw new InputError(emptyMessage, { file });
  const [headerEntry, ...dataEntries] = nonBlank;
  const rawHeader = headerEntry.record.map((name) => name.trim());
  const header = rawHeader.map((name) => name.toLowerCase());
  if (dataEntries.length === 0) {
    throw new InputError(headerOnlyMessage, { file, line: headerEntry.info.lines });
  }
  const rows = dataEntries.map((entry) => {
    if (entry.record.length !== header.length) throw raggedRowError(entry.record, header, entry.info.lines, file, delimiter, detected);
    return { line: entry.info.lines, cells: entry.record };
  });
  return { file, header, rawHeader, rows, delimiter };
}

/** The message for a file with a header and no data rows. */
export const headerOnlyMessage = 'has a header but no data rows';

/**
 * Pick the delimiter that splits the header line into the most fields among
 * comma, semicolon and tab (common practice for spreadsheet exports); quoted
 * parts of the header are not counted. Two candidates splitting it equally
 * often is refused with a message suggesting `--delimiter`.
 *
 * @throws InputError when the header is ambiguous.
 * @example
 * detectDelimiter('age;n;mean;sd\n1;5;2,5;0,3\n'); // ';'
 * detectDelimiter('a,b;c\n');
 * // throws: cannot tell the delimiter from the header
 */
export function detectDelimiter(text: string, file?: string): string {
  const firstLine = (text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/).find((line) => line.trim() !== '') ?? '').replace(/"[^"]*"/g, '');
  const candidates = [',', ';', '\t'];
  let best = ',';
  let bestCount = 0;
  let tied: string | null = null;
  for (const candidate of candidates) {
    const count = firstLine.split(candidate).length - 1;
    if (count > bestCount) {
      best = candidate;
      bestCount = count;
      tied = null;
    } else if (count === bestCount && count > 0) {
      tied = candidate;
    }
  }
  if (tied !== null) {
    throw new InputError(
      `cannot tell the delimiter from the header: it has as many ${delimiterName(best)}s as ${delimiterName(tied)}s; give --delimiter "${best === '\t' ? 'tab' : best}" or --delimiter "${tied === '\t' ? 'tab' : tied}"`,
      { file, line: 1, kind: 'usage' },
    );
  }
  return best;
}
