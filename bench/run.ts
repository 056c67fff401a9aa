/**
 * `npm run bench`: measures the engine, the fitter, batch fitting, start-up,
 * figure rendering and peak memory in one run, prints a table and writes
 * bench/results.json. `--smoke` runs a seconds-long version of every
 * measurement (what CI runs, so this script keeps working); `--out FILE`
 * writes the JSON elsewhere. Nothing here asserts anything: the numbers and
 * the targets of issue 7 are reported side by side.
 *
 * The full run also runs the exhaustive test sweeps that `npm test` only
 * samples (`sweepFiles`, through vitest with STRATOTREND_SWEEP=full: those
 * files assert, so a failure is reported as such); `--sweep` runs only them.
 *
 * Heavy cases (long fits, batches) run in child processes (bench/case.ts) so
 * that each one's peak memory is its own.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { availableParallelism, cpus, loadavg, tmpdir, totalmem } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { median } from 'simple-statistics';
import { denseLogLik } from '../src/engine/dense.js';
import { logLikAt, profileOut } from '../src/engine/gls.js';
import { allocateSums, whiten, workSize } from '../src/engine/kalman-filter.js';
import { allocateStateSpace } from '../src/engine/state-space.js';
import { LikelihoodEvaluator } from '../src/fit/evaluator.js';
import { fitLineage } from '../src/fit/fit-lineage.js';
import type { Lineage } from '../src/lineage.js';
import type { EvolutionModel } from '../src/models/model.js';
import { classicModels, findModel } from '../src/models/registry.js';
import { lineageDocument } from '../src/render/fit-document.js';
import { cpuNanosecondsPerRound, evaluationCostLines, measureEvaluationCost } from './evaluation-cost.js';
import { benchLineage } from './workload.js';

const distRoot = new URL('../', import.meta.url); // dist/
const projectRoot = new URL('../../', import.meta.url);
const smoke = process.argv.includes('--smoke');
const sweepOnly = process.argv.includes('--sweep');
const outIndex = process.argv.indexOf('--out');
const outFile = outIndex >= 0 ? process.argv[outIndex + 1] : smoke ? null : fileURLToPath(new URL('bench/results.json', projectRoot));


/**
 * CPU nanoseconds per call of `run` (this thread's user + system time, so
 * other programs on a busy machine inflate it less than wall time):
 * repeated until `budgetMs` of wall time has passed, median of `rounds` rounds.
 */
function nanosecondsPerCall(run: () => void, budgetMs: number, rounds = 5): number {
  return median(cpuNanosecondsPerRound(run, budgetMs, rounds));
}

function generatingParameters(model: EvolutionModel, lineage: Lineage): Record<string, number> {
  const span = lineage.time[lineage.time.length - 1];
  if (model.id === 'ou') return { ancestral_mean: 5, optimum: 6, alpha: 10 / span, step_variance: 0.05 };
  if (model.id === 'random-walk') return { ancestral_mean: 5, step_variance: 0.05 };
  if (model.id === 'directional-walk') return { ancestral_mean: 5, step_variance: 0.05, drift: 0.1 };
  if (model.id === 'stasis') return { stasis_mean: 5, stasis_variance: 0.02 };
  return { stasis_mean: 5 };
}

interface LikelihoodRow {
  model: string;
  horizons: number;
  denseMicroseconds: number | null;
  filterMicroseconds: number;
  ratio: number | null;
  filterNanosecondsPerHorizon: number;
  profileNanosecondsPerHorizon: number;
  differenceFromDense: number | null;
}

/**
 * One likelihood evaluation as the search makes it on a cache miss: fill the
 * state space, run the filter, then GLS (`profile`) or logL at given
 * coefficients. Built from the engine directly so that the evaluator's cache
 * of filter passes (which answers repeats) cannot flatter the timing.
 */
function engineEvaluation(model: EvolutionModel, lineage: Lineage, parameters: Record<string, number>): { atParameters: () => number; profile: () => number } {
  const size = lineage.mean.length;
  const width = model.width(lineage);
  let centre = 0;
  for (let i = 0; i < size; i++) centre += lineage.mean[i];
  centre /= size;
  const data = Float64Array.from(lineage.mean, (value) => value - centre);
  const space = allocateStateSpace(size, width, lineage.samplingVariance);
  const sums = allocateSums(size, width);
  const work = new Float64Array(workSize(width));
  const process = model.processFrom(parameters, lineage);
  const constant = model.constantCoefficients(process, lineage);
  const coefficients = model.coefficientsFrom(parameters, lineage).map((value, j) => value - centre * constant[j]);
  return {
    atParameters: () => {
      model.fillSpace(lineage, process, space);
      return logLikAt(whiten(space, data, sums, work), coefficients);
    },
    profile: () => {
      model.fillSpace(lineage, process, space);
      return profileOut(whiten(space, data, sums, work)).logLik;
    },
  };
}

