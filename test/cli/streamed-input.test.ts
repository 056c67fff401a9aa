/**
 * Every command that reads a samples file reads it once, as a stream (issue
 * 6: specimen files of a million rows in bounded memory): never whole with
 * readFileSync, and never a second time for age-model draws or the report's
 * analyses, so standard input works everywhere. The peak memory itself is
 * measured by the benchmark (`npm run bench`), not here.
 */
import { mkdtempSync, readFileSync as realReadFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { runCli, root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

// Record every whole-file read and every streamed read (the modules under test import these names).
const reads = vi.hoisted(() => ({ whole: [] as string[], streamed: [] as string[] }));
vi.mock('node:fs', async (importOriginal) => {
  const actual = await importOriginal<typeof import('node:fs')>();
  const readFileSync = ((path: Parameters<typeof actual.readFileSync>[0], ...rest: unknown[]) => {
    if (typeof path === 'string') reads.whole.push(resolve(path));
    return (actual.readFileSync as (...args: unknown[]) => unknown)(path, ...rest);
  }) as typeof actual.readFileSync;
  return { ...actual, readFileSync, default: { ...actual, readFileSync } };
});
vi.mock('../../src/data/stream-samples.js', async (importOriginal) => {
  const actual = await importOriginal<typeof import('../../src/data/stream-samples.js')>();
  return {
    ...actual,
    streamSampleFile: (source: Parameters<typeof actual.streamSampleFile>[0], ...rest: [string, Parameters<typeof actual.streamSampleFile>[2]]) => {
      reads.streamed.push(typeof source === 'string' ? resolve(source) : 'stream');
      return actual.streamSampleFile(source, ...rest);
    },
  };
});

const { runCompare } = await import('../../src/analyses/compare-run.js');
const { simulateCommand } = await import('../../src/cli/simulate-command.js');
const { reportCommand } = await import('../../src/cli/report-command.js');
const { fitCommand } = await import('../../src/cli/fit-command.js');
const { loadSamplesStreamed } = await import('../../src/analyses/input.js');

const shellLength = join(root, 'sample-data', 'shell-length.csv');
const heights = join(root, 'sample-data', 'locality-heights.csv');
const ties = join(root, 'sample-data', 'locality-ties.csv');
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-streamed-'));

afterEach(() => {
  reads.whole.length = 0;
  reads.streamed.length = 0;
});

// The report runs give --power one step variance (--power-step-variance 0.02) instead of the
// default two (fitted estimate and its upper end): what is read, and how often, does not depend on
// it, and it halves the simulations (issue 22).
describe('samples files are streamed once by every command', () => {
  it('compare streams the samples once, even with age-model draws, and reads only the small age model whole', async () => {
    const run = await runCompare(heights, { ageModel: ties, ageDraws: '3', intervals: false, models: 'random-walk' });
    expect(run.document).toHaveProperty('traits');
    expect(reads.streamed).toEqual([heights]);
    expect(reads.whole).not.toContain(heights);
    expect(reads.whole).toContain(ties);
  });

  it('compare given the samples already read does not open the samples file at all', async () => {
    const read = await loadSamplesStreamed(shellLength, {});
    reads.streamed.length = 0;
    const given = await runCompare(join(folder, 'no-such-file.csv'), { intervals: false }, read);
    const own = await runCompare(shellLength, { intervals: false });
    expect(JSON.stringify(given.document)).toBe(JSON.stringify(own.document));
    expect(reads.streamed).toEqual([shellLength]);
  });

  it('simulate streams the design file', async () => {
    await simulateCommand(shellLength, { model: 'random-walk', out: join(folder, 'simulated.csv') });
    expect(reads.streamed).toEqual([shellLength]);
    expect(reads.whole).not.toContain(shellLength);
  });

  it('report with --compare and --power streams the samples once for the fit and both analyses', async () => {
    const out = join(folder, 'report.html');
    const write = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    try {
      await reportCommand(shellLength, { intervals: false, compare: true, power: true, powerReplicates: '20', powerStepVariance: '0.02', out });
    } finally {
      write.mockRestore();
    }
    expect(reads.streamed).toEqual([shellLength]);
    expect(reads.whole).not.toContain(shellLength);
    expect(realReadFileSync(out, 'utf8')).toMatch(/<html/i);
  });

  it('fit --age-draws streams the samples once (the draws place the same horizons again)', async () => {
    const write = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    try {
      // trendTest: false: what is read is checked, not the verdict; the report test above keeps the
      // trend test on and so checks that it reads no file (issue 22).
      await fitCommand(heights, { ageModel: ties, ageDraws: '3', intervals: false, models: 'random-walk', json: true, trendTest: false });
    } finally {
      write.mockRestore();
    }
    expect(reads.streamed).toEqual([heights]);
    expect(reads.whole).not.toContain(heights);
  });
});

// The file runs are in the test process (runCliHere); the stdin runs stay child processes with a real pipe.
describe('standard input ("-") works wherever a samples file does', () => {
  const json = (text: string): Record<string, any> => JSON.parse(text);
  const withoutInputs = (document: Record<string, any>): string => JSON.stringify({ ...document, provenance: { ...document.provenance, inputs: null } });

  it('fit --age-draws from stdin gives the same age-uncertainty summary as from the file', async () => {
    // --no-trend-test: the checks compare the age-uncertainty summary and stderr, not the verdict (issue 22).
    const args = ['--age-model', ties, '--age-draws', '4', '--no-intervals', '--json', '--no-trend-test'];
    const fromFile = await runCliHere(['fit', heights, ...args], root);
    const fromStdin = runCli(['fit', '-', ...args], root, realReadFileSync(heights));
    expect(fromStdin.stderr).toBe(fromFile.stderr);
    expect(fromStdin.status).toBe(0);
    expect(json(fromStdin.stdout).age_uncertainty).toEqual(json(fromFile.stdout).age_uncertainty);
  });

  it('compare and simulate read stdin like a file', async () => {
    const compareFile = await runCliHere(['compare', heights, '--age-model', ties, '--no-intervals', '--json'], root);
    const compareStdin = runCli(['compare', '-', '--age-model', ties, '--no-intervals', '--json'], root, realReadFileSync(heights));
    expect(compareStdin.status).toBe(0);
    expect(withoutInputs(json(compareStdin.stdout))).toBe(withoutInputs(json(compareFile.stdout)));
    const simulateFile = await runCliHere(['simulate', shellLength, '--model', 'random-walk', '--seed', '5'], root);
    const simulateStdin = runCli(['simulate', '-', '--model', 'random-walk', '--seed', '5'], root, realReadFileSync(shellLength));
    expect(simulateStdin.status).toBe(0);
    expect(simulateStdin.stdout).toBe(simulateFile.stdout);
  });

  it('report - --compare --power reads stdin once and writes the page', () => {
    const out = join(folder, 'stdin-report.html');
    // --no-trend-test: the checks read the exit, stderr and page, not the verdict (issue 22).
    const run = runCli(['report', '-', '--no-intervals', '--no-trend-test', '--compare', '--power', '--power-replicates', '20', '--power-step-variance', '0.02', '--out', out], root, realReadFileSync(shellLength));
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    expect(realReadFileSync(out, 'utf8')).toMatch(/Comparison of sections|compare/i);
  });
});
