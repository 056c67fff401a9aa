/**
 * Property-based fuzzing (fast-check, seeded): hundreds (thousands in the
 * sweep of `npm run bench`) of mutated versions
 * of small valid files go through the same functions the CLI calls. Every
 * run must end in a result whose numbers are all finite, or in an InputError
 * (one user-facing message); any other exception is a crash. The streaming
 * reader (what the CLI uses) must agree with the whole-file reader on every
 * mutated file: same horizons, or the same message. A smaller number go
 * through the real command line. Fitting is limited to files of at most ten
 * horizons, without intervals for most runs, so the file runs in seconds.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { decodeText, readTable } from '../../src/data/read-table.js';
import { readSamples, type SampleSet } from '../../src/data/samples.js';
import { streamSampleFile } from '../../src/data/stream-samples.js';
import { runFit, type FitCommandOptions } from '../../src/analyses/fit-run.js';
import { runCompare } from '../../src/analyses/compare-run.js';
import { simulateCommand } from '../../src/cli/simulate-command.js';
import { comparisonCsv, comparisonTable } from '../../src/render/comparison-output.js';
import { lineageTable } from '../../src/render/text-table.js';
import { modelsCsv } from '../../src/render/models-csv.js';
import { runCliHere } from '../support/cli-in-process.js';
import { nonFinitePaths, nonFiniteText } from './finite.js';
import { sweepSize } from '../support/sweep.js';

const summaryFile = [
  'section,trait,age,n,mean,sd',
  'Korrin Gap,rib count,9.80,12,14.20,1.10',
  'Korrin Gap,rib count,9.35,15,14.65,1.30',
  'Korrin Gap,rib count,9.10,11,14.40,0.90',
  'Korrin Gap,rib count,8.60,14,15.10,1.20',
  'Korrin Gap,rib count,8.25,10,15.55,1.00',
  'Korrin Gap,rib count,7.90,13,15.30,1.15',
  '',
].join('\n');

const specimenFile = [
  'section;time;value',
  'Orlet Cut;0;2,31', 'Orlet Cut;0;2,45', 'Orlet Cut;0;2,38',
  'Orlet Cut;0,4;2,52', 'Orlet Cut;0,4;2,41',
  'Orlet Cut;1,1;2,60', 'Orlet Cut;1,1;2,71', 'Orlet Cut;1,1;2,55',
  'Orlet Cut;1,5;2,66', 'Orlet Cut;1,5;2,80',
  '',
].join('\n');

const twoSectionFile = [
  'section,trait,age,n,mean,var',
  'Hesk Ridge,width,5.0,8,3.10,0.04', 'Hesk Ridge,width,4.6,9,3.22,0.05', 'Hesk Ridge,width,4.1,7,3.18,0.03', 'Hesk Ridge,width,3.3,10,3.40,0.06',
  'Pell Scar,width,5.2,6,3.05,0.02', 'Pell Scar,width,4.4,8,3.00,0.05', 'Pell Scar,width,3.9,5,3.12,0.04',
  '',
].join('\r\n');

const bases: Array<{ text: string; options: FitCommandOptions }> = [
  { text: summaryFile, options: {} },
  { text: specimenFile, options: { decimalComma: true } },
  { text: twoSectionFile, options: {} },
];

const strangeCells = [
  '', ' ', 'NaN', 'nan', 'Infinity', '-Infinity', '1e308', '1e309', '1e-320', '1e-99', '1e100', '-1', '-0', '0', '1', '2', '00012', '+3', '.5', '5.',
  '1,5', '1.5.2', 'abc', '"', '""', '"4"', '12 mm', '\u22122', '1e5', '9.80', '9.35', '1e-7', '1e7', ' 7 ', '0x10', '1_000',
];
const strangeCharacters = [',', ';', '\t', '"', '\n', '\r', '\r\n', ' ', '-', '.', 'e', '0', '9', 'x', '\u0000', '\uFEFF', 'é', '\uFFFD', 'n', 'sd'];

type Mutation =
  | { kind: 'delete'; at: number; length: number }
  | { kind: 'insert'; at: number; text: string }
  | { kind: 'cell'; line: number; cell: number; value: string }
  | { kind: 'number'; line: number; cell: number; value: number }
  | { kind: 'duplicate-line' | 'delete-line'; line: number }
  | { kind: 'swap-lines'; line: number; other: number }
  | { kind: 'truncate'; at: number };

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('delete' as const), at: fc.nat(), length: fc.integer({ min: 1, max: 4 }) }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), text: fc.oneof(fc.constantFrom(...strangeCharacters), fc.string({ maxLength: 3 })) }),
  fc.record({ kind: fc.constant('cell' as const), line: fc.nat(), cell: fc.nat(), value: fc.constantFrom(...strangeCells) }),
  fc.record({ kind: fc.constant('number' as const), line: fc.nat(), cell: fc.nat(), value: fc.oneof(fc.double({ noNaN: true }), fc.integer({ min: -3, max: 40 })) }),
  fc.record({ kind: fc.constantFrom('duplicate-line' as const, 'delete-line' as const), line: fc.nat() }),
  fc.record({ kind: fc.constant('swap-lines' as const), line: fc.nat(), other: fc.nat() }),
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
);

function mutate(text: string, mutations: readonly Mutation[]): string {
  let result = text;
  for (const change of mutations) {
    const lines = result.split('\n');
    const lineAt = (index: number): number => index % Math.max(1, lines.length);
    switch (change.kind) {
      case 'delete': {
        const at = change.at % Math.max(1, result.length);
        result = result.slice(0, at) + result.slice(at + change.length);
        break;
      }
      case 'insert': {
        const at = change.at % (result.length + 1);
        result = result.slice(0, at) + change.text + result.slice(at);
        break;
      }
      case 'cell':
      case 'number': {
        const line = lineAt(change.line);
        const delimiter = lines[line].includes(';') ? ';' : ',';
        const cells = lines[line].split(delimiter);
        cells[change.cell % cells.length] = String(change.value);
        lines[line] = cells.join(delimiter);
        result = lines.join('\n');
        break;
      }
      case 'duplicate-line':
        lines.splice(lineAt(change.line), 0, lines[lineAt(change.line)]);
        result = lines.join('\n');
        break;
      case 'delete-line':
        lines.splice(lineAt(change.line), 1);
        result = lines.join('\n');
        break;
      case 'swap-lines': {
        const a = lineAt(change.line);
        const b = lineAt(change.other);
        [lines[a], lines[b]] = [lines[b], lines[a]];
        result = lines.join('\n');
        break;
      }
      case 'truncate':
        result = result.slice(0, change.at % (result.length + 1));
        break;
    }
  }
  return result;
}

const optionFlags = fc.record({ log: fc.boolean(), pool: fc.boolean() });
const caseArbitrary = fc.record({
  base: fc.integer({ min: 0, max: bases.length - 1 }),
  mutations: fc.array(mutation, { minLength: 1, maxLength: 4 }),
  flags: optionFlags,
});

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-fuzz-'));
let fileCounter = 0;

/** Write a mutated file; the name is fixed per run so messages compare across readers. */
function writeCase(text: string): string {
  const path = join(folder, `case-${fileCounter++}.csv`);
  writeFileSync(path, text);
  return path;
}

