/** Paths inside a value where a number is NaN or ±Infinity (empty when every number is finite). */
export function nonFinitePaths(value: unknown, path = '$', found: string[] = []): string[] {
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) found.push(`${path} = ${value}`);
  } else if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    Array.from(value as unknown as ArrayLike<number>).forEach((item, i) => nonFinitePaths(item, `${path}[${i}]`, found));
  } else if (Array.isArray(value)) {
    value.forEach((item, i) => nonFinitePaths(item, `${path}[${i}]`, found));
  } else if (value !== null && typeof value === 'object') {
    for (const [key, item] of Object.entries(value)) nonFinitePaths(item, `${path}.${key}`, found);
  }
  return found;
}

/** Words that mean a non-finite number leaked into printed text. */
export const nonFiniteText = /\bNaN\b|\bInfinity\b|\bundefined\b/;