/** Filter (full parameters, and profile with GLS) against the dense O(N^3) reference. */
function measureLikelihood(): LikelihoodRow[] {
  const sizes = smoke ? [50, 200] : [50, 200, 1000];
  const rows: LikelihoodRow[] = [];
  for (const id of ['random-walk', 'ou']) {
    const model = findModel(id) as EvolutionModel;
    for (const horizons of sizes) {
      const lineage = benchLineage(horizons, 31 + horizons, 4);
      const parameters = generatingParameters(model, lineage);
      const engine = engineEvaluation(model, lineage, parameters);
      const filterValue = new LikelihoodEvaluator(model, lineage).atParameters(parameters);
      if (Math.abs(engine.atParameters() - filterValue) > 1e-9 * Math.abs(filterValue)) throw new Error('bench: engine and evaluator disagree');
      const dense = (): number => {
        const { mean, covariance } = model.meanCovariance(lineage, parameters);
        return denseLogLik(mean, covariance, lineage.samplingVariance, lineage.mean);
      };
      const denseValue = dense();
      const denseNs = nanosecondsPerCall(() => void dense(), smoke ? 60 : horizons >= 1000 ? 4000 : 1000, 3);
      const filterNs = nanosecondsPerCall(() => void engine.atParameters(), smoke ? 40 : 500);
      const profileNs = nanosecondsPerCall(() => void engine.profile(), smoke ? 40 : 500);
      rows.push({
        model: id,
        horizons,
        denseMicroseconds: denseNs / 1000,
        filterMicroseconds: filterNs / 1000,
        ratio: denseNs / filterNs,
        filterNanosecondsPerHorizon: filterNs / horizons,
        profileNanosecondsPerHorizon: profileNs / horizons,
        differenceFromDense: Math.abs(filterValue - denseValue),
      });
    }
    // Long sequences: the filter only (the dense form would need N^2 doubles).
    for (const horizons of smoke ? [] : [100_000]) {
      const lineage = benchLineage(horizons, 31 + horizons, 4);
      const parameters = generatingParameters(model, lineage);
      const engine = engineEvaluation(model, lineage, parameters);
      const filterNs = nanosecondsPerCall(() => void engine.atParameters(), 1000);
      const profileNs = nanosecondsPerCall(() => void engine.profile(), 1000);
      rows.push({ model: id, horizons, denseMicroseconds: null, filterMicroseconds: filterNs / 1000, ratio: null, filterNanosecondsPerHorizon: filterNs / horizons, profileNanosecondsPerHorizon: profileNs / horizons, differenceFromDense: null });
    }
  }
  return rows;
}

/** Run one case of bench/case.ts in a child process and parse its JSON line. */
function runCase(name: string, args: Record<string, unknown>): Record<string, unknown> {
  const script = fileURLToPath(new URL('bench/case.js', distRoot));
  const output = execFileSync(process.execPath, [script, name, JSON.stringify(args)], { encoding: 'utf8', maxBuffer: 1 << 24, stdio: ['ignore', 'pipe', 'inherit'] });
  return JSON.parse(output.trim().split('\n').pop() as string);
}

interface FitRow {
  horizons: number;
  intervals: boolean;
  milliseconds: number;
  cpuMilliseconds: number;
  evaluations: number;
  peakMemoryMiB: number;
}

function measureFits(): FitRow[] {
  const plan: { horizons: number; intervals: boolean }[] = smoke
    ? [{ horizons: 100, intervals: false }, { horizons: 1000, intervals: false }, { horizons: 100, intervals: true }]
    : [
        ...[100, 1000, 10_000, 20_000, 100_000].map((horizons) => ({ horizons, intervals: false })),
        ...[100, 1000, 10_000, 20_000].map((horizons) => ({ horizons, intervals: true })),
      ];
  return plan.map((entry) => {
    process.stderr.write(`  fit: ${entry.horizons} horizons${entry.intervals ? ' with intervals' : ''}...\n`);
    return runCase('fit', entry) as unknown as FitRow;
  });
}

interface BatchRow {
  lineages: number;
  horizons: number;
  threads: number;
  intervals: boolean;
  seconds: number;
  cpuSeconds: number;
  lineagesPerSecond: number;
  digest: string;
  peakMemoryMiB: number;
}

