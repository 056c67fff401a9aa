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
 * Invisible formatting characters with no place in a name (Unicode general
 * category Cf): the bidirectional embedding, override and isolate controls
 * U+202A–U+202E and U+2066–U+2069 reorder the text a terminal or a table
 * shows after them (the "Trojan Source" display attack, Boucher & Anderson
 * 2021), and the zero-width space U+200B, word joiner U+2060 and zero-width
 * no-break space U+FEFF make two different names look the same, so one
 * lineage could silently become two. The zero-width joiners U+200C/U+200D and
 * the marks U+200E/U+200F/U+061C are left alone: scripts such as Persian and
 * Arabic use them in ordinary words.
 */
const invisibleFormat = /[\u202a-\u202e\u2066-\u2069\u200b\u2060\ufeff]/;

/** Names of the invisible formatting characters refused in names, for messages. */
const formatNames: Readonly<Record<number, string>> = {
  0x202a: 'LEFT-TO-RIGHT EMBEDDING', 0x202b: 'RIGHT-TO-LEFT EMBEDDING', 0x202c: 'POP DIRECTIONAL FORMATTING', 0x202d: 'LEFT-TO-RIGHT OVERRIDE', 0x202e: 'RIGHT-TO-LEFT OVERRIDE',
  0x2066: 'LEFT-TO-RIGHT ISOLATE', 0x2067: 'RIGHT-TO-LEFT ISOLATE', 0x2068: 'FIRST STRONG ISOLATE', 0x2069: 'POP DIRECTIONAL ISOLATE',
  0x200b: 'ZERO WIDTH SPACE', 0x2060: 'WORD JOINER', 0xfeff: 'ZERO WIDTH NO-BREAK SPACE',
};

/**
 * The first invisible formatting character refused in names (see
 * {@link invisibleFormat}), or null.
 *
 * @example
 * firstInvisibleFormat('Korrin\u202eGap'); // { position: 7, code: 8238 }
 * firstInvisibleFormat('Korrin Gap'); // null
 */
export function firstInvisibleFormat(text: string): ControlCharacterAt | null {
  const match = invisibleFormat.exec(text);
  return match === null ? null : { position: match.index + 1, code: text.charCodeAt(match.index) };
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
  const hidden = invisibleFormatWords(name);
  if (hidden !== null) {
    throw new InputError(
      `contains ${hidden}, got "${name}"; names must be visible text (it would reorder what is shown after it, or make two different names look the same)`,
      where,
    );
  }
  return name;
}

/**
 * Words naming the first invisible formatting character of a text (see
 * {@link invisibleFormat}) and where it sits, for messages about names and
 * option labels; null when there is none.
 *
 * @example
 * invisibleFormatWords('mm\u202e'); // 'the invisible formatting character U+202E (RIGHT-TO-LEFT OVERRIDE) at character 3'
 * invisibleFormatWords('mm'); // null
 */
export function invisibleFormatWords(text: string): string | null {
  const hidden = firstInvisibleFormat(text);
  if (hidden === null) return null;
  const hex = `U+${hidden.code.toString(16).toUpperCase().padStart(4, '0')}`;
  return `the invisible formatting character ${hex} (${formatNames[hidden.code]}) at character ${hidden.position}`;
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
