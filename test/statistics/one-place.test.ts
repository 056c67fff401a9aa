import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

// Structure checks for issue 22 ("one place for each thing"): read the sources
// as text, so a second hand-written copy or an import against the pipeline
// (data → lineage → models → engine → fit → compare/simulate → render → cli,
// DEVELOPERS.md) fails here. The rules are the project's own (DEVELOPERS.md).

const sourceRoot = resolve(__dirname, '../../src');

function sources(folder = sourceRoot): string[] {
  return readdirSync(folder, { withFileTypes: true }).flatMap((entry) => {
    const path = join(folder, entry.name);
    return entry.isDirectory() ? sources(path) : entry.name.endsWith('.ts') ? [path] : [];
  });
}

const files = sources().map((path) => {
  const text = readFileSync(path, 'utf8');
  // The code without its comments (TSDoc examples name functions they do not call).
  const code = text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
  return { path: relative(sourceRoot, path), text, code };
});

function definitionsOf(name: string): string[] {
  const pattern = new RegExp(`^(?:export )?(?:async )?function ${name}\\b|^(?:export )?const ${name} = `, 'm');
  return files.filter((file) => pattern.test(file.text)).map((file) => file.path);
}

function relativeImports(file: { path: string; text: string }): string[] {
  return [...file.text.matchAll(/from '(\.\.?\/[^']+)'/g)].map((match) => relative(sourceRoot, resolve(sourceRoot, file.path, '..', match[1])));
}

describe('one place for each helper', () => {
  it.each([
    ['chiSquareSurvival', 'statistics/chi-square.ts'],
    ['quantileOfSorted', 'statistics/quantiles.ts'],
    ['orderQuantile', 'statistics/quantiles.ts'],
    ['redrawAgeModel', 'compare/age-uncertainty.ts'],
  ])('%s is defined once, in %s', (name, where) => {
    expect(definitionsOf(name)).toEqual([where]);
  });

  it('one ranking rule: fit and compare take the best by lowestCriterion, with no loop of their own over AICc', () => {
    expect(definitionsOf('lowestCriterion')).toEqual(['fit/model-choice.ts']);
    const ownLoops = files.filter((file) => /\.aicc < (lowest|bestCriterion)\b/.test(file.code)).map((file) => file.path);
    expect(ownLoops).toEqual([]);
  });

  it('no hand-written median, type-7 quantile or CRC-32 (simple-statistics and node:zlib provide them)', () => {
    for (const name of ['median', 'quantile', 'crc32']) expect(definitionsOf(name)).toEqual([]);
    // A CRC table of polynomial 0xEDB88320 is the mark of a hand-made CRC-32.
    expect(files.filter((file) => /0xedb88320/i.test(file.text)).map((file) => file.path)).toEqual([]);
  });
});

describe('one progress bar', () => {
  it('only src/io/progress.ts draws bars: no other file loads cli-progress, tests isTTY or draws a bar by hand', () => {
    const drawing = files.filter((file) => /cli-progress|isTTY|'#'\.repeat\(|\\r\\u001b\[K/.test(file.text)).map((file) => file.path);
    expect(drawing).toEqual(['io/progress.ts']);
  });
});

describe('--models is resolved once per run', () => {
  it('resolveModels is called only where a run starts (runFit, runFitStreamed, runCompare, runPower) and sets are looked up only there', () => {
    const calls = files.flatMap((file) => [...file.code.matchAll(/\bresolveModels\(/g)].map(() => file.path)).filter((path) => path !== 'analyses/model-selection.ts');
    expect(calls.sort()).toEqual(['analyses/compare-run.ts', 'analyses/fit-run.ts', 'analyses/fit-run.ts', 'analyses/power-run.ts']);
    expect(files.filter((file) => /\bmodelSets\[/.test(file.code)).map((file) => file.path)).toEqual(['analyses/model-selection.ts']);
  });
});

describe('imports follow the pipeline', () => {
  it('data/ imports nothing downstream of itself', () => {
    for (const file of files.filter((item) => item.path.startsWith('data/'))) {
      for (const target of relativeImports(file)) expect(target.startsWith('data/') || target.startsWith('statistics/'), `${file.path} → ${target}`).toBe(true);
    }
  });

  it('compare/ and simulate/ import neither render/ nor cli/', () => {
    for (const file of files.filter((item) => item.path.startsWith('compare/') || item.path.startsWith('simulate/'))) {
      for (const target of relativeImports(file)) expect(/^(render|cli)\//.test(target), `${file.path} → ${target}`).toBe(false);
    }
  });

  it('statistics/ is a leaf: it imports nothing from the project', () => {
    for (const file of files.filter((item) => item.path.startsWith('statistics/'))) expect(relativeImports(file)).toEqual([]);
  });
});
