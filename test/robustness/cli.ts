import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The repository root. */
export const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

/** The malformed-input corpus folder. */
export const corpus = join(root, 'test', 'fixtures', 'malformed');

/** What one run of the real command line printed. */
export interface CliRun {
  readonly status: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

/**
 * Run `node bin/stratotrend ARGS` (the built CLI: `npm test` builds first) in
 * `cwd`, with stdin from `input` when given.
 */
export function runCli(args: readonly string[], cwd = corpus, input?: string | Buffer): CliRun {
  // STRATOTREND_TEST_BIN points at another build of the same sources (a developer's private copy while others rebuild dist/).
  const launcher = process.env.STRATOTREND_TEST_BIN ?? join(root, 'bin', 'stratotrend');
  const result = spawnSync(process.execPath, [launcher, ...args], {
    cwd,
    input,
    encoding: 'utf8',
    timeout: 120_000,
    env: { ...process.env, NO_COLOR: '1' },
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}