function measureBatch(): { rows: BatchRow[]; speedup: number; identical: boolean } {
  const lineages = smoke ? 12 : 1000;
  const threads = Math.max(2, availableParallelism());
  const rows = [1, threads].map((count) => {
    process.stderr.write(`  batch: ${lineages} lineages on ${count} thread(s)...\n`);
    // Smoke mode skips the intervals so the batch takes a second, not a minute.
    return runCase('batch', { lineages, horizons: 30, threads: count, intervals: !smoke }) as unknown as BatchRow;
  });
  return { rows, speedup: rows[1].lineagesPerSecond / rows[0].lineagesPerSecond, identical: rows[0].digest === rows[1].digest };
}

/** Wall time of a command, median of `repeats` runs, in ms. */
function wallTime(args: readonly string[], repeats: number): number {
  const times: number[] = [];
  for (let k = 0; k < repeats; k++) {
    const started = performance.now();
    const result = spawnSync(process.execPath, args, { stdio: 'ignore' });
    times.push(performance.now() - started);
    if (result.status !== 0) throw new Error(`${args.join(' ')} exited with ${result.status}`);
  }
  return median(times);
}

function measureStartup(): { helpMilliseconds: number; nodeMilliseconds: number; ratio: number } {
  const repeats = smoke ? 3 : 15;
  const launcher = fileURLToPath(new URL('bin/stratotrend', projectRoot));
  const nodeMilliseconds = wallTime(['-e', '0'], repeats);
  const helpMilliseconds = wallTime([launcher, '--help'], repeats);
  return { helpMilliseconds, nodeMilliseconds, ratio: helpMilliseconds / nodeMilliseconds };
}

interface FigureRow {
  figure: string;
  available: boolean;
  firstMilliseconds: number | null;
  milliseconds: number | null;
  bytes: number | null;
}

/** Time each PNG figure the project can draw; "not available" when its module is not built. */
async function measureFigures(): Promise<FigureRow[]> {
  // Smoke mode (issue 22): no intervals (no figure draws one) and a smaller batch for the compilation figure.
  const fit = fitLineage(benchLineage(40, 77, 4), classicModels, smoke ? { intervals: false } : undefined);
  const document = lineageDocument(fit);
  const candidates: { figure: string; module: string; exportName: string; input: () => Promise<unknown> }[] = [
    { figure: 'trajectory', module: 'src/render/figures/index.js', exportName: 'renderTrajectory', input: async () => document },
    { figure: 'model support', module: 'src/render/figures/index.js', exportName: 'renderModelSupport', input: async () => document },
    {
      figure: 'compilation summary',
      module: 'src/render/figures/compilation.js',
      exportName: 'renderCompilation',
      input: async () => {
        const { summariseCompilation } = await import('../src/compare/compilation.js');
        const fits = Array.from({ length: smoke ? 12 : 60 }, (_, k) => fitLineage(benchLineage(30, 900 + k, k), classicModels, { intervals: false }));
        return summariseCompilation(fits);
      },
    },
  ];
  const rows: FigureRow[] = [];
  for (const candidate of candidates) {
    const path = new URL(candidate.module, distRoot);
    let draw: ((input: unknown, options: Record<string, unknown>) => { bytes: Uint8Array }) | undefined;
    if (existsSync(path)) {
      try {
        draw = (await import(path.href))[candidate.exportName];
      } catch {
        draw = undefined;
      }
    }
    if (typeof draw !== 'function') {
      rows.push({ figure: candidate.figure, available: false, firstMilliseconds: null, milliseconds: null, bytes: null });
      continue;
    }
    const input = await candidate.input();
    const render = draw;
    let started = performance.now();
    const first = render(input, { format: 'png' });
    const firstMilliseconds = performance.now() - started;
    const times: number[] = [];
    for (let k = 0; k < (smoke ? 1 : 5); k++) {
      started = performance.now();
      render(input, { format: 'png' });
      times.push(performance.now() - started);
    }
    rows.push({ figure: candidate.figure, available: true, firstMilliseconds, milliseconds: median(times), bytes: first.bytes.length });
  }
  return rows;
}