/** Run `fit` in-process; return 'refused' for an InputError, or rethrow anything else. */
function fitOrRefuse(path: string, options: FitCommandOptions): 'fitted' | 'refused' {
  let run;
  try {
    run = runFit(path, { models: 'classic', ...options });
  } catch (error) {
    if (error instanceof InputError) {
      expect(error.message).not.toMatch(/\n/); // one line
      expect(error.message.length).toBeLessThan(600);
      return 'refused';
    }
    throw error;
  }
  expect(nonFinitePaths(run.document)).toEqual([]);
  const text = run.fits.map(lineageTable).join('\n');
  expect(text).not.toMatch(nonFiniteText);
  expect(modelsCsv(run.fits)).not.toMatch(nonFiniteText);
  for (const fit of run.fits) {
    for (const model of fit.models) {
      expect(typeof model.converged).toBe('boolean');
      if (!model.converged) expect(model.message ?? model.notCompared).toBeTruthy();
    }
  }
  return 'fitted';
}

/** Horizons read by the whole-file path, or its message. */
function wholeFileRead(bytes: Buffer, name: string, options: FitCommandOptions): SampleSet | string {
  try {
    const table = readTable(decodeText(bytes, name), name, {});
    return readSamples(table, options);
  } catch (error) {
    if (error instanceof InputError) return error.message;
    throw error;
  }
}

async function streamedRead(bytes: Buffer, name: string, options: FitCommandOptions, chunkBytes: number): Promise<SampleSet | string> {
  try {
    const chunks: Buffer[] = [];
    for (let at = 0; at < bytes.length; at += chunkBytes) chunks.push(bytes.subarray(at, at + chunkBytes));
    return (await streamSampleFile(Readable.from(chunks), name, options)).samples;
  } catch (error) {
    if (error instanceof InputError) return error.message;
    throw error;
  }
}

