/**
 * The malformed-input corpus (test/fixtures/malformed, written by
 * make_corpus.py there): every file must end in exactly one line on stderr
 * naming file, line, column and value, with exit code 1 for bad data and 2
 * for bad usage, and nothing on stdout. Each message is checked twice: through
 * the real command line (`node bin/stratotrend fit FILE`, the streaming
 * reader) and in-process through the whole-file reader (readInput +
 * loadLineages), so the two readers cannot drift apart.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { WarningLog } from '../../src/data/warnings.js';
import { loadLineages, readInput, type SampleFileOptions } from '../../src/analyses/input.js';
import { corpus, runCli } from './cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const reads = 'section, trait, age, time, height, depth, n, mean, sd, var, value, covariate';

/** [file, extra CLI options, exit code, exact message after "stratotrend: "]. */
const cases: Array<[string, string[], number, string]> = [
  ['empty.csv', [], 1, 'empty.csv: the file is empty, expected a header line and data rows'],
  ['blank-lines-only.csv', [], 1, 'blank-lines-only.csv: the file is empty, expected a header line and data rows'],
  ['header-only.csv', [], 1, 'header-only.csv line 1: has a header but no data rows'],
  ['no-time-column.csv', [], 1, 'no-time-column.csv line 1: no time column: expected one of "age" (before present), "time" (elapsed), "height" or "depth"'],
  ['two-time-columns.csv', [], 1, 'two-time-columns.csv line 1: more than one time column (age, time): keep exactly one'],
  ['missing-mean.csv', [], 1, 'missing-mean.csv line 1: missing required column "mean" (summary form needs n, mean and sd or var; specimen form needs value)'],
  ['missing-spread.csv', [], 1, 'missing-spread.csv line 1: missing required column "sd" or "var"'],
  ['both-sd-and-var.csv', [], 1, 'both-sd-and-var.csv line 1: has both "sd" and "var": keep one'],
  ['typo-sd.csv', [], 1, `typo-sd.csv line 1, column "stdev": unknown column "stdev": did you mean "sd"? (rename the column; the tool reads ${reads})`],
  ['typo-section.csv', [], 1, `typo-section.csv line 1, column "sectoin": unknown column "sectoin": did you mean "section"? (rename the column; the tool reads ${reads})`],
  ['age-with-unit.csv', [], 1, `age-with-unit.csv line 1, column "Age (Ma)": unknown column "Age (Ma)": did you mean "age"? (rename the column; the tool reads ${reads})`],
  ['standard-error.csv', [], 1, 'standard-error.csv line 1, column "se": column "se" looks like a standard error of the mean; the tool needs the within-horizon standard deviation "sd" (sd = se × √n) or variance "var"'],
  ['duplicate-column.csv', [], 1, 'duplicate-column.csv line 1, column "mean": appears twice in the header, got "mean" twice; keep one'],
  ['ragged-short.csv', [], 1, 'ragged-short.csv line 5: has 5 fields but the header has 6 (ragged row), got "Korrin Gap,rib count,8.60,14,15.10"'],
  ['ragged-decimal-comma.csv', [], 1, 'ragged-decimal-comma.csv line 4: has 7 fields but the header has 6 (ragged row), got "Korrin Gap,rib count,9.10,11,14,40,0.90"; if numbers use a decimal comma, the file needs a semicolon or tab delimiter'],
  ['mixed-delimiters.csv', [], 1, 'mixed-delimiters.csv line 6: has 1 field but the header has 6 (ragged row), got "Korrin Gap,rib count,8.25,10,15.55,1.00"; this row seems to use a comma delimiter, but the header (detected) says semicolon: use one delimiter throughout'],
  ['ambiguous-delimiter.csv', [], 2, 'ambiguous-delimiter.csv line 1: cannot tell the delimiter from the header: it has as many commas as semicolons; give --delimiter "," or --delimiter ";"'],
  ['unclosed-quote.csv', [], 1, 'unclosed-quote.csv line 5: a quoted field opened on this line is never closed (a " without its closing "); close the quote or remove it'],
  ['stray-quote.csv', [], 1, 'stray-quote.csv line 5: has a " inside an unquoted field; quote the whole field and double the inner quote ("")'],
  ['text-after-quote.csv', [], 1, 'text-after-quote.csv line 5: has text after the closing " of a quoted field; put the whole field inside the quotes'],
  ['non-numeric.csv', [], 1, 'non-numeric.csv line 6, column "mean": must be a finite number, got "abc"'],
  ['unit-in-cell.csv', [], 1, 'unit-in-cell.csv line 6, column "mean": must be a finite number, got "15.55 mm" (remove the unit or text after the number)'],
  ['unicode-minus.csv', [], 1, 'unicode-minus.csv line 6, column "mean": must be a finite number, got "−1.5" (write the minus sign as "-")'],
  ['decimal-comma-not-asked.csv', [], 1, 'decimal-comma-not-asked.csv line 3, column "mean": must be a finite number, got "14,65" (for a decimal comma use --decimal-comma)'],
  ['not-a-number.csv', [], 1, 'not-a-number.csv line 4, column "sd": must be a finite number, got "NaN"'],
  ['infinite.csv', [], 1, 'infinite.csv line 4, column "sd": must be a finite number, got "Infinity"'],
  ['overflow.csv', [], 1, 'overflow.csv line 4, column "mean": must be a finite number, got "1e999"'],
  ['out-of-range.csv', [], 1, 'out-of-range.csv line 4, column "sd": is outside the range the tool computes with (magnitude 1e-100 to 1e100, or 0), got "1e200"; rescale the column'],
  ['negative-sd.csv', [], 1, 'negative-sd.csv line 7, column "sd": must be zero or positive, got "-0.4"'],
  ['negative-var.csv', [], 1, 'negative-var.csv line 7, column "var": must be zero or positive, got "-0.16"'],
  ['n-zero.csv', [], 1, 'n-zero.csv line 8, column "n": must be a whole number of specimens of at least 1, got "0"'],
  ['n-fraction.csv', [], 1, 'n-fraction.csv line 8, column "n": must be a whole number of specimens of at least 1, got "2.5"'],
  ['n-one-without-pool.csv', [], 1, 'n-one-without-pool.csv line 8, column "n": n = 1 gives no within-horizon variance; use --pool to pool variances over the lineage'],
  // Issue 18: an empty sd where n = 1 is what a spreadsheet leaves; the message says --pool handles it.
  ['n-one-empty-sd-without-pool.csv', [], 1, 'n-one-empty-sd-without-pool.csv line 8, column "sd": is empty where n = 1 (one specimen has no standard deviation), got ""; --pool handles this: it pools the within-horizon variance over the lineage, to which such a horizon adds nothing'],
  // Issue 18 item 1: an unread column that splits the rows into groups overlapping in time, and two candidate section columns.
  ['hidden-sections.csv', [], 1, 'hidden-sections.csv line 6, column "station": splits the rows of trait "x" into groups that overlap in time ("A" at age 7 to 10, "B" at age 7.5 to 9.5), got "B"; the file has no section column, so they would be fitted as one lineage. If they are sections, rename "station" to "section" (or core, site, hole, borehole, locality, outcrop); if the file is one section, add a "section" column'],
  ['two-section-names.csv', [], 1, 'two-section-names.csv line 1, column "hole": has 2 columns that could name the section and no "section" column, got "site" and "hole"; rename the one whose values tell sections apart to "section" (the others are then left unread)'],
  ['too-few-horizons.csv', [], 1, 'too-few-horizons.csv line 2: lineage "Korrin Gap / rib count" has 2 horizons; at least 3 are needed to fit any model'],
  ['exact-copy-row.csv', [], 1, 'exact-copy-row.csv line 5, column "age": lineage "Korrin Gap / rib count": this row repeats line 4 exactly (same age, n, mean and spread), got age "9.1"; remove the copy'],
  ['empty-cell.csv', [], 1, 'empty-cell.csv line 5, column "n": is empty, expected a number'],
  ['log-of-negative.csv', ['--log'], 1, 'log-of-negative.csv line 5, column "mean": must be positive to take its logarithm (--log), got "-2"'],
  ['binary.csv', [], 1, 'binary.csv: looks like a binary file (contains NUL bytes), expected comma-separated text'],
  ['utf16.csv', [], 1, 'utf16.csv: is UTF-16 text (a spreadsheet "Unicode text" export); save it as "CSV UTF-8"'],
  ['workbook.xlsx', [], 1, 'workbook.xlsx: looks like a spreadsheet workbook or zip archive, expected comma-separated text; export the sheet as CSV'],
  ['latin1.csv', [], 1, 'latin1.csv line 5: is not UTF-8 text (an invalid byte sequence on this line, e.g. a Latin-1 accented letter); save the file as "CSV UTF-8"'],
  ['specimen-covariate-differs.csv', [], 1, 'specimen-covariate-differs.csv line 5, column "covariate": differs within the horizon at age 2 (line 4 has "6"), got "7"; give one covariate value per horizon'],
  ['specimen-single-specimens.csv', [], 1, 'specimen-single-specimens.csv line 2, column "value": n = 1 gives no within-horizon variance; use --pool to pool variances over the lineage'],
  ['mixed-forms.csv', [], 1, 'mixed-forms.csv line 1, column "n": has "value" (one row per specimen) and also "n" (one row per horizon), got both forms; if each row summarises a horizon, rename "value" to "mean", otherwise remove that column'],
  ['missing-file.csv', [], 1, 'missing-file.csv: no such file'],
  ['clean.csv', ['--delimiter', 'xx'], 2, '--delimiter must be one character, "tab", "comma" or "semicolon", got "xx"'],
  ['clean.csv', ['--time-unit', ' '], 2, '--time-unit must name a unit (Ma, ka, yr or any label), got ""'],
];

