/**
 * Issue 24: a section or trait name written in its two Unicode forms —
 * precomposed "é" (U+00E9) and "e" + combining acute (U+0065 U+0301), which
 * print alike — is one lineage. Names are put in normalisation form C
 * (Unicode Standard Annex #15: NFC of U+0065 U+0301 is U+00E9) by both
 * readers, the age model and the --trait-unit option.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ageFunction, readAgeModel } from '../../src/data/age-model.js';
import { readTable } from '../../src/data/read-table.js';
import { readSamples } from '../../src/data/samples.js';
import { streamSampleFile } from '../../src/data/stream-samples.js';
import { buildLineages } from '../../src/lineage.js';
import { traitUnitFor, traitUnitOption } from '../../src/analyses/input.js';

const composed = 'Caf\u00e9';
const decomposed = 'Cafe\u0301';

// Invented data: two forms of one section name and of one trait name, alternating by row.
const text = [
  'section,trait,age,n,mean,sd',
  `${composed},r\u00e9sum\u00e9 width,10,12,4.1,0.5`,
  `${decomposed},re\u0301sume\u0301 width,9,12,4.3,0.5`,
  `${composed},re\u0301sume\u0301 width,8,12,4.2,0.5`,
  `${decomposed},r\u00e9sum\u00e9 width,7,12,4.6,0.5`,
].join('\n') + '\n';

describe('names in either Unicode form are one lineage', () => {
  it('the forms differ as strings but are equal in NFC (UAX #15)', () => {
    expect(composed).not.toBe(decomposed);
    expect(decomposed.normalize('NFC')).toBe(composed);
  });

  it('whole-file reader: one lineage of four horizons, named in NFC', () => {
    const lineages = buildLineages(readSamples(readTable(text, 'cafe.csv')));
    expect(lineages.map((lineage) => [lineage.section, lineage.trait, lineage.time.length])).toEqual([[composed, 'r\u00e9sum\u00e9 width', 4]]);
  });

  it('streaming reader: the same', async () => {
    const folder = mkdtempSync(join(tmpdir(), 'stratotrend-nfc-'));
    writeFileSync(join(folder, 'cafe.csv'), text);
    const streamed = await streamSampleFile(join(folder, 'cafe.csv'), 'cafe.csv');
    const lineages = buildLineages(streamed.samples);
    expect(lineages.map((lineage) => [lineage.section, lineage.trait, lineage.time.length])).toEqual([[composed, 'r\u00e9sum\u00e9 width', 4]]);
  });

  it('age-model ties and --trait-unit entries match whichever form they use', () => {
    const ties = readAgeModel(readTable(`section,height,age\n${decomposed},0,10\n${decomposed},50,8\n`, 'ties.csv'));
    expect(ageFunction(ties)(composed, 25, 2)).toEqual({ age: 9, extrapolated: false });
    const units = traitUnitOption([`re\u0301sume\u0301 width=mm`]);
    expect(traitUnitFor(units, 'r\u00e9sum\u00e9 width')).toBe('mm');
  });
});
