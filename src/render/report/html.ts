/** Small, dependency-free helpers for writing HTML as strings. */

/**
 * Escape text for an HTML text node or a double-quoted attribute.
 *
 * @example
 * escapeHtml('a < b & "c"'); // 'a &lt; b &amp; &quot;c&quot;'
 */
export function escapeHtml(text: unknown): string {
  return String(text)
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/**
 * A number as an attribute value that parses back to exactly the same double
 * (JavaScript's shortest round-trip form, as JSON.stringify writes it), or
 * "" for null. Tests read these to compare the page with fit.json.
 *
 * @example
 * exactValue(0.1); // '0.1'
 * exactValue(1 / 3); // '0.3333333333333333' (parses back to the same double)
 * exactValue(null); // ''
 */
export function exactValue(value: number | null | undefined): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '' : String(value);
}

/**
 * An id usable in an HTML anchor, from any text.
 *
 * @example
 * slug('Upper cliff / Length (mm)'); // 'upper-cliff-length-mm'
 * slug('÷'); // 'item'
 */
export function slug(text: string): string {
  const base = text.normalize('NFKD').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '');
  return base === '' ? 'item' : base;
}
