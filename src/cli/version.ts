import { readFileSync } from 'node:fs';

/** The tool's version, from package.json (dist/src/cli → project root). */
export function toolVersion(): string {
  try {
    const text = readFileSync(new URL('../../../package.json', import.meta.url), 'utf8');
    return (JSON.parse(text) as { version: string }).version;
  } catch {
    return 'unknown';
  }
}
