/**
 * Vitest global set-up: the worker-thread tests, the CLI tests and the
 * benchmark-shaped tests run the compiled JavaScript in `dist/`, not the
 * `.ts` sources vitest transforms itself. After an edit without
 * `npm run build` they would test stale code, so before any test runs this
 * compiles the project when some source under `src/` or `bench/` is newer
 * than its compiled twin (or has none). `npm test` builds first (its
 * `pretest`), and then nothing is done here.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));

/** Every `.ts` source under the compiled folders, with its compiled twin's path. */
export function compiledTwins(): { source: string; compiled: string }[] {
  const pairs: { source: string; compiled: string }[] = [];
  const walk = (folder: string): void => {
    for (const entry of readdirSync(folder, { withFileTypes: true })) {
      const path = join(folder, entry.name);
      if (entry.isDirectory()) walk(path);
      else if (entry.name.endsWith('.ts') && !entry.name.endsWith('.d.ts')) {
        pairs.push({ source: path, compiled: join(root, 'dist', relative(root, path)).replace(/\.ts$/, '.js') });
      }
    }
  };
  for (const folder of ['src', 'bench']) if (existsSync(join(root, folder))) walk(join(root, folder));
  return pairs;
}

/** Sources whose compiled twin is missing or older than the source. */
export function staleSources(): string[] {
  return compiledTwins()
    .filter(({ source, compiled }) => !existsSync(compiled) || statSync(compiled).mtimeMs < statSync(source).mtimeMs)
    .map(({ source }) => relative(root, source));
}

export default function setup(): void {
  const stale = staleSources();
  if (stale.length === 0) return;
  process.stderr.write(`test set-up: ${stale.length} source file(s) newer than dist/ (first: ${stale[0]}); compiling with tsc\n`);
  execFileSync(process.execPath, [join(root, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(root, 'tsconfig.json')], {
    cwd: root,
    stdio: 'inherit',
  });
}
