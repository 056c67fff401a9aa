import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

// The shape of src/ (issue 13): no file imports itself through others, and the
// top-level folders (data, lineage, models, engine, random, fit, parallel,
// compare, simulate, render, analyses, io, cli, statistics) form no circle
// either. Imports are read with TypeScript's own parser, so strings and
// comments that look like imports are not counted.
//
// What counts as an edge: `import` and `export ... from` declarations,
// INCLUDING `import type` (it makes no runtime circle, but a type-only circle
// still ties two modules together: neither can be read, moved or reused
// without the other, which is what the issue is about), and dynamic
// `import('...')` (the commands' lazy loading is still a dependency). Only
// relative specifiers are followed; packages are outside the graph.

const sourceRoot = resolve(__dirname, '../../src');

function sources(folder: string): string[] {
  return readdirSync(folder, { withFileTypes: true }).flatMap((entry) => {
    const path = join(folder, entry.name);
    return entry.isDirectory() ? sources(path) : entry.name.endsWith('.ts') ? [path] : [];
  });
}

/** Relative imports of one source text, as paths relative to `sourceRoot` ('.js' specifiers mapped to their '.ts' files). */
function importsOf(path: string, text: string): string[] {
  const file = ts.createSourceFile(path, text, ts.ScriptTarget.Latest, false);
  const found = new Set<string>();
  const add = (specifier: string): void => {
    if (specifier.startsWith('.')) found.add(relative(sourceRoot, resolve(dirname(path), specifier)).replace(/\.js$/, '.ts'));
  };
  const visit = (node: ts.Node): void => {
    if ((ts.isImportDeclaration(node) || ts.isExportDeclaration(node)) && node.moduleSpecifier && ts.isStringLiteral(node.moduleSpecifier)) add(node.moduleSpecifier.text);
    if (ts.isCallExpression(node) && node.expression.kind === ts.SyntaxKind.ImportKeyword && node.arguments.length > 0 && ts.isStringLiteral(node.arguments[0])) add(node.arguments[0].text);
    ts.forEachChild(node, visit);
  };
  visit(file);
  return [...found];
}

/**
 * Strongly connected components of more than one node (or a node importing
 * itself): exactly the circles. Tarjan, R. (1972). Depth-first search and
 * linear graph algorithms. SIAM J. Comput. 1:146-160.
 */
function circles(graph: ReadonlyMap<string, readonly string[]>): string[][] {
  let counter = 0;
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const found: string[][] = [];
  const connect = (node: string): void => {
    index.set(node, counter);
    low.set(node, counter);
    counter++;
    stack.push(node);
    onStack.add(node);
    for (const next of graph.get(node) ?? []) {
      if (!index.has(next)) {
        connect(next);
        low.set(node, Math.min(low.get(node)!, low.get(next)!));
      } else if (onStack.has(next)) {
        low.set(node, Math.min(low.get(node)!, index.get(next)!));
      }
    }
    if (low.get(node) !== index.get(node)) return;
    const component: string[] = [];
    let member: string;
    do {
      member = stack.pop()!;
      onStack.delete(member);
      component.push(member);
    } while (member !== node);
    if (component.length > 1 || (graph.get(node) ?? []).includes(node)) found.push(component.sort());
  };
  for (const node of graph.keys()) if (!index.has(node)) connect(node);
  return found;
}

/** The top-level folder of a source path ('fit/search.ts' → 'fit'; 'lineage.ts' → 'lineage'). */
function folderOf(path: string): string {
  return path.includes('/') ? path.split('/')[0] : path.replace(/\.ts$/, '');
}

/** The folder graph: an edge for every file import that crosses folders. */
function folderGraph(files: ReadonlyMap<string, readonly string[]>): Map<string, string[]> {
  const folders = new Map<string, Set<string>>();
  for (const [from, targets] of files) {
    for (const target of targets) {
      if (folderOf(from) === folderOf(target)) continue;
      if (!folders.has(folderOf(from))) folders.set(folderOf(from), new Set());
      folders.get(folderOf(from))!.add(folderOf(target));
    }
  }
  return new Map([...folders].map(([folder, targets]) => [folder, [...targets]]));
}

const fileGraph = new Map(sources(sourceRoot).map((path) => [relative(sourceRoot, path), importsOf(path, readFileSync(path, 'utf8'))]));

describe('the checker itself', () => {
  it('finds a circle of three and a self-import, and none in a chain (hand-made graphs; Tarjan 1972)', () => {
    const graph = new Map([['a', ['b']], ['b', ['c']], ['c', ['a']], ['d', ['d']], ['e', ['a']]]);
    expect(circles(graph)).toEqual([['a', 'b', 'c'], ['d']]);
    expect(circles(new Map([['a', ['b']], ['b', ['c']], ['c', []]]))).toEqual([]);
  });

  it('reads import, import type, export from and dynamic import, and not an import written in a comment or a string', () => {
    const text = [
      "import { a } from './a.js';",
      "import type { B } from '../b/b.js';",
      "export { c } from './c.js';",
      "const d = await import('./d.js');",
      "// import { e } from './e.js';",
      "const f = \"import { f } from './f.js'\";",
      "import { readFileSync } from 'node:fs';",
    ].join('\n');
    expect(importsOf(join(sourceRoot, 'fit/x.ts'), text).sort()).toEqual(['b/b.ts', 'fit/a.ts', 'fit/c.ts', 'fit/d.ts']);
  });

  it('every followed import names a file that exists in src/ (the graph is the real one)', () => {
    const missing = [...fileGraph].flatMap(([from, targets]) => targets.filter((target) => !fileGraph.has(target)).map((target) => `${from} → ${target}`));
    expect(missing).toEqual([]);
  });
});

describe('no circles in src/', () => {
  it('no circle of files', () => {
    expect(circles(fileGraph)).toEqual([]);
  });

  it('no circle of top-level folders', () => {
    expect(circles(folderGraph(fileGraph))).toEqual([]);
  });

  it('a command file (cli/*-command.ts) imports no other file of cli/: the work is in analyses/, the shared parts in io/ (issue 13)', () => {
    const commandFiles = [...fileGraph.keys()].filter((path) => /^cli\/[^/]+-command\.ts$/.test(path));
    expect(commandFiles.length).toBeGreaterThanOrEqual(7); // the seven commands of `stratotrend --help`: fit, compare, report, power, simulate, bootstrap, redraw
    const crossing = commandFiles.flatMap((from) => fileGraph.get(from)!.filter((target) => folderOf(target) === 'cli').map((target) => `${from} → ${target}`));
    expect(crossing).toEqual([]);
  });

  it('analyses/ print nothing: they return documents and text, the command files write them to standard output (issue 13)', () => {
    const analyses = sources(join(sourceRoot, 'analyses'));
    expect(analyses.length).toBeGreaterThan(0);
    const printing = analyses.filter((path) => /process\.stdout\.write/.test(readFileSync(path, 'utf8'))).map((path) => relative(sourceRoot, path));
    expect(printing).toEqual([]);
  });

  it('fit/ imports neither simulate/ nor parallel/ (random numbers and simulation under a model live below it, in random/)', () => {
    const crossing = [...fileGraph].flatMap(([from, targets]) => (folderOf(from) === 'fit' ? targets.filter((target) => ['simulate', 'parallel'].includes(folderOf(target))).map((target) => `${from} → ${target}`) : []));
    expect(crossing).toEqual([]);
  });
});
