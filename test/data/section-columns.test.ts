/**
 * Issue 18 item 1: the section column under the trade's usual names, and a
 * refusal when a file has no section column but another column splits the
 * rows into groups that overlap in time (two cores would otherwise be fitted
 * as one lineage). The names are common practice (field workers: section,
 * locality, outcrop; deep-sea and borehole workers: core, site, hole,
 * borehole). Exact messages of the refusals are in
 * test/robustness/malformed.test.ts (hidden-sections.csv, two-section-names.csv).
 */
import { describe, expect, it } from 'vitest';
import { readAgeModel } from '../../src/data/age-model.js';
import { InputError } from '../../src/data/errors.js';
import { readTable } from '../../src/data/read-table.js';
import { readSamples, sectionColumnNames } from '../../src/data/samples.js';
import { streamSampleFile } from '../../src/data/stream-samples.js';
import { Readable } from 'node:stream';

// The two-core file of the issue, with its section column under each name.
const coreRows = 'A,x,10,20,5.0,1\nA,x,9,20,5.2,1\nA,x,8,20,5.1,1\nA,x,7,20,5.4,1\nB,x,9.5,20,7.0,1\nB,x,8.5,20,7.1,1\nB,x,7.5,20,6.9,1\n';

function samplesOf(text: string) {
  return readSamples(readTable(text, 'file.csv'));
}

function refusal(text: string): InputError {
  try {
    samplesOf(text);
  } catch (error) {
    if (error instanceof InputError) return error;
    throw error;
  }
  throw new Error('accepted');
}

describe('the section column (issue 18 item 1)', () => {
  it.each(sectionColumnNames.map((name) => [name]))('"%s" separates the two cores of the issue', (name) => {
    const records = samplesOf(`${name},trait,age,n,mean,sd\n${coreRows}`).records;
    expect(records.map((record) => record.section)).toEqual(['A', 'A', 'A', 'A', 'B', 'B', 'B']);
  });

  it('any letter case ("Core", "SITE")', () => {
    expect(samplesOf(`Core,trait,age,n,mean,sd\n${coreRows}`).records[4].section).toBe('B');
    expect(samplesOf(`SITE,trait,age,n,mean,sd\n${coreRows}`).records[4].section).toBe('B');
  });

  it('"section" wins over another name, which is then left unread', () => {
    const records = samplesOf(`section,core,trait,age,n,mean,sd\n${coreRows.replace(/^(\w),/gm, 'S,$1,')}`).records;
    expect(new Set(records.map((record) => record.section))).toEqual(new Set(['S']));
  });

  it('an unread column whose groups overlap in time is refused, naming the column, line and value', () => {
    const error = refusal(`station,trait,age,n,mean,sd\n${coreRows}`);
    expect(error.message).toMatch(/^file\.csv line 6, column "station": splits the rows of trait "x" into groups that overlap in time/);
    expect(error.message).toContain('got "B"');
  });

  it('the same refusal from the streaming reader', async () => {
    await expect(streamSampleFile(Readable.from([`station,trait,age,n,mean,sd\n${coreRows}`]), 'file.csv')).rejects.toThrow('file.csv line 6, column "station": splits the rows');
  });

  it('groups that only touch (a unit boundary), groups of different traits, and columns with a value per row are not refused', () => {
    const touching = 'unit,age,n,mean,sd\nlower,10,5,1,1\nlower,9,5,1,1\nlower,8,5,1,1\nupper,8,5,1.2,1\nupper,7,5,1,1\nupper,6,5,1,1\n';
    expect(samplesOf(touching).records).toHaveLength(6);
    const traits = 'tag,trait,age,n,mean,sd\nA,x,10,5,1,1\nA,x,9,5,1,1\nA,x,8,5,1,1\nB,y,9.5,5,1,1\nB,y,8.5,5,1,1\nB,y,7.5,5,1,1\n';
    expect(samplesOf(traits).records).toHaveLength(6);
    const notes = `sample,trait,age,n,mean,sd\n${coreRows.replace(/^(\w),/gm, () => 'S,').split('\n').map((row, i) => row.replace(/^S,/, `s${i},`)).join('\n')}`;
    expect(samplesOf(notes).records).toHaveLength(7);
    // Fewer than 3 horizons in a group cannot be a lineage of its own.
    const pair = 'batch,age,n,mean,sd\nA,10,5,1,1\nA,8,5,1,1\nB,9,5,1,1\nB,7,5,1,1\nB,6,5,1,1\n';
    expect(samplesOf(pair).records).toHaveLength(5);
  });

  it('two other names and no "section" column: refused', () => {
    expect(refusal(`site,hole,trait,age,n,mean,sd\n${coreRows.replace(/^(\w),/gm, '1208,$1,')}`).message).toContain('got "site" and "hole"');
  });

  it('an age model reads the same names', () => {
    const model = readAgeModel(readTable('core;depth;age\nA;0;1,0\nA;70;4,4\nB;0;1,5\nB;50;3,0\n', 'ties.csv'), { decimalComma: true });
    expect([...model.sections.keys()]).toEqual(['A', 'B']);
    expect(model.sections.get('B')?.map((tie) => tie.age)).toEqual([3, 1.5]);
  });
});
