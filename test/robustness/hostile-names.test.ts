/**
 * Names that reach a terminal or a spreadsheet (issue 23).
 *
 * Control characters: the Unicode Standard's general category Cc is
 * U+0000–U+001F, U+007F and U+0080–U+009F (C0, DEL, C1); ESC (U+001B) starts
 * an ECMA-48 (ANSI) control sequence and U+009B is the one-character C1 form of
 * CSI (ECMA-48; the code points are from memory, common practice). A name holding one is refused
 * with file, line and column, and no control character reaches stdout or
 * stderr.
 *
 * Formulas: the OWASP "CSV Injection" page lists the cell starts a
 * spreadsheet reads as a formula (=, +, -, @, tab, carriage return) and
 * advises a leading apostrophe. The CSV outputs are read back here with
 * csv-parse (a reference RFC 4180 reader, not the tool's writer), so the
 * checks are on the cells a spreadsheet would see.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/data/errors.js';
import { WarningLog } from '../../src/data/warnings.js';
import { loadLineages, readInput } from '../../src/analyses/input.js';
import { neutraliseFormula } from '../../src/data/names.js';
import { root } from './cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-hostile-names-'));

/** Twelve horizons of the invented sample file, under the given section and trait names (cells as written, quoted when needed). */
function sampleRows(section: string, trait: string): string[] {
  const lines = readFileSync(join(root, 'sample-data', 'shell-length.csv'), 'utf8').trim().split('\n').slice(1, 13);
  const quote = (text: string): string => (/[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text);
  return lines.map((line) => [quote(section), quote(trait), ...line.split(',').slice(2)].join(','));
}

function write(name: string, text: string): string {
  const path = join(folder, name);
  writeFileSync(path, text);
  return path;
}

/** The message of the whole-file reader (readInput + loadLineages), the other path beside the CLI's streaming reader. */
function wholeFileMessage(path: string): string {
  try {
    loadLineages(readInput(path), {}, new WarningLog());
  } catch (error) {
    if (error instanceof InputError) return error.message;
    throw error;
  }
  return '(accepted)';
}

// Any C0, DEL or C1 character (Unicode general category Cc).
const anyControl = /[\u0000-\u0009\u000b-\u001f\u007f-\u009f]/;

describe('control characters in names are refused with line and column', () => {
  const cases: Array<[string, string, string, string]> = [
    // [file, section, trait, expected message after the path]
    ['esc-section.csv', '\u001b[31mKorrin', 'length', ' line 2, column "section": contains the control character U+001B (ESC) at character 1, got "\\u001b[31mKorrin"; names must be printable text (a terminal would act on the character)'],
    ['csi-trait.csv', 'Korrin', 'len\u009b2J', ' line 2, column "trait": contains the control character U+009B (CSI) at character 4, got "len\\u009b2J"; names must be printable text (a terminal would act on the character)'],
    ['del-trait.csv', 'Korrin', 'wid\u007fth', ' line 2, column "trait": contains the control character U+007F (DEL) at character 4, got "wid\\u007fth"; names must be printable text (a terminal would act on the character)'],
    ['vt-section.csv', 'Korrin\u000bGap', 'length', ' line 2, column "section": contains the control character U+000B (VT) at character 7, got "Korrin\\u000bGap"; names must be printable text (a terminal would act on the character)'],
    ['bell-section.csv', 'Korrin\u0007', 'length', ' line 2, column "section": contains the control character U+0007 (BEL) at character 7, got "Korrin\\u0007"; names must be printable text (a terminal would act on the character)'],
  ];

  it.each(cases)('%s: the streaming reader (CLI) and the whole-file reader give the same one line, exit 1', async (file, section, trait, message) => {
    const path = write(file, `section,trait,age,n,mean,sd\n${sampleRows(section, trait).join('\n')}\n`);
    const run = await runCliHere(['fit', path, '--no-intervals'], folder);
    expect(run.status).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toBe(`stratotrend: ${path}${message}\n`);
    expect(run.stderr.slice(0, -1)).not.toMatch(anyControl);
    expect(wholeFileMessage(path)).toBe(`${path}${message}`);
  });

  it('a carriage return inside a quoted name (which could overwrite the line a terminal shows) is refused too', async () => {
    const path = write('cr-section.csv', `section,trait,age,n,mean,sd\n${sampleRows('Korrin\rGap', 'length').join('\n')}\n`);
    const run = await runCliHere(['fit', path], folder);
    expect(run.status).toBe(1);
    // The line is that of csv-parse's record count, which ends the quoted record on the line after the CR (both readers alike).
    expect(run.stderr).toContain('column "section": contains the control character U+000D (CR) at character 7, got "Korrin\\rGap"');
    expect(run.stderr.slice(0, -1)).not.toMatch(anyControl);
    expect(wholeFileMessage(path)).toBe(run.stderr.slice('stratotrend: '.length, -1));
  });

  it('a later row is named by its own line (the first rows are clean)', async () => {
    const rows = sampleRows('Korrin', 'length');
    rows[6] = rows[6].replace('Korrin', 'Korrin\u001b]0;title\u0007');
    const path = write('late.csv', `section,trait,age,n,mean,sd\n${rows.join('\n')}\n`);
    const run = await runCliHere(['fit', path], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain(`${path} line 8, column "section": contains the control character U+001B (ESC) at character 7`);
    expect(run.stderr.slice(0, -1)).not.toMatch(anyControl);
  });

  it('an age model whose section name holds ESC is refused naming its line', async () => {
    const ties = write('ties-esc.csv', 'section,height,age\n\u001b[2JA,0,10\n\u001b[2JA,50,8\n');
    const samples = write('heights.csv', 'section,trait,height,n,mean,sd\nA,len,0,5,1,0.2\nA,len,10,5,1.1,0.2\nA,len,20,5,1.3,0.2\n');
    const run = await runCliHere(['fit', samples, '--age-model', ties], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toBe(`stratotrend: ${ties} line 2, column "section": contains the control character U+001B (ESC) at character 1, got "\\u001b[2JA"; names must be printable text (a terminal would act on the character)\n`);
  });

  it('a covariate file whose section name holds a C1 character is refused naming its line', async () => {
    const covariates = write('covariates-c1.csv', 'section,age,covariate\nKorrin\u0085,12.4,1\n');
    const samples = write('clean.csv', `section,trait,age,n,mean,sd\n${sampleRows('Korrin', 'length').join('\n')}\n`);
    const run = await runCliHere(['fit', samples, '--covariate-file', covariates, '--models', 'covariate-stasis', '--no-intervals'], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain(`${covariates} line 2, column "section": contains the control character U+0085 at character 7, got "Korrin\\u0085"`);
  });

  it('--time-unit and --trait-unit labels with a control character are usage errors (exit 2), printed escaped', async () => {
    const samples = write('clean-units.csv', `section,trait,age,n,mean,sd\n${sampleRows('Korrin', 'length').join('\n')}\n`);
    const time = await runCliHere(['fit', samples, '--time-unit', 'Myr\u001b[8m'], folder);
    expect(time.status).toBe(2);
    expect(time.stderr).toBe('stratotrend: --time-unit must be one line of text without control characters, got "Myr\\u001b[8m"\n');
    const trait = await runCliHere(['fit', samples, '--trait-unit', 'mm\u009b8m'], folder);
    expect(trait.status).toBe(2);
    expect(trait.stderr).toBe('stratotrend: --trait-unit must be one line of text without control characters, got "mm\\u009b8m"\n');
    const simulated = await runCliHere(['simulate', '--time-unit', 'kyr\u001b[8m', '--parameters', 'ancestral_mean=0,drift=0.1,step_variance=0.01'], folder);
    expect(simulated.status).toBe(2);
    expect(simulated.stderr).toBe('stratotrend: --time-unit must be one line of text without control characters, got "kyr\\u001b[8m"\n');
  });
});

describe('CSV outputs: text cells that a spreadsheet would run as a formula get a leading apostrophe', () => {
  const hostileSection = '=HYPERLINK("http://example.invalid","open")';
  const samples = write('formula-names.csv', `section,trait,age,n,mean,sd\n${[...sampleRows(hostileSection, '-width'), ...sampleRows('@Tor', '-width')].join('\n')}\n`);

  it('neutraliseFormula: the OWASP starts =, +, -, @, tab, CR get an apostrophe; other text is unchanged', async () => {
    for (const start of ['=', '+', '-', '@', '\t', '\r']) expect(neutraliseFormula(`${start}x`)).toBe(`'${start}x`);
    for (const text of ['Korrin Gap', "'quoted", ' =spaced', '', 'a=b', 'x-1']) expect(neutraliseFormula(text)).toBe(text);
  });

  it('fit --out: models.csv cells are neutralised, negative numbers stay numbers, fit.json keeps the names exactly', async () => {
    const out = join(folder, 'fit-out');
    const run = await runCliHere(['fit', samples, '--out', out, '--no-figures', '--no-intervals', '--quiet'], folder);
    expect(run.status).toBe(0);
    const rows = parse(readFileSync(join(out, 'models.csv'), 'utf8'), { columns: true }) as Record<string, string>[];
    expect(new Set(rows.map((row) => row.section))).toEqual(new Set([`'${hostileSection}`, "'@Tor"]));
    expect(new Set(rows.map((row) => row.trait))).toEqual(new Set(["'-width"]));
    // No text cell of the file starts a formula.
    for (const row of rows) for (const cell of Object.values(row)) if (!/^-?\d/.test(cell)) expect(cell).not.toMatch(/^[=+@\t\r-]/);
    // The numbers: a negative logLik is written as a plain number (no apostrophe) and reads back as the fit.json value.
    const document = JSON.parse(readFileSync(join(out, 'fit.json'), 'utf8')) as { lineages: { section: string; trait: string; models: { id: string; logLik: number | null }[] }[] };
    expect(document.lineages.map((lineage) => lineage.section)).toEqual([hostileSection, '@Tor']);
    expect(document.lineages.map((lineage) => lineage.trait)).toEqual(['-width', '-width']);
    const negative = rows.filter((row) => row.logLik.startsWith('-'));
    expect(negative.length).toBeGreaterThan(0);
    for (const row of negative) {
      const lineage = document.lineages[row.section === "'@Tor" ? 1 : 0];
      expect(Number(row.logLik)).toBe(lineage.models.find((model) => model.id === row.model)!.logLik);
    }
  });

  it('compare --out: compare.csv and compare-estimates.csv neutralise the trait name; estimates below 0 stay numbers', async () => {
    const two = write('formula-two-sections.csv', `section,trait,age,n,mean,sd\n${[...sampleRows('Korrin', '+width'), ...sampleRows('Tor', '+width')].join('\n')}\n`);
    const out = join(folder, 'compare-out');
    const run = await runCliHere(['compare', two, '--out', out, '--no-figure', '--no-intervals', '--models', 'stasis,random-walk'], folder);
    expect(run.status).toBe(0);
    const comparison = parse(readFileSync(join(out, 'compare.csv'), 'utf8'), { columns: true }) as Record<string, string>[];
    expect(new Set(comparison.map((row) => row.trait))).toEqual(new Set(["'+width"]));
    const estimates = parse(readFileSync(join(out, 'compare-estimates.csv'), 'utf8'), { columns: true }) as Record<string, string>[];
    expect(new Set(estimates.map((row) => row.trait))).toEqual(new Set(["'+width"]));
    const logLiks = comparison.map((row) => row.logLik).filter((cell) => cell !== '');
    expect(logLiks.length).toBeGreaterThan(0);
    for (const cell of logLiks) expect(Number.isFinite(Number(cell))).toBe(true);
  });

  it('simulate: the samples CSV neutralises names too, and its negative means stay numbers', async () => {
    const run = await runCliHere(['simulate', samples, '--model', 'random-walk', '--parameters', 'ancestral_mean=-5,step_variance=0.01', '--seed', '3'], folder);
    expect(run.status).toBe(0);
    const rows = parse(run.stdout, { columns: true }) as Record<string, string>[];
    expect(new Set(rows.map((row) => row.section))).toEqual(new Set([`'${hostileSection}`, "'@Tor"]));
    expect(new Set(rows.map((row) => row.trait))).toEqual(new Set(["'-width"]));
    for (const row of rows) {
      expect(row.mean).toMatch(/^-\d/);
      expect(Number.isFinite(Number(row.mean))).toBe(true);
    }
  });
});

// Invisible formatting characters (Unicode general category Cf): the
// bidirectional embedding/override/isolate controls U+202A–U+202E and
// U+2066–U+2069 reorder the text displayed after them (Boucher & Anderson 2021,
// "Trojan Source", CVE-2021-42574), and U+200B / U+2060 / U+FEFF are invisible,
// so two different names would look the same. Code points from the Unicode
// Standard's Cf list (from memory, common practice).
describe('invisible formatting characters in names are refused with line and column', () => {
  const invisible = /[\u202a-\u202e\u2066-\u2069\u200b\u2060\ufeff]/;
  const cases: Array<[string, string, string, string]> = [
    ['rlo-section.csv', 'Korrin\u202eGap', 'length', ' line 2, column "section": contains the invisible formatting character U+202E (RIGHT-TO-LEFT OVERRIDE) at character 7, got "Korrin\\u202eGap"; names must be visible text (it would reorder what is shown after it, or make two different names look the same)'],
    ['isolate-trait.csv', 'Korrin', '\u2066length', ' line 2, column "trait": contains the invisible formatting character U+2066 (LEFT-TO-RIGHT ISOLATE) at character 1, got "\\u2066length"; names must be visible text (it would reorder what is shown after it, or make two different names look the same)'],
    ['zwsp-section.csv', 'Korrin\u200b', 'length', ' line 2, column "section": contains the invisible formatting character U+200B (ZERO WIDTH SPACE) at character 7, got "Korrin\\u200b"; names must be visible text (it would reorder what is shown after it, or make two different names look the same)'],
  ];

  it.each(cases)('%s: both readers give the same one line, with the character escaped, exit 1', async (file, section, trait, message) => {
    const path = write(file, `section,trait,age,n,mean,sd\n${sampleRows(section, trait).join('\n')}\n`);
    const run = await runCliHere(['fit', path, '--no-intervals'], folder);
    expect(run.status).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toBe(`stratotrend: ${path}${message}\n`);
    expect(run.stderr).not.toMatch(invisible);
    expect(wholeFileMessage(path)).toBe(`${path}${message}`);
  });

  it('--time-unit, --trait-unit and --trait-title labels holding one are usage errors (exit 2), printed escaped', async () => {
    const samples = write('clean-labels.csv', `section,trait,age,n,mean,sd\n${sampleRows('Korrin', 'length').join('\n')}\n`);
    const time = await runCliHere(['fit', samples, '--no-intervals', '--time-unit', 'Myr\u202e'], folder);
    expect(time.status).toBe(2);
    expect(time.stderr).toBe('stratotrend: --time-unit must be visible text; it holds the invisible formatting character U+202E (RIGHT-TO-LEFT OVERRIDE) at character 4, got "Myr\\u202e"\n');
    const trait = await runCliHere(['fit', samples, '--no-intervals', '--trait-unit', 'length=m\u200bm'], folder);
    expect(trait.status).toBe(2);
    expect(trait.stderr).toBe('stratotrend: --trait-unit must be visible text; it holds the invisible formatting character U+200B (ZERO WIDTH SPACE) at character 2, got "length=m\\u200bm"\n');
    const title = await runCliHere(['fit', samples, '--no-intervals', '--out', join(folder, 'titled'), '--trait-title', '\u2066Shell length'], folder);
    expect(title.status).toBe(2);
    expect(title.stderr).toBe('stratotrend: --trait-title must be visible text; it holds the invisible formatting character U+2066 (LEFT-TO-RIGHT ISOLATE) at character 1, got "\\u2066Shell length"\n');
    for (const run of [time, trait, title]) expect(run.stderr).not.toMatch(invisible);
  });

  it('names in scripts that use the zero-width joiners and direction marks in ordinary words are accepted', () => {
    // U+200C ZERO WIDTH NON-JOINER is part of ordinary Persian spelling; U+200F RIGHT-TO-LEFT MARK of right-to-left text.
    const path = write('persian.csv', `section,trait,age,n,mean,sd\n${sampleRows('\u0645\u06cc\u200c\u0631\u0648\u062f', 'length \u200f').join('\n')}\n`);
    expect(wholeFileMessage(path)).toBe('(accepted)');
  });
});