/** bench/calibration.ts (issue 9), when it exists: run in the full benchmark only. */
async function measureCalibration(): Promise<unknown> {
  if (smoke) return { skipped: 'smoke mode' };
  const source = new URL('bench/calibration.ts', projectRoot);
  const compiled = new URL('bench/calibration.js', distRoot);
  if (!existsSync(source) || !existsSync(compiled)) return { skipped: 'bench/calibration.ts not present' };
  process.stderr.write('  calibration (bench/calibration.ts)...\n');
  const module = (await import(compiled.href)) as { runCalibration?: (options: Record<string, unknown>) => unknown };
  if (typeof module.runCalibration !== 'function') return { skipped: 'bench/calibration.ts exports no runCalibration' };
  const started = performance.now();
  const result = await module.runCalibration({});
  return { seconds: (performance.now() - started) / 1000, result: JSON.parse(JSON.stringify(result ?? null)) };
}

/** bench/trend-calibration.ts (issue 15): the trend verdict's size, power and cost; full run only. */
async function measureTrendVerdict(): Promise<unknown> {
  if (smoke) return { skipped: 'smoke mode' };
  const compiled = new URL('bench/trend-calibration.js', distRoot);
  if (!existsSync(compiled)) return { skipped: 'bench/trend-calibration.ts not built' };
  process.stderr.write('  trend verdict: cost, then calibration (bench/trend-calibration.ts)...\n');
  const module = (await import(compiled.href)) as { measureTrendCost: () => Promise<unknown>; runTrendCalibration: (options: Record<string, unknown>) => Promise<unknown> };
  const cost = await module.measureTrendCost();
  const started = performance.now();
  const calibration = await module.runTrendCalibration({});
  return { cost, calibration, seconds: (performance.now() - started) / 1000 };
}

/**
 * Test files whose exhaustive sweep `npm test` runs only as a seeded sample;
 * with STRATOTREND_SWEEP=full they run every seed (issue 22).
 */
export const sweepFiles: readonly string[] = ['test/robustness/numbers.test.ts', 'test/robustness/fuzz.test.ts'];

interface SweepResult {
  files: readonly string[];
  passed: boolean;
  seconds: number;
  summary: string;
}

/** Run the sweep files through vitest (a dev dependency) with STRATOTREND_SWEEP=full, from the project root. */
function runSweep(): SweepResult {
  process.stderr.write(`  exhaustive sweeps (${sweepFiles.join(', ')})...\n`);
  const vitest = fileURLToPath(new URL('node_modules/vitest/vitest.mjs', projectRoot));
  const started = performance.now();
  const result = spawnSync(process.execPath, [vitest, 'run', ...sweepFiles], {
    cwd: fileURLToPath(projectRoot),
    encoding: 'utf8',
    maxBuffer: 1 << 26,
    env: { ...process.env, STRATOTREND_SWEEP: 'full', NO_COLOR: '1' },
  });
  const seconds = (performance.now() - started) / 1000;
  const output = `${result.stdout ?? ''}${result.stderr ?? ''}`;
  const summary = output.split('\n').filter((line) => /^\s*(Test Files|Tests)\s/.test(line)).map((line) => line.trim()).join('; ') || output.slice(-400);
  return { files: sweepFiles, passed: result.status === 0, seconds, summary };
}

/** Growth of time with horizons, as the time ratio for 16× the horizons (from a power law through two sizes). */
function growthFor16(rows: readonly FitRow[], intervals: boolean, from: number, to: number): number | null {
  const a = rows.find((row) => row.intervals === intervals && row.horizons === from);
  const b = rows.find((row) => row.intervals === intervals && row.horizons === to);
  if (!a || !b) return null;
  const exponent = Math.log(b.milliseconds / a.milliseconds) / Math.log(to / from);
  return 16 ** exponent;
}

function format(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (Math.abs(value) >= 1000) return value.toFixed(0);
  return value.toPrecision(digits);
}

function table(rows: readonly (readonly string[])[]): string {
  const widths = rows[0].map((_, column) => Math.max(...rows.map((row) => row[column].length)));
  return rows.map((row) => '  ' + row.map((cell, column) => (column === 0 ? cell.padEnd(widths[column]) : cell.padStart(widths[column]))).join('  ')).join('\n');
}

/** Expression (inside a child's async script) for its own peak resident memory in bytes (bench/memory.ts). */
const peakResidentSource = `(await import(${JSON.stringify(new URL('./memory.js', import.meta.url).href)})).peakResidentBytes()`;

/** One command run on the large specimen file, in its own process. */
interface StreamedCommand {
  command: string;
  seconds: number;
  peakResidentMiB: number;
}

/**
 * The commands of {@link measureStreaming} in one child process, in order, through the CLI's
 * `runCommandLine` (no process hooks, so one process can run several); the peak resident
 * memory after each is the process's peak so far.
 */
