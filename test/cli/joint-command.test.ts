import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runJoint } from '../../src/analyses/joint-run.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-joint-'));
const write = (name: string, text: string): string => {
  const path = join(folder, name);
  writeFileSync(path, text);
  return path;
};

describe('stratotrend joint: input', () => {
  it('a section with one trait is skipped with a note; the other section is fitted', async () => {
    const file = write('one-trait.csv', [
      'section,trait,age,n,mean,sd',
      'A,len,3,10,5,1', 'A,wid,3,10,2,0.5', 'A,len,2,10,5.5,1', 'A,wid,2,10,2.2,0.5', 'A,len,1,10,6,1', 'A,wid,1,10,2.1,0.5', 'A,len,0,10,6.2,1', 'A,wid,0,10,2.4,0.5',
      'B,len,3,10,5,1', 'B,len,2,10,5.1,1', 'B,len,1,10,5.3,1',
    ].join('\n'));
    const run = await runJoint(file, { models: 'independent-random-walks,correlated-random-walk' });
    expect(run.fits.map((fit) => fit.group.section)).toEqual(['A']);
    expect(run.warnings.list().some((warning) => warning.category === 'input' && warning.message.includes('section "B" has one trait'))).toBe(true);
  });

  it('horizons are the union of the traits\' ages, t from the group\'s oldest (a trait starting later is offset), missing values NaN', async () => {
    const file = write('late.csv', ['section,trait,age,n,mean,sd', 'S,a,10,10,5,1', 'S,a,9,10,5.5,1', 'S,b,9,10,2.2,0.5', 'S,a,8,10,6,1', 'S,b,7.5,10,2.1,0.5', 'S,a,7,10,6.2,1', 'S,b,7,10,2.4,0.5'].join('\n'));
    const run = await runJoint(file, { models: 'independent-stasis', intervals: false });
    const { data, position } = run.fits[0].group;
    // Hand-computed: ages 10, 9, 8, 7.5, 7 → t = 10 - age.
    expect([...position]).toEqual([10, 9, 8, 7.5, 7]);
    expect([...data.time]).toEqual([0, 1, 2, 2.5, 3]);
    expect([...data.values].map((value) => (Number.isNaN(value) ? null : value))).toEqual([5, null, 5.5, 2.2, 6, null, null, 2.1, 6.2, 2.4]);
    expect(run.fits[0].models[0].k).toBe(4);
  });

  it('traits without a common horizon: one error naming file, line and the traits', async () => {
    const file = write('apart.csv', ['section,trait,age,n,mean,sd', 'A,len,6,10,5,1', 'A,len,5,10,5,1', 'A,len,4,10,5,1', 'A,wid,3,10,2,0.5', 'A,wid,2,10,2,0.5', 'A,wid,1,10,2,0.5'].join('\n'));
    await expect(runJoint(file, {})).rejects.toThrow(/apart\.csv line 5, column "trait": traits "len" and "wid" of section "A" share no horizon/);
  });

  it('too few horizons: the error of fit, with line', async () => {
    const file = write('short.csv', ['section,trait,age,n,mean,sd', 'A,len,3,10,5,1', 'A,wid,3,10,2,0.5', 'A,len,2,10,5,1', 'A,wid,2,10,2,0.5'].join('\n'));
    await expect(runJoint(file, {})).rejects.toThrow(/short\.csv line 2: lineage "A \/ len" has 2 horizons; at least 3/);
  });

  it('a specimen measured twice for one trait: one error naming file, line, column and value', async () => {
    const file = write('twice.csv', ['section,trait,age,specimen,value', 'A,len,3,s1,5', 'A,len,3,s1,5.2', 'A,len,2,s2,5', 'A,len,1,s3,5'].join('\n'));
    await expect(runJoint(file, { pool: true })).rejects.toThrow(/twice\.csv line 3, column "specimen": specimen "s1" is measured twice for trait "len" at age 3 \(also line 2\), got "s1"/);
  });

  it('specimen rows with a specimen column: E_i = S_i / n_i (sample covariance of the specimens, common practice)', async () => {
    // Horizon at age 2: specimens (len, wid) = (1, 2), (2, 5), (4, 5): deviations (-4/3, -1/3, 5/3) and (-2, 1, 1): S_12 = 4 / 2 = 2, n = 3 (hand-computed), so E_12 = 2 / 3.
    const rows = ['section,trait,age,specimen,value'];
    const horizons: Record<string, [number, number][]> = {
      3: [[1, 1], [2, 3], [3, 4]],
      2: [[1, 2], [2, 5], [4, 5]],
      1: [[2, 1], [3, 2], [5, 6]],
      0: [[3, 3], [4, 3], [6, 8]],
    };
    for (const [age, specimens] of Object.entries(horizons)) {
      specimens.forEach(([len, wid], s) => {
        rows.push(`A,len,${age},s${age}-${s},${len}`);
        rows.push(`A,wid,${age},s${age}-${s},${wid}`);
      });
    }
    const run = await runJoint(write('specimens.csv', rows.join('\n')), { models: 'correlated-random-walk' });
    const group = run.fits[0].group;
    expect(group.samplingCovariance).toBe('estimated');
    const at = [...group.position].indexOf(2);
    expect(group.data.sampling[at * 4 + 1]).toBeCloseTo(2 / 3, 12);
    expect(group.data.sampling[at * 4 + 2]).toBeCloseTo(2 / 3, 12);
    // var(len) = 2.333..., var(wid) = 3 → e = var / 3
    expect(group.data.sampling[at * 4]).toBeCloseTo(7 / 9, 12);
    expect(group.data.sampling[at * 4 + 3]).toBeCloseTo(1, 12);
    expect((run.document.groups as { sampling_covariance: string }[])[0].sampling_covariance).toBe('estimated');
  });

  it('--traits keeps the named traits; an unknown one is a usage error', async () => {
    const file = write('three.csv', ['section,trait,age,n,mean,sd', ...[3, 2, 1, 0].flatMap((age) => [`A,a,${age},10,${5 + age},1`, `A,b,${age},10,${2 - age / 3},0.5`, `A,c,${age},10,${1 + (age % 2)},0.5`])].join('\n'));
    const run = await runJoint(file, { traits: 'c,a', models: 'independent-stasis' });
    // File order is kept whatever the order in --traits.
    expect(run.fits[0].group.traits).toEqual(['a', 'c']);
    await expect(runJoint(file, { traits: 'a,z' })).rejects.toThrow(/--traits: no trait "z"/);
  });
});