/** Options as the CLI would pass them for these flags. */
function optionsOf(args: readonly string[]): SampleFileOptions {
  const options: SampleFileOptions = {};
  for (let i = 0; i < args.length; i++) {
    if (args[i] === '--log') options.log = true;
    if (args[i] === '--pool') options.pool = true;
    if (args[i] === '--decimal-comma') options.decimalComma = true;
    if (args[i] === '--delimiter') options.delimiter = args[++i];
    if (args[i] === '--time-unit') options.timeUnit = args[++i];
  }
  return options;
}

function wholeFileMessage(path: string, name: string, args: readonly string[]): { message: string; kind: string } {
  try {
    const input = readInput(path);
    loadLineages({ ...input, name }, optionsOf(args), new WarningLog());
  } catch (error) {
    if (error instanceof InputError) return { message: error.message.split(path).join(name), kind: error.kind };
    throw error;
  }
  return { message: '(accepted)', kind: 'none' };
}

describe('malformed corpus through the real CLI (streaming reader)', () => {
  it.each(cases)('%s', async (file, args, exitCode, message) => {
    const run = await runCliHere(['fit', file, ...args], corpus);
    expect(run.stderr).toBe(`stratotrend: ${message}\n`);
    expect(run.status).toBe(exitCode);
    expect(run.stdout).toBe('');
    expect(run.stderr).not.toMatch(/\n\s+at /); // no stack trace without --debug
  });
});

