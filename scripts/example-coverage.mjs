#!/usr/bin/env node
// Issue 22: which exported functions and classes of src/ have no `@example` in their TSDoc, per folder.
//   node scripts/example-coverage.mjs            per-folder counts (exported, with an example, without)
//   node scripts/example-coverage.mjs --list     the same, then every export without an example (file:line name)
// "Exported function or class": an exported function declaration (overloads counted once), an exported class, or
// an exported const whose value is an arrow function or function expression. Re-exports are counted where the
// name is declared. test/docs/examples.test.ts imports `exampleCoverage` to keep covered folders covered.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';

const projectRoot = join(dirname(fileURLToPath(import.meta.url)), '..');

function sourceFiles(folder) {
  const files = [];
  for (const name of readdirSync(folder).sort()) {
    const path = join(folder, name);
    if (statSync(path).isDirectory()) files.push(...sourceFiles(path));
    else if (name.endsWith('.ts') && !name.endsWith('.d.ts')) files.push(path);
  }
  return files;
}

function isExported(node) {
  return (ts.getCombinedModifierFlags(node) & ts.ModifierFlags.Export) !== 0;
}

function hasExample(node) {
  return ts.getJSDocTags(node).some((tag) => tag.tagName.text === 'example');
}

/** The exported functions and classes of one source text, each with its line and whether its TSDoc has `@example`. */
export function exportedCallables(text, file) {
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true);
  const found = new Map();
  const note = (name, node, documented) => {
    const line = source.getLineAndCharacterOfPosition(node.getStart(source)).line + 1;
    const known = found.get(name);
    // Overloads: the implementation or any signature may carry the TSDoc.
    if (known) known.example ||= documented;
    else found.set(name, { name, line, example: documented });
  };
  for (const statement of source.statements) {
    if ((ts.isFunctionDeclaration(statement) || ts.isClassDeclaration(statement)) && statement.name && isExported(statement)) {
      note(statement.name.text, statement, hasExample(statement));
    } else if (ts.isVariableStatement(statement) && isExported(statement)) {
      for (const declaration of statement.declarationList.declarations) {
        const value = declaration.initializer;
        if (!value || !ts.isIdentifier(declaration.name)) continue;
        if (ts.isArrowFunction(value) || ts.isFunctionExpression(value)) note(declaration.name.text, statement, hasExample(statement));
      }
    }
  }
  return [...found.values()];
}

/**
 * Coverage of `@example` per folder of `src/` (a file directly in `src/` counts as folder `src`).
 * Returns `{ folder, exported, withExample, missing: [{ file, line, name }] }` per folder, sorted by folder.
 */
export function exampleCoverage(root = projectRoot) {
  const folders = new Map();
  for (const path of sourceFiles(join(root, 'src'))) {
    const file = relative(root, path).split('\\').join('/');
    const parts = file.split('/');
    const folder = parts.length > 2 ? parts.slice(0, 2).join('/') : 'src';
    const entry = folders.get(folder) ?? { folder, exported: 0, withExample: 0, missing: [] };
    folders.set(folder, entry);
    for (const callable of exportedCallables(readFileSync(path, 'utf8'), file)) {
      entry.exported += 1;
      if (callable.example) entry.withExample += 1;
      else entry.missing.push({ file, line: callable.line, name: callable.name });
    }
  }
  return [...folders.values()].sort((a, b) => a.folder.localeCompare(b.folder));
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const coverage = exampleCoverage();
  const width = Math.max(...coverage.map((entry) => entry.folder.length), 'total'.length);
  console.log(`${'folder'.padEnd(width)}  exported  with @example  without`);
  let exported = 0;
  let withExample = 0;
  for (const entry of coverage) {
    exported += entry.exported;
    withExample += entry.withExample;
    console.log(`${entry.folder.padEnd(width)}  ${String(entry.exported).padStart(8)}  ${String(entry.withExample).padStart(13)}  ${String(entry.missing.length).padStart(7)}`);
  }
  console.log(`${'total'.padEnd(width)}  ${String(exported).padStart(8)}  ${String(withExample).padStart(13)}  ${String(exported - withExample).padStart(7)}`);
  if (process.argv.includes('--list')) {
    for (const entry of coverage) for (const missing of entry.missing) console.log(`${missing.file}:${missing.line} ${missing.name}`);
  }
}
