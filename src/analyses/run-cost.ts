import { usageError } from '../data/errors.js';
import type { WarningLog } from '../data/warnings.js';
import { lineageName, type Lineage } from '../lineage.js';
import { defaultMinimumSegment, type EvolutionModel } from '../models/model.js';
import { defaultThreads, parallelThreshold } from '../parallel/fit-lineages.js';

/**
 * Most shift placements one model searches in one lineage. Every placement is
 * kept in memory and scored, so time and memory grow with the count: two
 * shifts among N horizons give about N²/2 placements — 2,000,000 is reached
 * near 2,000 horizons (about 0.7 GB); 3,000 horizons took over 1.5 GB, and
 * 100,000 cannot be held at all.
 */
export const placementLimit = 2_000_000;

/**
 * Runs expected to take longer than this (seconds) are announced, with the
 * estimate, before fitting starts.
 */
export const longRunSeconds = 60;

/**
 * How many placements of `shifts` shifts among `horizons` horizons leave every
 * segment at least `minimumSegment` horizons: the compositions of N into k + 1
 * parts of at least m, C(N − (k+1)m + k, k) (common practice: stars and bars).
 *
 * @example
 * placementCount(6, 1, 2); // 3 (shifts before the 3rd, 4th or 5th horizon)
 */
export function placementCount(horizons: number, shifts: number, minimumSegment: number): number {
  const free = horizons - (shifts + 1) * minimumSegment;
  if (shifts <= 0 || free < 0) return 0;
  let count = 1;
  for (let j = 1; j <= shifts; j++) count = (count * (free + j)) / j;
  return Math.round(count);
}

/**
 * Rough single-core seconds to fit one lineage of N horizons with the
 * shift and mode-shift models: a·N + b·N² for the ten such models of the
 * extended set, scaled by how many of them are asked for. The constants are
 * our own measurement (CPU time of `fit --models extended --no-intervals` on
 * invented walks of 400 and 800 horizons on the development machine: 10.4 s
 * and 25.1 s); they also predict the 35 s measured at 1,000 horizons.
 * Intervals add to this; other machines differ, so it is an estimate only.
 *
 * @example
 * shiftSearchSeconds(400, 10); // 10.384 (to 1e-9; 0.0206 × 400 + 1.34e-5 × 400², the measured 10.4 s)
 * shiftSearchSeconds(800, 10); // 25.056 (to 1e-9; measured 25.1 s)
 */
export function shiftSearchSeconds(horizons: number, shiftModels: number): number {
  const linear = 0.0206;
  const quadratic = 1.34e-5;
  return ((linear * horizons + quadratic * horizons * horizons) * shiftModels) / 10;
}

/**
 * A duration in words: seconds, minutes or hours, rounded.
 *
 * @example
 * durationWords(30); // '30 seconds'
 * durationWords(600); // '10 minutes'
 * durationWords(20000); // '6 hours'
 */
export function durationWords(seconds: number): string {
  if (seconds < 90) return `${Math.max(1, Math.round(seconds))} seconds`;
  if (seconds < 90 * 60) return `${Math.round(seconds / 60)} minutes`;
  return `${Math.round(seconds / 3600).toLocaleString('en-US')} hours`;
}

/**
 * Before fitting with models that search shift placements: refuse a lineage
 * whose placements exceed {@link placementLimit} for some model (a usage
 * error naming the lineage, its horizons, the models and a `--models` list
 * without them), and announce a run estimated to take more than
 * {@link longRunSeconds} (a `long-run` warning, also written to stderr at
 * once, before the run).
 *
 * @throws InputError (usage) when a lineage is too long for a requested model.
 *
 * @example
 * const walk = (horizons) => lineageFromArrays({ time: Array.from({ length: horizons }, (_, i) => i), mean: new Array(horizons).fill(1), samplingVariance: new Array(horizons).fill(0.1) });
 * const warnings = new WarningLog();
 * const written = [];
 * checkShiftSearchCost([walk(1500)], extendedModels, { warnings, write: (text) => written.push(text) });
 * warnings.list().map((warning) => warning.category); // ['long-run']
 * checkShiftSearchCost([walk(3000)], extendedModels, { warnings });
 * // throws: --models: lineage "lineage" has 3,000 horizons; punctuated-2, punctuated-2-separate would search 4,459,591 placements
 */
export function checkShiftSearchCost(
  lineages: readonly Lineage[],
  models: readonly EvolutionModel[],
  options: { minimumSegment?: number; threads?: number; warnings: WarningLog; write?: (text: string) => void },
): void {
  const searching = models.filter((model) => model.configurations !== undefined && (model.shiftCount ?? 0) > 0);
  if (searching.length === 0 || lineages.length === 0) return;
  const minimumSegment = options.minimumSegment ?? defaultMinimumSegment;
  for (const lineage of lineages) {
    const horizons = lineage.mean.length;
    const tooMany = searching.filter((model) => placementCount(horizons, model.shiftCount!, minimumSegment) > placementLimit);
    if (tooMany.length === 0) continue;
    // The suggestion lists the other models this lineage allows (covariate models need a covariate).
    const kept = models.filter((model) => !tooMany.includes(model) && !model.unavailable?.(lineage)).map((model) => model.id);
    const count = placementCount(horizons, tooMany[0].shiftCount!, minimumSegment);
    throw usageError(
      `--models: lineage "${lineageName(lineage)}" has ${horizons.toLocaleString('en-US')} horizons; ${tooMany.map((model) => model.id).join(', ')} would search ${count.toLocaleString('en-US')} placements of their shifts, more than the ${placementLimit.toLocaleString('en-US')} this tool searches (time and memory grow with the square of the horizons; about 2,000 horizons for two shifts at --min-segment 5). ` +
        (kept.length > 0 ? `Leave them out: --models ${kept.join(',')}` : 'Fit fewer horizons, or a larger --min-segment'),
    );
  }
  const threads = Math.max(1, Math.min(lineages.length, options.threads ?? defaultThreads(lineages.length)));
  const single = lineages.reduce((total, lineage) => total + shiftSearchSeconds(lineage.mean.length, searching.length), 0);
  const seconds = lineages.length >= parallelThreshold ? single / threads : single;
  if (seconds <= longRunSeconds) return;
  const longest = Math.max(...lineages.map((lineage) => lineage.mean.length));
  const message = `the shift and mode-shift models (${searching.length} of them) search every placement of their shifts, at a cost growing with the square of the horizons (longest lineage: ${longest.toLocaleString('en-US')}); this run will take roughly ${durationWords(seconds)} (an estimate from our measurements; intervals add to it). The classic models alone take seconds: --models classic`;
  options.warnings.add('long-run', message);
  (options.write ?? ((text: string) => process.stderr.write(text)))(`warning (long-run): ${message}\n`);
}