describe('malformed corpus through the whole-file reader (same messages)', () => {
  it.each(cases.filter(([file]) => file !== 'missing-file.csv'))('%s', async (file, args, exitCode, message) => {
    const { message: got, kind } = wholeFileMessage(join(corpus, file), file, args);
    expect(got).toBe(message);
    expect(kind).toBe(exitCode === 2 ? 'usage' : 'data');
  });
});

describe('refusals of files made at test time', () => {
  const folder = mkdtempSync(join(tmpdir(), 'stratotrend-malformed-'));

  it('a line longer than 1,000,000 characters is refused with its line number', async () => {
    const path = join(folder, 'long-line.csv');
    writeFileSync(path, `age,n,mean,sd\n1,5,2,0.1\n2,5,${'9'.repeat(1_000_001)},0.1\n3,5,2,0.1\n`);
    const message = 'long-line.csv line 3: line is longer than 1000000 characters, too long to be a record';
    const run = await runCliHere(['fit', 'long-line.csv'], folder);
    expect(run.stderr).toBe(`stratotrend: ${message}\n`);
    expect(run.status).toBe(1);
    expect(wholeFileMessage(path, 'long-line.csv', []).message).toBe(message);
  });

  it('a NUL byte far into a large file is found by the streaming reader', async () => {
    const path = join(folder, 'late-nul.csv');
    const rows = Array.from({ length: 40_000 }, (_, i) => `${(i % 7) + 1},${(i % 13) / 10}`).join('\n');
    writeFileSync(path, `age,value\n${rows}\n\u0000\n`);
    const run = await runCliHere(['fit', 'late-nul.csv'], folder);
    expect(run.stderr).toBe('stratotrend: late-nul.csv: looks like a binary file (contains NUL bytes), expected comma-separated text\n');
    expect(run.status).toBe(1);
  });

  it('stdin is read the same way ("-" names it stdin)', async () => {
    const run = runCli(['fit', '-'], folder, 'age,n,mean,sd\n1,5,2,-1\n');
    expect(run.stderr).toBe('stratotrend: stdin line 2, column "sd": must be zero or positive, got "-1"\n');
    expect(run.status).toBe(1);
  });

  it('a stack trace appears only with --debug', async () => {
    const run = await runCliHere(['fit', 'negative-sd.csv', '--debug'], corpus);
    expect(run.status).toBe(1);
    expect(run.stderr.split('\n')[0]).toBe('stratotrend: negative-sd.csv line 7, column "sd": must be zero or positive, got "-0.4"');
    expect(run.stderr).toMatch(/\n\s+at /);
  });
});
