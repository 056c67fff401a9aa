import { InputError } from './errors.js';

/**
 * Control characters: C0 (U+0000–U+001F), DEL (U+007F) and C1 (U+0080–U+009F),
 * the Unicode general category Cc. A terminal acts on them (ESC starts a
 * colour or cursor sequence, CSI U+009B does the same on some terminals, CR
 * and BS overwrite what was printed), so a name holding one could rewrite
 * what the user reads.
 */
const controlCharacter = /[\u0000-\u001f\u007f-\u009f]/;

/** Short names of the control characters people meet, for messages. */
const controlNames: Readonly<Record<number, string>> = {
  0x00: 'NUL', 0x07: 'BEL', 0x08: 'BS', 0x09: 'TAB', 0x0a: 'LF', 0x0b: 'VT', 0x0c: 'FF', 0x0d: 'CR', 0x1b: 'ESC', 0x7f: 'DEL', 0x9b: 'CSI',
};

/** Where the first control character of a text is, or null when it has none. */
export interface ControlCharacterAt {
  /** 1-based character position in the text (UTF-16 code units; control characters are single units). */
  readonly position: number;
  /** The character's code, e.g. 0x1b. */
  readonly code: number;
}

/**
 * The first control character (C0, DEL or C1) of a text, or null.
 *
 * @example
 * firstControlCharacter('A\u001b[31m'); // { position: 2, code: 27 }
 * firstControlCharacter('Korrin Gap'); // null
 */
export function firstControlCharacter(text: string): ControlCharacterAt | null {
  const match = controlCharacter.exec(text);
  return match === null ? null : { position: match.index + 1, code: text.charCodeAt(match.index) };
}

/**
 * "U+001B (ESC)" for messages.
 *
 * @example
 * describeControlCharacter(27); // 'U+001B (ESC)'
 * describeControlCharacter(0x85); // 'U+0085'
 */
export function describeControlCharacter(code: number): string {
  const hex = `U+${code.toString(16).toUpperCase().padStart(4, '0')}`;
  const name = controlNames[code];
  return name === undefined ? hex : `${hex} (${name})`;
}

/**
 * Check a name read from input (a section, a trait, a tie file's section):
 * it must hold no control character, since names are printed to terminals
 * and written into every output. The message names the file, line, column,
 * the character and where it sits in the cell; the cell is shown with the
 * character escaped (errors are one line, see `oneLine`).
 *
 * @returns the name unchanged
 * @throws InputError e.g. `a.csv line 4, column "section": contains the control character U+001B (ESC) at character 1, got "\u001b[31mKorrin"; names must be printable text`
 * @example
 * checkName('Korrin Gap', { file: 'a.csv', line: 2, column: 'section' }); // 'Korrin Gap'
 */
export function checkName(name: string, where: { file?: string; line?: number; column?: string }): string {
  const found = firstControlCharacter(name);
  if (found !== null) {
    throw new InputError(
      `contains the control character ${describeControlCharacter(found.code)} at character ${found.position}, got "${name}"; names must be printable text (a terminal would act on the character)`,
      where,
    );
  }
  return name;
}

/**
 * Characters that make a spreadsheet read a cell as a formula (or, for tab and
 * carriage return, that some spreadsheets strip before doing so): the
 * OWASP "CSV Injection" list.
 */
const formulaStart = /^[=+\-@\t\r]/;

/**
 * A text cell as a spreadsheet will take it as text: one that starts with
 * `=`, `+`, `-`, `@`, a tab or a carriage return gets a leading apostrophe
 * (the OWASP "CSV Injection" advice: `=HYPERLINK(...)` in a section name
 * would otherwise run as a formula when the file is opened). Text cells only:
 * numbers are never passed here, so `-0.5` stays a number.
 *
 * @example
 * neutraliseFormula('=HYPERLINK("x")'); // "'=HYPERLINK(\"x\")"
 * neutraliseFormula('Korrin Gap'); // 'Korrin Gap'
 */
export function neutraliseFormula(text: string): string {
  return formulaStart.test(text) ? `'${text}` : text;
}