describe('stratotrend joint: outputs', () => {
  it('--threads 2 gives the same document as --threads 1 (one model per worker task)', async () => {
    const options = { models: 'independent-random-walks,correlated-random-walk,correlated-stasis', intervals: false };
    const pooled = await runJoint('sample-data/shell-shape.csv', { ...options, threads: 2 });
    const inline = await runJoint('sample-data/shell-shape.csv', { ...options, threads: 1 });
    expect(JSON.stringify(pooled.document)).toBe(JSON.stringify(inline.document));
  });

  // In the test process (runCliHere, issue 22); the bad-input test below keeps a real child process.
  it('--json has the documented layout; --out writes joint.json and joint-models.csv', async () => {
    const out = join(folder, 'out');
    const run = await runCliHere(['joint', 'sample-data/shell-shape.csv', '--json', '--out', out, '--models', 'independent-random-walks,correlated-random-walk', '--no-figures', '--no-intervals'], root);
    expect(run.status, run.stderr).toBe(0);
    const text = run.stdout;
    const document = JSON.parse(text);
    const group = document.groups[0];
    expect(Object.keys(group)).toEqual(expect.arrayContaining(['section', 'traits', 'horizons', 'observations', 'sampling_covariance', 'best_model', 'models']));
    expect(group.traits).toEqual(['shell length', 'shell width']);
    expect(group.sampling_covariance).toBe('diagonal');
    // 24 horizons, width missing at 2 (scripts/make-joint-data.mjs).
    expect(group.horizons).toBe(24);
    expect(group.observations).toBe(46);
    const model = group.models.find((entry: { id: string }) => entry.id === 'correlated-random-walk');
    expect(Object.keys(model)).toEqual(expect.arrayContaining(['id', 'label', 'k', 'logLik', 'aicc', 'delta_aicc', 'weight', 'params', 'intervals', 'flags']));
    expect(model.params.step_correlation[0][0]).toBe(1);
    expect(model.params.step_correlation[0][1]).toBeCloseTo(model.params.step_covariance[0][1] / Math.sqrt(model.params.step_covariance[0][0] * model.params.step_covariance[1][1]), 12);
    expect(JSON.parse(readFileSync(join(out, 'joint.json'), 'utf8')).groups[0].best_model).toBe(group.best_model);
    const csv = readFileSync(join(out, 'joint-models.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toBe('section,model,k,logLik,aicc,delta_aicc,weight,best,parameter,trait,trait_2,estimate');
    expect(csv.some((line) => line.includes(',step_correlation,shell width,shell length,'))).toBe(true);
  });

  it('bad input exits 1 with one line on stderr', async () => {
    const file = write('apart2.csv', ['section,trait,age,n,mean,sd', 'A,len,6,10,5,1', 'A,len,5,10,5,1', 'A,len,4,10,5,1', 'A,wid,3,10,2,0.5', 'A,wid,2,10,2,0.5', 'A,wid,1,10,2,0.5'].join('\n'));
    // In the test process (runCliHere, issue 22): the exit code and stderr are checked, not the process.
    const result = await runCliHere(['joint', file], folder);
    expect(result.status).toBe(1);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
  });
});

describe('report --joint', () => {
  // In the test process (runCliHere) and --no-trend-test: the checks read the joint block and its
  // absence, never the per-lineage trend verdict (issue 22).
  it('adds a "Traits together" block with the joint table, the correlation in words and both figures', async () => {
    const out = join(folder, 'report.html');
    const joint = await runCliHere(['report', 'sample-data/shell-shape.csv', '--joint', '--no-intervals', '--no-trend-test', '--out', out, '--quiet'], root);
    expect(joint.status, joint.stderr).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('<h2>Traits together</h2>');
    expect(html).toContain('<code>correlated-random-walk</code>');
    expect(html).toMatch(/Steps of shell length and shell width are correlated: 0\.\d+/);
    expect(html).toContain('data-block="joint-methods"');
    expect(html).toContain('data-kind="joint-panels"');
    expect(html).toContain('data-kind="joint-trajectory"');
    // Without --joint the page has no such block (behaviour unchanged).
    const plain = join(folder, 'plain.html');
    const without = await runCliHere(['report', 'sample-data/shell-shape.csv', '--no-intervals', '--no-trend-test', '--out', plain, '--quiet'], root);
    expect(without.status, without.stderr).toBe(0);
    expect(readFileSync(plain, 'utf8')).not.toContain('Traits together');
  });
});
