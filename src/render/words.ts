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

/**
 * A list in words: "a", "a and b", "a, b and c".
 *
 * @example
 * listWords(['shared', 'shared-offset']); // 'shared and shared-offset'
 * listWords(['a', 'b', 'c']); // 'a, b and c'
 */
export function listWords(items: readonly string[]): string {
  return items.length <= 2 ? items.join(' and ') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}