describe('fuzzing: mutated files end in a finite result or one InputError', () => {
  // The two large property runs are sweeps: npm test runs the first quarter of each seeded
  // sequence (fast-check draws runs in order from its seed: the first
  // n runs do not depend on numRuns, checked here with fast-check 4.10), npm run bench all of it
  // (test/support/sweep.ts). The branch counts are required in the same proportion (1 in 20).
  const fitRuns = sweepSize(2000, 500);
  const readerRuns = sweepSize(1500, 400);

  it(`in-process through runFit (${fitRuns} mutated files, no intervals; 2000 in the sweep)`, () => {
    const outcomes = { fitted: 0, refused: 0 };
    fc.assert(
      fc.property(caseArbitrary, ({ base, mutations, flags }) => {
        const { text, options } = bases[base];
        const path = writeCase(mutate(text, mutations));
        outcomes[fitOrRefuse(path, { ...options, ...flags, intervals: false })] += 1;
      }),
      { numRuns: fitRuns, seed: 20261201 },
    );
    // The corpus must exercise both branches, or the property says little (each more than 1 run in 20).
    expect(outcomes.fitted).toBeGreaterThan(fitRuns / 20);
    expect(outcomes.refused).toBeGreaterThan(fitRuns / 20);
  });

  it('in-process through runFit with profile intervals (40 mutated files)', () => {
    fc.assert(
      fc.property(caseArbitrary, ({ base, mutations, flags }) => {
        const { text, options } = bases[base];
        fitOrRefuse(writeCase(mutate(text, mutations)), { ...options, ...flags });
      }),
      { numRuns: 40, seed: 7 },
    );
  });

  it(`the streaming reader agrees with the whole-file reader (${readerRuns} mutated files, random chunk sizes; 1500 in the sweep)`, async () => {
    await fc.assert(
      fc.asyncProperty(caseArbitrary, fc.integer({ min: 1, max: 64 }), async ({ base, mutations, flags }, chunkBytes) => {
        const { text, options } = bases[base];
        const bytes = Buffer.from(mutate(text, mutations), 'utf8');
        const readOptions = { ...options, log: flags.log };
        const whole = wholeFileRead(bytes, 'case.csv', readOptions);
        const streamed = await streamedRead(bytes, 'case.csv', readOptions, chunkBytes);
        expect(streamed).toEqual(whole);
      }),
      { numRuns: readerRuns, seed: 99 },
    );
  });

  it('in-process through runCompare and simulate (150 mutated files; they share the reader with fit, not the rest)', async () => {
    // Mostly the two-section file, so that compare has sections to compare.
    const compareCases = fc.record({ base: fc.constantFrom(2, 2, 2, 0), mutations: fc.array(mutation, { minLength: 1, maxLength: 3 }), flags: optionFlags });
    const outcomes = { compared: 0, simulated: 0, refused: 0 };
    const refusedOrThrow = (error: unknown): void => {
      if (!(error instanceof InputError)) throw error;
      expect(error.message).not.toMatch(/\n/);
      outcomes.refused += 1;
    };
    await fc.assert(
      fc.asyncProperty(compareCases, async ({ base, mutations, flags }) => {
        const { text, options } = bases[base];
        const path = writeCase(mutate(text, mutations));
        try {
          const run = await runCompare(path, { ...options, ...flags, intervals: false });
          expect(nonFinitePaths(run.document)).toEqual([]);
          expect(comparisonCsv(run.run.comparisons, run.spreads)).not.toMatch(nonFiniteText);
          for (const comparison of run.run.comparisons) expect(comparisonTable(comparison, null)).not.toMatch(nonFiniteText);
          outcomes.compared += 1;
        } catch (error) {
          refusedOrThrow(error);
        }
        try {
          const out = `${path}.simulated.csv`;
          await simulateCommand(path, { ...options, ...flags, model: 'random-walk', out });
          expect(readFileSync(out, 'utf8')).not.toMatch(nonFiniteText);
          outcomes.simulated += 1;
        } catch (error) {
          refusedOrThrow(error);
        }
      }),
      { numRuns: 150, seed: 4242 },
    );
    expect(outcomes.compared).toBeGreaterThan(20);
    expect(outcomes.simulated).toBeGreaterThan(20);
    expect(outcomes.refused).toBeGreaterThan(20);
  });

  it('through the real command line (12 mutated files)', async () => {
    await fc.assert(
      fc.asyncProperty(caseArbitrary, async ({ base, mutations, flags }) => {
        const { text, options } = bases[base];
        const path = writeCase(mutate(text, mutations));
        const args = ['fit', path, '--no-intervals'];
        if (options.decimalComma) args.push('--decimal-comma');
        if (flags.log) args.push('--log');
        if (flags.pool) args.push('--pool');
        const run = await runCliHere(args, folder);
        expect([0, 1, 2]).toContain(run.status);
        expect(run.stderr).not.toMatch(/internal error|\n\s+at /);
        if (run.status === 0) expect(run.stdout).not.toMatch(nonFiniteText);
        else expect(run.stderr.split('\n').filter((line) => line.startsWith('stratotrend: ')).length).toBe(1);
      }),
      { numRuns: 12, seed: 3 },
    );
  });
});
