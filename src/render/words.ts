/**
 * Small helpers for the words every output writes.
 */

/**
 * The text with its first character in upper case (the start of a sentence
 * or a caption built from a lower-case phrase).
 *
 * @example
 * capitalised('directional walk'); // 'Directional walk'
 * capitalised(''); // ''
 */
export function capitalised(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}
