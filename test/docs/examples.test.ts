/**
 * The `@example` blocks of the TSDoc in the folders of `documentedFolders`
 * (with `src/lineage.ts`) are run here, so an example can never go stale; and
 * the folders of `coveredFolders` must have one on every exported function
 * and class (scripts/example-coverage.mjs counts them). Conventions (see DEVELOPERS.md, "Examples in the TSDoc"):
 *
 * - `expression; // value` checks that the expression equals the JavaScript
 *   literal `value` (deep equality, as vitest's `toEqual`); a parenthetical
 *   note after the value is prose, except `(to 1e-12)` or `(to 1e-12; why)`,
 *   which gives that number's absolute tolerance.
 * - a line `// message: text` (or `// throws: text`) after a statement checks
 *   that the statement throws an error whose message is `text`.
 * - other lines run as they are; every block has at least one check (the
 *   blocks run, in every file of those folders).
 *
 * Every exported name of those modules is in scope, as in the examples, and
 * a few Node functions for a scratch folder (mkdtempSync, readdirSync,
 * readFileSync, writeFileSync, existsSync, rmSync from node:fs; tmpdir from
 * node:os).
 * Source of each expected value: the example itself, which states what the
 * function returns; where it is a published value or closed form, the
 * example's note says which (e.g. exp(-1), -0.5 ln 2 pi).
 */
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
// @ts-expect-error -- a plain script without type declarations (scripts/ is not compiled).
import { exampleCoverage } from '../../scripts/example-coverage.mjs';

const root = fileURLToPath(new URL('../..', import.meta.url));

/** The folders whose `@example` blocks run here (with their subfolders), and the files directly in `src/`. */
const documentedFolders = ['src/engine', 'src/fit', 'src/simulate', 'src/parallel', 'src/statistics', 'src/data', 'src/random', 'src/trend', 'src/compare', 'src/render', 'src/models', 'src/joint', 'src/analyses', 'src/io', 'src/cli'];