function runCommandsTogether(commandLines: readonly string[][], folder: string, file: string): StreamedCommand[] {
  const mainUrl = new URL('../src/cli/main.js', import.meta.url).href;
  const child = `import(${JSON.stringify(mainUrl)}).then(async ({ runCommandLine }) => {
    for (const args of ${JSON.stringify(commandLines)}) {
      const started = process.hrtime.bigint();
      const code = await runCommandLine(['node', 'stratotrend', ...args]);
      const seconds = Number(process.hrtime.bigint() - started) / 1e9;
      process.stderr.write('\\nbench-result ' + JSON.stringify({ seconds, maxRss: ${peakResidentSource}, code }) + '\\n');
      if (code !== 0) break;
    }
  });`;
  const result = spawnSync(process.execPath, ['--input-type=module', '-e', child], { encoding: 'utf8', maxBuffer: 1 << 28 });
  const found = result.stderr.split('\n').filter((entry) => entry.startsWith('bench-result ')).map((line) => JSON.parse(line.slice('bench-result '.length)) as { seconds: number; maxRss: number; code: number });
  return commandLines.map((args, index) => {
    const entry = found[index];
    const shown = `stratotrend ${args.map((arg) => (arg === file ? 'FILE' : arg.startsWith(folder) ? arg.slice(folder.length + 1) : arg)).join(' ')}`;
    if (!entry) throw new Error(`bench: ${shown} printed no result: ${result.stderr.slice(-400)}`);
    if (entry.code !== 0) throw new Error(`bench: ${shown} exited with ${entry.code}: ${result.stderr.slice(-400)}`);
    return { command: shown, seconds: entry.seconds, peakResidentMiB: entry.maxRss / 2 ** 20 };
  });
}

/**
 * Stream a large invented specimen-form file (issue 6: a million rows in
 * bounded memory) in child processes, so each peak resident memory is its
 * own and not the benchmark's: the reader alone, then every command that
 * reads a samples file (fit, compare, simulate, power, bootstrap, report), each
 * through the CLI's `main` with the lightest options that still read it all.
 * Two invented sections of `horizons` / 2 horizons each (100 in the full run, 20 in
 * smoke mode), so that `compare` compares.
 */
function measureStreaming(rows: number, horizons: number): { rows: number; horizons: number; megabytes: number; seconds: number; peakResidentMiB: number; commands: StreamedCommand[] } {
  const folder = mkdtempSync(join(tmpdir(), 'stratotrend-bench-stream-'));
  const file = join(folder, 'specimens.csv');
  const lines = ['section,trait,age,value'];
  for (let k = 0; k < rows; k++) {
    const horizon = k % horizons;
    const section = horizon < horizons / 2 ? 'Bench Gully' : 'Bench Scar';
    lines.push(`${section},length,${(20 - (horizon % (horizons / 2)) * 0.1).toFixed(2)},${(5 + 0.01 * horizon + ((k * 7919) % 1000) / 2000).toFixed(4)}`);
  }
  writeFileSync(file, lines.join('\n') + '\n');
  const megabytes = statSync(file).size / 2 ** 20;
  const script = `import(${JSON.stringify(new URL('../src/data/stream-samples.js', import.meta.url).href)}).then(async ({ streamSampleFile }) => {
    const started = process.hrtime.bigint();
    const result = await streamSampleFile(${JSON.stringify(file)}, 'specimens.csv');
    const seconds = Number(process.hrtime.bigint() - started) / 1e9;
    process.stdout.write(JSON.stringify({ rows: result.rows, seconds, maxRss: ${peakResidentSource} }));
  });`;
  const output = execFileSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8' });
  const measured = JSON.parse(output) as { rows: number; seconds: number; maxRss: number };
  const mainUrl = new URL('../src/cli/main.js', import.meta.url).href;
  const runCommand = (args: string[]): StreamedCommand => {
    const child = `import(${JSON.stringify(mainUrl)}).then(async ({ main }) => {
      const started = process.hrtime.bigint();
      await main(['node', 'stratotrend', ...${JSON.stringify(args)}]);
      const seconds = Number(process.hrtime.bigint() - started) / 1e9;
      process.stderr.write('\\nbench-result ' + JSON.stringify({ seconds, maxRss: ${peakResidentSource}, code: process.exitCode ?? 0 }) + '\\n');
    });`;
    const result = spawnSync(process.execPath, ['--input-type=module', '-e', child], { encoding: 'utf8', maxBuffer: 1 << 28 });
    const line = result.stderr.split('\n').find((entry) => entry.startsWith('bench-result '));
    if (!line) throw new Error(`bench: stratotrend ${args.join(' ')} printed no result: ${result.stderr.slice(-400)}`);
    const found = JSON.parse(line.slice('bench-result '.length)) as { seconds: number; maxRss: number; code: number };
    if (found.code !== 0) throw new Error(`bench: stratotrend ${args.join(' ')} exited with ${found.code}: ${result.stderr.slice(-400)}`);
    return { command: `stratotrend ${args.map((arg) => (arg === file ? 'FILE' : arg.startsWith(folder) ? arg.slice(folder.length + 1) : arg)).join(' ')}`, seconds: found.seconds, peakResidentMiB: found.maxRss / 2 ** 20 };
  };
  // Smoke mode leaves out the trend verdict's simulations (fit and report): what it checks is that each command reads the file to the end.
  const noTrend = smoke ? ['--no-trend-test'] : [];
  const commandLines = [
    ['fit', file, '--no-intervals', '--quiet', ...noTrend],
    ['compare', file, '--no-intervals', '--quiet'],
    ['simulate', file, '--model', 'random-walk', '--out', join(folder, 'simulated.csv')],
    ['power', file, '--lineage', 'Bench Gully / length', '--replicates', '20', '--drifts', '0,0.1', '--no-coverage', '--threads', '1', '--quiet'],
    ['bootstrap', file, '--replicates', '20', '--threads', '1', '--quiet'],
    ['report', file, '--no-intervals', '--compare', '--out', join(folder, 'report.html'), ...noTrend],
  ];
  // Smoke mode (the test suite's check that every command still runs on the streamed file) runs the six in one child
  // process, one after another, instead of six: each child costs a Node start and a load of the modules (issue 22).
  // Their peak memory is then the process's peak so far, not each command's own: the full run keeps one process each.
  const commands = smoke ? runCommandsTogether(commandLines, folder, file) : commandLines.map(runCommand);
  rmSync(folder, { recursive: true, force: true });
  return { rows: measured.rows, horizons, megabytes, seconds: measured.seconds, peakResidentMiB: measured.maxRss / 2 ** 20, commands };
}

