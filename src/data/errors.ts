/**
 * The one error type for user mistakes (bad data or bad usage). The CLI turns
 * it into a one-line message and an exit code; everything else is a bug and
 * gets a stack trace with `--debug`.
 */
export type InputErrorKind = 'data' | 'usage';

/**
 * A mistake in the user's input: a file, line, column and value when known.
 *
 * @example
 * throw new InputError('must be a positive number, got "-0.2"', { file: 'samples.csv', line: 12, column: 'sd' });
 * // message: samples.csv line 12, column "sd": must be a positive number, got "-0.2"
 */
export class InputError extends Error {
  readonly kind: InputErrorKind;
  readonly file?: string;
  readonly line?: number;
  readonly column?: string;

  constructor(
    detail: string,
    where: { file?: string; line?: number; column?: string; kind?: InputErrorKind } = {},
  ) {
    super(oneLine(formatLocation(where) + detail));
    this.name = 'InputError';
    this.kind = where.kind ?? 'data';
    this.file = where.file;
    this.line = where.line;
    this.column = where.column;
  }
}

/**
 * Make a message one line whatever the offending value holds: line breaks,
 * tabs and other control characters (C0, DEL and C1, and the Unicode line and
 * paragraph separators) are written as escapes (\n, \t, \u001b, \u009b), so
 * nothing a file holds reaches the terminal as a control character; so are
 * the bidirectional embedding, override and isolate controls (U+202A–U+202E,
 * U+2066–U+2069), which would reorder the rest of the message as displayed,
 * and the invisible U+200B, U+2060 and U+FEFF.
 *
 * @example
 * oneLine('got "a\nb"'); // 'got "a\\nb"'
 * oneLine('got "a\u202eb"'); // 'got "a\\u202eb"'
 */
export function oneLine(text: string): string {
  return text.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029\u202a-\u202e\u2066-\u2069\u200b\u2060\ufeff]/g, (character) => {
    if (character === '\n') return '\\n';
    if (character === '\r') return '\\r';
    if (character === '\t') return '\\t';
    return `\\u${character.charCodeAt(0).toString(16).padStart(4, '0')}`;
  });
}

function formatLocation(where: { file?: string; line?: number; column?: string }): string {
  const place = [where.file, where.line !== undefined ? `line ${where.line}` : undefined]
    .filter((part) => part !== undefined)
    .join(' ');
  const column = where.column !== undefined ? `column "${where.column}"` : '';
  const location = [place, column].filter((part) => part !== '').join(', ');
  return location === '' ? '' : `${location}: `;
}

/**
 * A usage mistake (bad option or argument): exit code 2 in the CLI.
 *
 * @example
 * usageError('--dpi: expected a number, got "many"').kind; // 'usage' (exit code 2)
 */
export function usageError(detail: string): InputError {
  return new InputError(detail, { kind: 'usage' });
}
