import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { root, type CliRun } from '../../robustness/cli.js';
import { runCliHere } from '../../support/cli-in-process.js';

// The built command line (npm test builds first): `fit --report` beside
// `--out`, twice. fit.json must be byte-identical between the runs (the
// report's date lives only in the report), and the page must carry the
// numbers of that fit.json.

const folder = mkdtempSync(join(tmpdir(), 'stratotrend-report-cli-'));
const sample = join(root, 'sample-data', 'shell-length.csv');

afterAll(() => rmSync(folder, { recursive: true, force: true }));

describe('fit --report and report on the command line', () => {
  let first: CliRun;
  let second: CliRun;
  beforeAll(async () => {
    first = await runCliHere(['fit', sample, '--no-intervals', '--no-figures', '--out', join(folder, 'one'), '--report', join(folder, 'one.html')], folder);
    second = await runCliHere(['fit', sample, '--no-intervals', '--no-figures', '--out', join(folder, 'two'), '--report', join(folder, 'two.html')], folder);
  });

  it('runs, says where the report went, and keeps fit.json byte-identical across runs', async () => {
    expect(first.status).toBe(0);
    expect(second.status).toBe(0);
    expect(first.stdout).toContain(`Wrote the report to ${join(folder, 'one.html')}`);
    const one = readFileSync(join(folder, 'one', 'fit.json'));
    const two = readFileSync(join(folder, 'two', 'fit.json'));
    expect(one.equals(two)).toBe(true);
    expect(one.toString('utf8')).not.toMatch(/report made|"date"/);
  });

  it('the report records its date and shows the values of fit.json', async () => {
    const html = readFileSync(join(folder, 'one.html'), 'utf8');
    const made = html.match(/<td>report made<\/td><td><code>([^<]+)<\/code>/);
    expect(made).not.toBeNull();
    expect(Number.isNaN(Date.parse(made![1]))).toBe(false);
    const fit = JSON.parse(readFileSync(join(folder, 'one', 'fit.json'), 'utf8')) as { lineages: { models: { id: string; aicc: number }[] }[] };
    for (const model of fit.lineages[0].models) expect(html).toContain(`data-field="aicc" data-value="${model.aicc}"`);
  });

  it('report refuses an output that is not .html, and a missing input, with usage and data exit codes', async () => {
    const wrongName = await runCliHere(['report', sample, '--out', join(folder, 'report.txt')], folder);
    expect(wrongName.status).toBe(2);
    expect(wrongName.stderr).toContain('give a name ending in .html');
    const missing = await runCliHere(['report', join(folder, 'absent.csv'), '--out', join(folder, 'absent.html')], folder);
    expect(missing.status).toBe(1);
    expect(missing.stderr).toContain('absent.csv');
  });

  it('report reads a saved fit.json without refitting and names it in the provenance', async () => {
    const saved = await runCliHere(['report', join(folder, 'one', 'fit.json'), '--out', join(folder, 'saved.html')], folder);
    expect(saved.status).toBe(0);
    const html = readFileSync(join(folder, 'saved.html'), 'utf8');
    expect(html).toContain('saved fit document');
    expect(html).toContain('not refitted');
  });
});
