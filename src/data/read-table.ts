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
  readonly rows: readonly TableRow[];
  readonly delimiter: string;
}

/** How to read a table. */
export interface ReadTableOptions {
  /** Field delimiter; detected from the header line when omitted (comma, semicolon or tab). */
  delimiter?: string;
}

/** Longest physical line accepted as a record (characters). */
export const longestLine = 1_000_000;

/**
 * Parse CSV text (UTF-8 BOM, CRLF, quoted fields and trailing blank lines
 * accepted) into a header and rows, each row keeping its line number.
 *
 * @throws InputError for an empty file, a binary file, a ragged row, a line too long.
 * @example
 * readTable('Mean,n\n1.5,3\n', 'a.csv').rows[0]; // { line: 2, cells: ['1.5', '3'] }
 */
export function readTable(text: string, file: string, options: ReadTableOptions = {}): Table {
  if (text.includes('\u0000')) {
    throw new InputError('looks like a binary file (contains NUL bytes), expected comma-separated text', { file });
  }
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '') throw new InputError('the file is empty, expected a header line and data rows', { file });
  let lineStart = 0;
  let lineNumber = 1;
  while (lineStart < body.length) {
    let lineEnd = body.indexOf('\n', lineStart);
    if (lineEnd < 0) lineEnd = body.length;
    if (lineEnd - lineStart > longestLine) {
      throw new InputError(`line is longer than ${longestLine} characters, too long to be a record`, { file, line: lineNumber });
    }
    lineStart = lineEnd + 1;
    lineNumber += 1;
  }
  const delimiter = options.delimiter ?? detectDelimiter(body);
  let records: Array<{ record: string[]; info: { lines: number } }>;
  try {
    records = parse(body, {
      delimiter,
      info: true,
      relax_column_count: true,
      skip_empty_lines: true,
      trim: true,
    }) as unknown as Array<{ record: string[]; info: { lines: number } }>;
  } catch (error) {
    const csvError = error as { message?: string; lines?: number };
    const detail = (csvError.message ?? String(error)).replace(/^Invalid [^:]*: /, '');
    throw new InputError(`cannot be read as delimited text (${detail})`, { file, line: csvError.lines });
  }
  const nonBlank = records.filter((entry) => entry.record.some((cell) => cell !== ''));
  if (nonBlank.length === 0) throw new InputError('the file is empty, expected a header line and data rows', { file });
  const [headerEntry, ...dataEntries] = nonBlank;
  const header = headerEntry.record.map((name) => name.trim().toLowerCase());
  if (dataEntries.length === 0) {
    throw new InputError('has a header but no data rows', { file, line: headerEntry.info.lines });
  }
  const rows = dataEntries.map((entry) => {
    if (entry.record.length !== header.length) {
      throw new InputError(
        `has ${entry.record.length} fields but the header has ${header.length} (ragged row)` +
          (delimiter === ',' && entry.record.length < header.length ? '' : ''),
        { file, line: entry.info.lines },
      );
    }
    return { line: entry.info.lines, cells: entry.record };
  });
  return { file, header, rows, delimiter };
}

/**
 * Pick the delimiter that splits the header line into the most fields among
 * comma, semicolon and tab (common practice for spreadsheet exports).
 */
export function detectDelimiter(text: string): string {
  const firstLine = text.split(/\r?\n/, 1)[0] ?? '';
  const candidates = [',', ';', '\t'];
  let best = ',';
  let bestCount = 0;
  for (const candidate of candidates) {
    const count = firstLine.split(candidate).length - 1;
    if (count > bestCount) {
      best = candidate;
      bestCount = count;
    }
  }
  return best;
}
