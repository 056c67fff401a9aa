import { existsSync } from 'node:fs';
import { execFileSync } from 'node:child_process';

/**
 * Where the system Chromium is (Debian package `chromium`), or null. The
 * tests never download a browser: playwright-core drives this executable.
 */
export function findChromium(
  candidates: readonly (string | undefined)[] = [process.env.CHROMIUM_PATH, '/usr/bin/chromium', '/usr/bin/chromium-browser'],
  searchPath: string | undefined = process.env.PATH,
): string | null {
  for (const candidate of candidates) {
    if (candidate && existsSync(candidate)) return candidate;
  }
  try {
    const found = execFileSync('sh', ['-c', 'command -v chromium || command -v chromium-browser'], { encoding: 'utf8', env: { ...process.env, PATH: searchPath ?? '' } }).trim();
    return found === '' ? null : found;
  } catch {
    return null;
  }
}

/** Launch flags: headless, no sandbox (CI containers run as root), and nothing that phones home. */
export const chromiumArgs = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** True on CI, where a missing browser must fail the suite rather than skip. */
export const onCi = process.env.CI === 'true';

/** What the browser tests do: run with the browser found, skip loudly (no browser, not CI), or fail (no browser on CI). */
export function browserDecision(executable: string | null, ci: boolean): 'run' | 'skip' | 'fail' {
  if (executable) return 'run';
  return ci ? 'fail' : 'skip';
}