/** The documented source files whose examples run here. */
function documentedFiles(): string[] {
  const files: string[] = [];
  const walk = (folder: string): void => {
    for (const entry of readdirSync(folder, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      if (entry.isDirectory()) walk(join(folder, entry.name));
      else if (entry.name.endsWith('.ts') && !entry.name.endsWith('.d.ts')) files.push(join(folder, entry.name));
    }
  };
  for (const folder of documentedFolders) walk(join(root, folder));
  files.push(join(root, 'src', 'lineage.ts'));
  return files;
}

/** One `@example` block: the documented export's name and the block's lines (comment stars removed). */
export interface ExampleBlock {
  readonly file: string;
  readonly name: string;
  readonly lines: readonly string[];
}

/** Every `@example` block of a source text, with the name declared after its comment. */
export function exampleBlocks(text: string, file: string): ExampleBlock[] {
  const blocks: ExampleBlock[] = [];
  const comment = /\/\*\*([\s\S]*?)\*\/\s*(?:export\s+)?(?:async\s+)?(?:function|class|const|interface|type)?\s*([A-Za-z_$][\w$]*)?/g;
  for (const match of text.matchAll(comment)) {
    const body = match[1].split('\n').map((line) => line.replace(/^\s*\* ?/, ''));
    let current: string[] | null = null;
    for (const line of body) {
      if (/^@example\b/.test(line.trim())) {
        current = [];
        blocks.push({ file, name: match[2] ?? '(unnamed)', lines: current });
      } else if (/^@\w+/.test(line.trim())) current = null;
      else if (current) current.push(line);
    }
  }
  return blocks.map((block) => ({ ...block, lines: block.lines.filter((line) => line.trim() !== '') }));
}

/** Split a line into its code and its trailing `//` comment (strings and template literals respected). */
export function splitComment(line: string): { code: string; comment: string | null } {
  let quote: string | null = null;
  for (let i = 0; i < line.length; i++) {
    const character = line[i];
    if (quote) {
      if (character === '\\') i += 1;
      else if (character === quote) quote = null;
    } else if (character === "'" || character === '"' || character === '`') quote = character;
    else if (character === '/' && line[i + 1] === '/') return { code: line.slice(0, i).trim(), comment: line.slice(i + 2).trim() };
  }
  return { code: line.trim(), comment: null };
}

/** The value a `// value (note)` comment states, and its tolerance; null when the comment is not a value. */
export function statedValue(comment: string): { value: unknown; tolerance: number | null } | null {
  const parse = (text: string): { value: unknown } | null => {
    try {
      return { value: new Function(`return (${text});`)() };
    } catch {
      return null;
    }
  };
  const whole = parse(comment);
  if (whole) return { value: whole.value, tolerance: null };
  // A value followed by a note in parentheses: "(to 1e-15)" is a tolerance, anything else prose.
  for (let at = comment.indexOf(' ('); at >= 0; at = comment.indexOf(' (', at + 1)) {
    const note = comment.slice(at + 1).trim();
    if (!note.endsWith(')')) continue;
    const value = parse(comment.slice(0, at));
    if (!value) continue;
    const stated = /^\(to ([^\s,;()]+)(?:[,;].*)?\)$/.exec(note);
    return { value: value.value, tolerance: stated ? Number(stated[1]) : null };
  }
  return null;
}

/** The body of an async function that runs a block and checks its stated values through `check` and `throws`. */
export function exampleProgram(block: ExampleBlock): { source: string; checks: number; problems: string[] } {
  const out: string[] = [];
  const problems: string[] = [];
  let checks = 0;
  for (let i = 0; i < block.lines.length; i++) {
    const { code, comment } = splitComment(block.lines[i]);
    if (code === '') continue;
    const next = i + 1 < block.lines.length ? splitComment(block.lines[i + 1]) : null;
    const thrown = next && next.code === '' && next.comment !== null ? /^(?:message|throws):\s*(.*)$/.exec(next.comment) : null;
    if (thrown) {
      out.push(`await throws(async () => { ${code} }, ${JSON.stringify(thrown[1])}, ${JSON.stringify(block.lines[i])});`);
      checks += 1;
      i += 1;
      continue;
    }
    if (comment === null) {
      out.push(code);
      continue;
    }
    const stated = statedValue(comment);
    if (stated === null) {
      problems.push(`"${comment}" after "${code}" is not a value (write the value, then any note in parentheses)`);
      continue;
    }
    const expression = code.replace(/;\s*$/, '');
    // Statements before the last ';' on the line run first; the last one is the checked expression.
    const cut = lastTopLevelSemicolon(expression);
    if (cut >= 0) out.push(expression.slice(0, cut + 1));
    out.push(`check(${cut >= 0 ? expression.slice(cut + 1) : expression}, ${JSON.stringify(comment)}, ${JSON.stringify(block.lines[i])});`);
    checks += 1;
  }
  return { source: out.join('\n'), checks, problems };
}

function lastTopLevelSemicolon(code: string): number {
  let depth = 0;
  let quote: string | null = null;
  let last = -1;
  for (let i = 0; i < code.length; i++) {
    const character = code[i];
    if (quote) {
      if (character === '\\') i += 1;
      else if (character === quote) quote = null;
    } else if (character === "'" || character === '"' || character === '`') quote = character;
    else if ('([{'.includes(character)) depth += 1;
    else if (')]}'.includes(character)) depth -= 1;
    else if (character === ';' && depth === 0) last = i;
  }
  return last;
}

const AsyncFunction = Object.getPrototypeOf(async () => {}).constructor as new (...args: string[]) => (...values: unknown[]) => Promise<void>;

function sameValue(actual: unknown, expected: unknown, tolerance: number | null, where: string): void {
  if (tolerance !== null && typeof expected === 'number') {
    expect(typeof actual, where).toBe('number');
    expect(Math.abs((actual as number) - expected), where).toBeLessThanOrEqual(tolerance);
  } else expect(actual, where).toEqual(expected);
}

describe('@example blocks of the documented modules', async () => {
  const files = documentedFiles();
  // Every exported name is in scope; a name two modules export with different values is in scope only in the
  // examples of the modules that export it (each block sees its own module's exports first).
  const modules = new Map<string, Record<string, unknown>>();
  const scope = new Map<string, unknown>();
  const ambiguous = new Set<string>();
  for (const file of files) {
    const module = (await import(file)) as Record<string, unknown>;
    modules.set(relative(root, file), module);
    for (const [name, value] of Object.entries(module)) {
      if (scope.has(name) && scope.get(name) !== value) ambiguous.add(name);
      scope.set(name, value);
    }
  }
  for (const name of ambiguous) scope.delete(name);
  // The few Node functions the examples of src/io use for a scratch folder, as a reader would import them.
  const nodeNames = { mkdtempSync, readdirSync, readFileSync, writeFileSync, existsSync, rmSync, tmpdir };
  for (const [name, value] of Object.entries(nodeNames)) if (!scope.has(name)) scope.set(name, value);
  const blocks = files.flatMap((file) => exampleBlocks(readFileSync(file, 'utf8'), relative(root, file)));

  it('finds the examples (the parser sees every block the sources hold)', () => {
    const written = files.reduce((count, file) => count + (readFileSync(file, 'utf8').match(/@example\b/g)?.length ?? 0), 0);
    expect(blocks.length).toBe(written);
    expect(blocks.length).toBeGreaterThan(0);
  });

  for (const block of blocks) {
    it(`${block.file}: ${block.name}`, async () => {
      const program = exampleProgram(block);
      expect(program.problems).toEqual([]);
      // An example states what it returns (a value or a throw), so a wrong one fails here.
      expect(program.checks, `${block.file} (${block.name}): no \`// value\` or \`// throws:\` check`).toBeGreaterThan(0);
      const own = new Map([...scope, ...Object.entries(modules.get(block.file) ?? {})]);
      const names = [...own.keys()];
      const check = (actual: unknown, comment: string, line: string): void => {
        const stated = statedValue(comment)!;
        sameValue(actual, stated.value, stated.tolerance, `${block.file} (${block.name}): ${line}`);
      };
      const throws = async (run: () => Promise<void>, message: string, line: string): Promise<void> => {
        await expect(run(), `${block.file} (${block.name}): ${line}`).rejects.toThrow(message);
      };
      const compiled = new AsyncFunction('check', 'throws', ...names, program.source);
      await compiled(check, throws, ...names.map((name) => own.get(name)));
    });
  }
});

/**
 * Folders where every exported function and class has an `@example` (scripts/example-coverage.mjs counts them), each
 * with the files left out of the check (none since the last pass; a folder's list is the place for a file being
 * rewritten, whose examples must still run).
 */
const coveredFolders: Record<string, readonly string[]> = {
  src: [],
  'src/data': [],
  'src/statistics': [],
  'src/engine': [],
  'src/fit': [],
  'src/random': [],
  'src/simulate': [],
  'src/parallel': [],
  'src/trend': [],
  'src/compare': [],
  'src/render': [],
  'src/joint': [],
  'src/analyses': [],
  'src/io': [],
  'src/models': [],
  'src/cli': [],
};

describe('every export of a covered folder has an @example', () => {
  const coverage = new Map((exampleCoverage(root) as { folder: string; exported: number; missing: { file: string; line: number; name: string }[] }[]).map((entry) => [entry.folder, entry]));
  for (const [folder, leftOut] of Object.entries(coveredFolders)) {
    it(folder, () => {
      const entry = coverage.get(folder);
      expect(entry?.exported, `${folder} has exports`).toBeGreaterThan(0);
      const missing = entry!.missing.filter((callable) => !leftOut.includes(callable.file)).map((callable) => `${callable.file}:${callable.line} ${callable.name}`);
      expect(missing, `exports of ${folder} without an @example (add one; see DEVELOPERS.md, "Examples in the TSDoc")`).toEqual([]);
    });
  }
});

describe('the example runner itself', () => {
  const block = (lines: string[]): ExampleBlock => ({ file: 'x.ts', name: 'x', lines });
  it('checks a stated value, reads a tolerance and sees a throw', () => {
    expect(statedValue("{ option: 'ka' } (a note)")).toEqual({ value: { option: 'ka' }, tolerance: null });
    expect(statedValue('0.05 (to 1e-15)')).toEqual({ value: 0.05, tolerance: 1e-15 });
    expect(statedValue('-2.8 (to 1e-12; = -ln 2 pi - 1)')).toEqual({ value: -2.8, tolerance: 1e-12 });
    expect(statedValue('m per Myr')).toBeNull();
    expect(splitComment("f('a // b'); // 2")).toEqual({ code: "f('a // b');", comment: '2' });
    const program = exampleProgram(block(['const a = 1; a + 1; // 2', 'throw new Error("no");', '// message: no']));
    expect(program.checks).toBe(2);
    expect(program.source).toContain('check( a + 1, "2"');
  });
  it('fails a wrong stated value (the runner is not vacuous)', async () => {
    const program = exampleProgram(block(['1 + 1; // 3']));
    const run = new AsyncFunction('check', 'throws', program.source);
    const check = (actual: unknown, comment: string): void => sameValue(actual, statedValue(comment)!.value, null, 'self-test');
    await expect(run(check, async () => {})).rejects.toThrow();
  });
});