async function main(): Promise<void> {
  if (sweepOnly) {
    const sweep = runSweep();
    process.stdout.write(`Exhaustive sweeps: ${sweep.passed ? 'passed' : 'FAILED'} in ${format(sweep.seconds)} s (${sweep.summary})\n`);
    if (!sweep.passed) process.exitCode = 1;
    return;
  }
  const cores = availableParallelism();
  const machine = {
    cores,
    cpu: cpus()[0]?.model ?? 'unknown',
    memoryGiB: totalmem() / 2 ** 30,
    node: process.version,
    platform: `${process.platform} ${process.arch}`,
    loadAverageAtStart: loadavg()[0],
  };
  process.stderr.write(`stratotrend benchmark (${smoke ? 'smoke' : 'full'}) on ${cores} cores...\n`);
  process.stderr.write('  likelihood: filter against the dense reference...\n');
  const likelihood = measureLikelihood();
  process.stderr.write('  fitter cost in evaluation-equivalents (issue 14)...\n');
  const evaluationCost = await measureEvaluationCost(smoke ? 'smoke' : 'full');
  const fits = measureFits();
  const batch = measureBatch();
  process.stderr.write('  start-up...\n');
  const startup = measureStartup();
  process.stderr.write('  figures...\n');
  const figures = await measureFigures();
  const calibration = await measureCalibration();
  const trendVerdict = await measureTrendVerdict();
  process.stderr.write('  streaming a large specimen file...\n');
  // Smoke mode: 40 horizons (two sections of 20), so the six commands' fits take seconds, not half a minute.
  const streaming = measureStreaming(smoke ? 20_000 : 1_000_000, smoke ? 40 : 200);
  const sweep = smoke ? null : runSweep();
  process.stderr.write('  joint models (3 traits)...\n');
  const { measureJoint } = await import('./joint.js');
  const joint = measureJoint(smoke ? 12 : 100, !smoke);

  const at1000 = likelihood.filter((row) => row.horizons === (smoke ? 200 : 1000));
  const worstRatio = Math.min(...at1000.map((row) => row.ratio ?? Number.POSITIVE_INFINITY));
  const worstNs = Math.max(...likelihood.filter((row) => row.horizons >= (smoke ? 200 : 1000)).map((row) => row.profileNanosecondsPerHorizon));
  const growth = smoke ? growthFor16(fits, false, 100, 1000) : growthFor16(fits, false, 1000, 100_000);
  const growthIntervals = smoke ? null : growthFor16(fits, true, 1000, 20_000);
  const fit20000 = fits.find((row) => row.horizons === 20_000 && row.intervals);
  const fit20000Estimates = fits.find((row) => row.horizons === 20_000 && !row.intervals);
  const targets = [
    { name: `dense / filter time at N = ${smoke ? 200 : 1000} (slowest model)`, target: '>= 1000', measured: worstRatio, met: worstRatio >= 1000 },
    { name: 'ns per horizon per likelihood evaluation (profile, N >= 1000, slowest model)', target: '<= 100', measured: worstNs, met: worstNs <= 100 },
    { name: 'fit time ratio for 16x horizons, estimates only', target: '<= 20', measured: growth, met: growth !== null && growth <= 20 },
    { name: 'fit time ratio for 16x horizons, with intervals', target: '<= 20', measured: growthIntervals, met: growthIntervals !== null && growthIntervals <= 20 },
    { name: 'five models, 20000 horizons, with intervals (s)', target: '<= 2', measured: fit20000 ? fit20000.milliseconds / 1000 : null, met: fit20000 ? fit20000.milliseconds <= 2000 : false },
    { name: 'five models, 20000 horizons, estimates only (s)', target: '<= 2', measured: fit20000Estimates ? fit20000Estimates.milliseconds / 1000 : null, met: fit20000Estimates ? fit20000Estimates.milliseconds <= 2000 : false },
    { name: 'the same, with intervals, CPU seconds (less affected by other load)', target: '<= 2', measured: fit20000 ? fit20000.cpuMilliseconds / 1000 : null, met: fit20000 ? fit20000.cpuMilliseconds <= 2000 : false },
    { name: 'the same, estimates only, CPU seconds', target: '<= 2', measured: fit20000Estimates ? fit20000Estimates.cpuMilliseconds / 1000 : null, met: fit20000Estimates ? fit20000Estimates.cpuMilliseconds <= 2000 : false },
    { name: `batch speedup on ${batch.rows[1].threads} threads`, target: '>= 1.6', measured: batch.speedup, met: batch.speedup >= 1.6 },
    ...evaluationCost.rows.filter((row) => row.targetEquivalents !== null || row.targetSeconds !== null).map((row) => ({
      name: `issue 14: ${row.work}${row.targetEquivalents !== null ? ' (evaluation-equivalents)' : ' (CPU s)'}`,
      target: row.targetEquivalents !== null ? `<= ${row.targetEquivalents}` : `<= ${row.targetSeconds}`,
      measured: row.targetEquivalents !== null ? row.evaluationEquivalents : row.cpuMilliseconds / 1000,
      met: row.met,
    })),
    { name: '`stratotrend --help` / `node -e 0`', target: '<= 2', measured: startup.ratio, met: startup.ratio <= 2 },
  ];
  const results = { mode: smoke ? 'smoke' : 'full', date: new Date().toISOString(), machine, likelihood, evaluationCost, fits, batch, startup, figures, streaming, calibration, trend_verdict: trendVerdict, sweep, joint, targets };
  if (outFile) writeFileSync(outFile, JSON.stringify(results, null, 2) + '\n');

  const lines: string[] = [];
  lines.push(`stratotrend benchmark — ${results.mode} — ${machine.cores} cores (${machine.cpu}), node ${machine.node}, load average at start ${machine.loadAverageAtStart.toFixed(2)}, at end ${loadavg()[0].toFixed(2)}`);
  if (machine.loadAverageAtStart > machine.cores) lines.push(`(the machine was busy with other work: wall times are inflated; CPU times are the better guide)`);
  lines.push('', 'Likelihood: O(N) filter against the dense O(N^3) reference (invented lineages; CPU time per evaluation)');
  lines.push(table([
    ['model', 'N', 'dense µs', 'filter µs', 'ratio', 'ns/horizon', 'ns/horizon (GLS profile)', '|filter - dense| logL'],
    ...likelihood.map((row) => [row.model, String(row.horizons), format(row.denseMicroseconds), format(row.filterMicroseconds), format(row.ratio), format(row.filterNanosecondsPerHorizon), format(row.profileNanosecondsPerHorizon), row.differenceFromDense === null ? '—' : row.differenceFromDense.toExponential(1)]),
  ]));
  lines.push('', ...evaluationCostLines(evaluationCost));
  lines.push('', 'Fitting all five classic models to one lineage (the fit command\'s work)');
  lines.push(table([
    ['N', 'intervals', 'seconds', 'CPU seconds', 'filter passes', 'CPU µs per pass', 'peak MiB'],
    ...fits.map((row) => [String(row.horizons), row.intervals ? 'default' : 'none', format(row.milliseconds / 1000), format(row.cpuMilliseconds / 1000), String(row.evaluations), format((row.cpuMilliseconds * 1000) / row.evaluations), format(row.peakMemoryMiB)]),
  ]));
  lines.push('', `Batch: ${batch.rows[0].lineages} lineages × ${batch.rows[0].horizons} horizons in one file, five models ${batch.rows[0].intervals ? 'with' : 'without'} intervals`);
  lines.push(table([
    ['threads', 'seconds', 'CPU seconds (all threads)', 'lineages/s', 'peak MiB', 'result digest'],
    ...batch.rows.map((row) => [String(row.threads), format(row.seconds), format(row.cpuSeconds), format(row.lineagesPerSecond), format(row.peakMemoryMiB), row.digest]),
  ]));
  lines.push(`  speedup ${format(batch.speedup)}×; threaded results ${batch.identical ? 'identical to' : 'DIFFER FROM'} sequential`);
  lines.push('', 'Start-up (median wall time)');
  lines.push(table([
    ['command', 'ms'],
    ['node -e 0', format(startup.nodeMilliseconds)],
    ['stratotrend --help', format(startup.helpMilliseconds)],
  ]));
  lines.push(`  ratio ${format(startup.ratio)}`);
  lines.push('', 'Figures (PNG, default size and dpi)');
  lines.push(table([
    ['figure', 'first ms (loads the chart stack)', 'ms per PNG', 'bytes'],
    ...figures.map((row) => (row.available ? [row.figure, format(row.firstMilliseconds), format(row.milliseconds), String(row.bytes)] : [row.figure, 'not available', 'not available', '—'])),
  ]));
  const memory = [...fits.filter((row) => row.horizons >= 20_000 || smoke), ...batch.rows];
  lines.push('', `Peak memory of the largest runs: ${memory.map((row) => `${'lineages' in row ? `batch ${row.threads} thread(s)` : `fit N = ${row.horizons}${row.intervals ? ' + intervals' : ''}`} ${format(row.peakMemoryMiB)} MiB`).join('; ')}`);
  lines.push('', `Streaming a specimen-form file (issue 6): ${streaming.rows} rows, ${format(streaming.megabytes)} MB, read and summarised in ${format(streaming.seconds)} s, peak resident memory ${format(streaming.peakResidentMiB)} MiB (own process)`);
  lines.push('Every command that reads the samples file, on the same file (each in its own process):');
  lines.push(table([['command', 'seconds', 'peak resident MiB'], ...streaming.commands.map((row) => [row.command, format(row.seconds), format(row.peakResidentMiB)])]));
  lines.push('', `Joint models (issue 17): ${joint.traits} traits, ${joint.horizons} horizons, every model`);
  lines.push(table([['model', 'fit seconds', 'with intervals seconds', 'logL'], ...joint.rows.map((row) => [row.model, format(row.seconds), format(row.intervalSeconds), format(row.logLik, 6)])]));
  if (!smoke) lines.push('', `Calibration: ${JSON.stringify(calibration).slice(0, 200)}`);
  if (sweep) lines.push('', `Exhaustive sweeps (${sweep.files.join(', ')}, STRATOTREND_SWEEP=full): ${sweep.passed ? 'passed' : 'FAILED'} in ${format(sweep.seconds)} s (${sweep.summary})`);
  const targetRows = (issue14: boolean): string[][] =>
    targets.filter((row) => row.name.startsWith('issue 14:') === issue14).map((row) => [row.name, row.target, format(row.measured), row.measured === null ? '—' : row.met ? 'yes' : 'NO']);
  lines.push('', 'Targets (issue 7)');
  lines.push(table([['measure', 'target', 'measured', 'met'], ...targetRows(false)]));
  lines.push('', 'Targets (issue 14)');
  lines.push(table([['measure', 'target', 'measured', 'met'], ...targetRows(true)]));
  if (smoke) lines.push('', '(smoke mode: small sizes, so the targets above are not meaningful)');
  if (outFile) lines.push('', `Wrote ${outFile}`);
  process.stdout.write(lines.join('\n') + '\n');
  if (sweep && !sweep.passed) process.exitCode = 1;
}

main().catch((error) => {
  process.stderr.write(`${(error as Error).stack ?? String(error)}\n`);
  process.exit(1);
});
