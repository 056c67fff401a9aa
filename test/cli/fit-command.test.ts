import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runFit } from '../../src/analyses/fit-run.js';
import { root } from '../robustness/cli.js';
import { runCliHere } from '../support/cli-in-process.js';

const sample = new URL('../../sample-data/shell-length.csv', import.meta.url).pathname;
const launcher = new URL('../../bin/stratotrend', import.meta.url).pathname;
const folder = mkdtempSync(join(tmpdir(), 'stratotrend-cli-'));

type Json = Record<string, any>;
const lineagesOf = (file: string, options: Record<string, unknown> = {}): Json[] =>
  (runFit(file, { intervals: true, ...options }).document as Json).lineages;

/** Write a variant of the sample file with each data row transformed. */
function variant(name: string, transform: (cells: string[]) => string[], reorder?: (rows: string[]) => string[]): string {
  const [header, ...rows] = readFileSync(sample, 'utf8').trim().split('\n');
  const changed = rows.map((row) => transform(row.split(',')).join(','));
  const path = join(folder, name);
  writeFileSync(path, [header, ...(reorder ? reorder(changed) : changed)].join('\n') + '\n');
  return path;
}

describe('stratotrend fit: JSON document', () => {
  const document = runFit(sample, {}).document as Json;
  it('has the fields the held-out checks read, with model ids and parameter names as in MODELS.md', () => {
    expect(document.lineages).toHaveLength(2);
    const lineage = document.lineages[0];
    expect(lineage).toMatchObject({ section: 'Varnek Draw', trait: 'shell length', horizons: 24, time_unit: 'Myr' });
    expect(lineage.models.map((model: Json) => model.id)).toEqual(['strict-stasis', 'stasis', 'random-walk', 'directional-walk', 'ou']);
    const names: Record<string, string[]> = {
      'strict-stasis': ['stasis_mean'],
      stasis: ['stasis_mean', 'stasis_variance'],
      'random-walk': ['ancestral_mean', 'step_variance'],
      'directional-walk': ['ancestral_mean', 'drift', 'step_variance'],
      ou: ['ancestral_mean', 'optimum', 'alpha', 'step_variance'],
    };
    for (const model of lineage.models) {
      expect(Object.keys(model.params)).toEqual(names[model.id]);
      expect(model.k).toBe(names[model.id].length);
      for (const key of ['logLik', 'aicc', 'delta_aicc', 'weight']) expect(typeof model[key]).toBe('number');
      for (const estimate of Object.values(model.params) as Json[]) {
        expect(Object.keys(estimate)).toEqual(expect.arrayContaining(['estimate', 'lower', 'upper']));
      }
    }
    const weights = lineage.models.map((model: Json) => model.weight);
    expect(weights.reduce((sum: number, value: number) => sum + value, 0)).toBeCloseTo(1, 12);
  });

  it('carries provenance: version, the input SHA-256 and the options', () => {
    const expected = createHash('sha256').update(readFileSync(sample)).digest('hex');
    expect(document.provenance.inputs[0].sha256).toBe(expected);
    expect(document.provenance.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(document.provenance.options).toMatchObject({ log: false, pool: false, time_unit: 'Myr', models: 'classic' });
  });

  it('finds the directional trend the invented data were generated with (sample-data/README.md)', () => {
    for (const lineage of document.lineages) expect(lineage.best_model).toBe('directional-walk');
  });
});

describe('stratotrend fit: invariances (common practice for location-scale models)', () => {
  const reference = lineagesOf(sample);
  const strip = (lineages: Json[]) => lineages.map((lineage) => ({ ...lineage, data: { ...lineage.data, line: null } }));

  it('shuffled rows give identical results', () => {
    const shuffled = variant('shuffled.csv', (cells) => cells, (rows) => rows.map((row, i) => ({ row, key: (i * 7919) % rows.length })).sort((a, b) => a.key - b.key).map(({ row }) => row));
    expect(strip(lineagesOf(shuffled))).toEqual(strip(reference));
  });

  it('adding a constant to every mean moves only the location parameters, by that constant', () => {
    const shifted = variant('shifted.csv', (cells) => cells.map((cell, column) => (column === 4 ? String(Number(cell) + 100) : cell)));
    const moved = lineagesOf(shifted);
    moved.forEach((lineage, l) => {
      lineage.models.forEach((model: Json, m: number) => {
        const before = reference[l].models[m];
        expect(model.logLik).toBeCloseTo(before.logLik, 6);
        expect(Math.abs(model.logLik - before.logLik) / Math.abs(before.logLik)).toBeLessThan(1e-8);
        for (const [name, estimate] of Object.entries(model.params) as [string, Json][]) {
          const was = before.params[name].estimate;
          if (was === null) continue;
          const offset = ['stasis_mean', 'ancestral_mean', 'optimum'].includes(name) ? 100 : 0;
          // 1e-8 relative, or for a weakly identified estimate (a flat profile,
          // e.g. ou's optimum near the random-walk limit, where double precision
          // cannot fix the maximiser more tightly) 1e-5 of its interval width.
          const width = estimate.upper !== null && estimate.lower !== null ? estimate.upper - estimate.lower : 0;
          const tolerance = Math.max(1e-8 * Math.max(1, Math.abs(was) + offset), 1e-5 * width);
          expect(Math.abs(estimate.estimate - was - offset), `${model.id} ${name} ${was} ${estimate.estimate}`).toBeLessThan(tolerance);
        }
      });
    });
  });

  it('multiplying time by 10 divides rates by 10 and leaves logL unchanged', () => {
    const stretched = variant('stretched.csv', (cells) => cells.map((cell, column) => (column === 2 ? String(Number(cell) * 10) : cell)));
    const scaled = lineagesOf(stretched);
    const perTime = ['drift', 'step_variance', 'alpha'];
    scaled.forEach((lineage, l) => {
      lineage.models.forEach((model: Json, m: number) => {
        const before = reference[l].models[m];
        expect(Math.abs(model.logLik - before.logLik) / Math.abs(before.logLik)).toBeLessThan(1e-8);
        for (const [name, estimate] of Object.entries(model.params) as [string, Json][]) {
          const was = before.params[name].estimate;
          if (was === null || was === 0) continue;
          const factor = perTime.includes(name) ? 10 : 1;
          expect(Math.abs((estimate.estimate * factor) / was - 1), `${model.id} ${name}`).toBeLessThan(1e-6);
        }
      });
    });
  });
});

// The first two only read outputs, so they run in the test process (runCliHere); the others
// go through bin/stratotrend in a child process: exit codes, stderr and stdin as a shell sees them.
describe('stratotrend fit: the command line', () => {
  it('--out writes models.csv and fit.json, and the JSON equals --json output byte for byte', async () => {
    const out = join(folder, 'out');
    const run = await runCliHere(['fit', sample, '--no-figures', '--out', out, '--json'], root);
    expect(run.status, run.stderr).toBe(0);
    const printed = run.stdout;
    expect(existsSync(join(out, 'models.csv'))).toBe(true);
    expect(readFileSync(join(out, 'fit.json'), 'utf8')).toBe(printed);
    const csv = readFileSync(join(out, 'models.csv'), 'utf8').trim().split('\n');
    expect(csv).toHaveLength(1 + 2 * 5);
    expect(csv[0].split(',').slice(0, 11)).toEqual(['section', 'trait', 'horizons', 'extrapolated_horizons', 'time_unit', 'model', 'k', 'logLik', 'aicc', 'delta_aicc', 'weight']);
    // No age model here: no horizon's age is extrapolated.
    expect(csv.slice(1).every((row) => row.split(',')[3] === '0')).toBe(true);
  });

  it('prints the table with the best model marked in words', async () => {
    const run = await runCliHere(['fit', sample], root);
    expect(run.status, run.stderr).toBe(0);
    const printed = run.stdout;
    expect(printed).toMatch(/Best supported: directional walk/);
    expect(printed).toMatch(/<- best supported/);
  });

  it('a bad cell is one line on stderr naming file, line, column and value, with exit code 1 and no stack trace', () => {
    const bad = variant('bad.csv', (cells) => (cells[2] === '12.17' ? [...cells.slice(0, 5), '-0.2'] : cells));
    const result = spawnSync('node', [launcher, 'fit', bad], { encoding: 'utf8' });
    expect(result.status).toBe(1);
    expect(result.stderr.trim()).toBe(`stratotrend: ${bad} line 3, column "sd": must be zero or positive, got "-0.2"`);
  });

  it('an unknown option is a usage error with exit code 2', () => {
    const result = spawnSync('node', [launcher, 'fit', sample, '--no-such-option'], { encoding: 'utf8' });
    expect(result.status).toBe(2);
  });

  it('reads stdin when the file is "-"', () => {
    const printed = execFileSync('node', [launcher, 'fit', '-', '--json'], { input: readFileSync(sample), encoding: 'utf8' });
    expect(JSON.parse(printed).lineages).toHaveLength(2);
  });
});
