import { existsSync } from 'node:fs';
import { execFileSync } from 'node:child_process';

/**
 * Where the system Chromium is (Debian package `chromium`), or null. The
 * tests never download a browser: playwright-core drives this executable.
 */
export function findChromium(): string | null {
  for (const candidate of [process.env.CHROMIUM_PATH, '/usr/bin/chromium', '/usr/bin/chromium-browser']) {
    if (candidate && existsSync(candidate)) return candidate;
  }
  try {
    const found = execFileSync('sh', ['-c', 'command -v chromium || command -v chromium-browser'], { encoding: 'utf8' }).trim();
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
