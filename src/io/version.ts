import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The tool's version, from the nearest package.json named "stratotrend" above this file.
 *
 * @example
 * toolVersion(); // '0.1.0' (the version in package.json)
 */
export function toolVersion(): string {
  let folder = dirname(fileURLToPath(import.meta.url));
  for (let depth = 0; depth < 6; depth++) {
    const candidate = join(folder, 'package.json');
    if (existsSync(candidate)) {
      const manifest = JSON.parse(readFileSync(candidate, 'utf8')) as { name?: string; version?: string };
      if (manifest.name === 'stratotrend' && manifest.version) return manifest.version;
    }
    folder = dirname(folder);
  }
  return 'unknown';
}
