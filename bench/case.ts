import { runsAsCommand } from './command-line.js';
/**
 * One benchmark case run in a process of its own, so its peak memory (VmHWM)
 * is its own: `node dist/bench/case.js <case> '<json arguments>'` prints one
 * JSON line with the measurements. Run by bench/run.ts.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadLineages, readInput } from '../src/analyses/input.js';
import { WarningLog } from '../src/data/warnings.js';
import { fitLineage, type LineageFit } from '../src/fit/fit-lineage.js';
import { classicModels } from '../src/models/registry.js';
import { fitLineages } from '../src/parallel/fit-lineages.js';
import { peakResidentBytes } from './memory.js';
import { batchCsv, benchLineage } from './workload.js';

/** Peak resident memory of this process so far, in MiB (see memory.ts). */
export function peakMemoryMiB(): number {
  return peakResidentBytes() / 2 ** 20;
}

/** A digest of fits (logL and every estimate and interval end), to show threaded output equals sequential. */
export function fitsDigest(fits: readonly LineageFit[]): string {
  const hash = createHash('sha256');
  for (const fit of fits) {
    hash.update(`${fit.best}|`);
    for (const model of fit.models) {
      hash.update(`${model.id}:${model.logLik}:${model.aicc}:${model.weight}`);
      for (const [name, value] of Object.entries(model.parameters)) hash.update(`${name}=${value.estimate},${value.lower},${value.upper}`);
    }
  }
  return hash.digest('hex').slice(0, 16);
}

/** Fit the five classic models (the `fit` command's work) to one invented lineage of `horizons` horizons. */
function fitCase(args: { horizons: number; intervals: boolean; seed?: number }): Record<string, unknown> {
  const lineage = benchLineage(args.horizons, args.seed ?? 20260, 4);
  const started = performance.now();
  const cpu = process.cpuUsage();
  const fit = fitLineage(lineage, classicModels, { intervals: args.intervals });
  const milliseconds = performance.now() - started;
  const used = process.cpuUsage(cpu);
  return {
    horizons: args.horizons,
    intervals: args.intervals,
    milliseconds,
    cpuMilliseconds: (used.user + used.system) / 1000,
    evaluations: fit.models.reduce((sum, model) => sum + model.evaluations, 0),
    best: fit.best,
    peakMemoryMiB: peakMemoryMiB(),
  };
}

/** Read a CSV of many lineages and fit them all, on `threads` threads (as `stratotrend fit` does). */
async function batchCase(args: { lineages: number; horizons: number; threads: number; intervals: boolean }): Promise<Record<string, unknown>> {
  const folder = mkdtempSync(join(tmpdir(), 'stratotrend-bench-'));
  try {
    const file = join(folder, 'batch.csv');
    writeFileSync(file, batchCsv(args.lineages, args.horizons));
    const started = performance.now();
    const cpu = process.cpuUsage();
    const lineages = loadLineages(readInput(file), { timeUnit: 'Myr' }, new WarningLog());
    const fits = await fitLineages(lineages, classicModels, { intervals: args.intervals }, { threads: args.threads });
    const seconds = (performance.now() - started) / 1000;
    // process.cpuUsage counts every thread of the process, workers included.
    const used = process.cpuUsage(cpu);
    return {
      cpuSeconds: (used.user + used.system) / 1e6,
      lineages: lineages.length,
      horizons: args.horizons,
      threads: args.threads,
      intervals: args.intervals,
      seconds,
      lineagesPerSecond: lineages.length / seconds,
      digest: fitsDigest(fits),
      peakMemoryMiB: peakMemoryMiB(),
    };
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  const [name, json] = process.argv.slice(2);
  const args = JSON.parse(json ?? '{}');
  const result = name === 'fit' ? fitCase(args) : name === 'batch' ? await batchCase(args) : null;
  if (result === null) throw new Error(`unknown benchmark case "${name}"`);
  process.stdout.write(JSON.stringify(result) + '\n');
}

if (runsAsCommand(import.meta.url)) {
  main().catch((error) => {
    process.stderr.write(`${(error as Error).stack ?? String(error)}\n`);
    process.exit(1);
  });
}
