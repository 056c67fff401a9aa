import { medianSorted } from 'simple-statistics';
import type { LineageView } from './document-view.js';

/** The facts about one lineage's data that a reader needs before the model table. */
export interface DataSummary {
  readonly horizons: number;
  /** Elapsed time from the oldest to the youngest horizon, t_m, in the lineage's time unit. */
  readonly span: number;
  /** Oldest and youngest stratigraphic position as read (ages, times or heights). */
  readonly firstPosition: number | null;
  readonly lastPosition: number | null;
  /** Shortest and longest interval between consecutive horizons. */
  readonly shortestInterval: number;
  readonly longestInterval: number;
  /** Specimens per horizon: smallest, median, largest, and total. */
  readonly specimens: { readonly smallest: number; readonly median: number; readonly largest: number; readonly total: number };
  /** Youngest minus oldest horizon mean, x_m - x_0. */
  readonly netChange: number;
  /** Largest minus smallest horizon mean. */
  readonly rangeOfMeans: number;
  /** Sample variance of the horizon means (n - 1 divisor). */
  readonly varianceOfMeans: number;
  /** Root of the average sampling variance, sqrt(mean e_i): a typical standard error of a horizon mean. */
  readonly typicalStandardError: number;
  /** |net change| / typical standard error. */
  readonly changeToError: number | null;
  /** mean e_i / variance of the means: the share of the spread among means that sampling error alone would produce. */
  readonly samplingShare: number | null;
  /** Horizons with zero sampling variance (their mean is taken as exact). */
  readonly exactHorizons: number;
  /** Horizons whose age was extrapolated beyond the age model's ties. */
  readonly extrapolatedHorizons: number;
}

function numbers(values: readonly (number | null)[]): number[] {
  return values.map((value) => (value === null ? Number.NaN : value));
}


/**
 * Summarise a lineage's data as fit.json holds it: span and spacing of the
 * horizons, sample sizes, and how large sampling error is against the
 * observed change. The ratio of average sampling variance to the variance of
 * the means is common practice for judging whether the means vary more than
 * sampling alone would make them vary (a ratio near or above 1 means most of
 * the spread could be sampling error).
 *
 * @example
 * // Means 1, 2, 4 at t = 0, 1, 3 with e_i = 0.01: net change 3, typical standard error 0.1, change to error 30.
 * const lineage = lineageFromArrays({ section: 'A', trait: 'x', time: [0, 1, 3], mean: [1, 2, 4], samplingVariance: [0.01, 0.01, 0.01] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis], { intervals: false })], provenance, [], 'classic'));
 * const summary = summariseData(document.lineages[0]);
 * [summary.netChange, summary.typicalStandardError, summary.changeToError]; // [3, 0.1, 30]
 * summary.samplingShare; // 0.004285714285714286 (to 1e-15; 0.01 / (7/3), the variance of the means)
 */
export function summariseData(lineage: LineageView): DataSummary {
  const time = numbers(lineage.data.time);
  const mean = numbers(lineage.data.mean);
  const sampling = numbers(lineage.data.sampling_variance);
  const count = numbers(lineage.data.n);
  const size = mean.length;
  let shortest = Number.POSITIVE_INFINITY;
  let longest = 0;
  for (let i = 1; i < size; i++) {
    const step = time[i] - time[i - 1];
    shortest = Math.min(shortest, step);
    longest = Math.max(longest, step);
  }
  const average = mean.reduce((sum, value) => sum + value, 0) / size;
  const varianceOfMeans = size > 1 ? mean.reduce((sum, value) => sum + (value - average) ** 2, 0) / (size - 1) : 0;
  const averageSampling = sampling.reduce((sum, value) => sum + value, 0) / size;
  const typicalStandardError = Math.sqrt(averageSampling);
  const netChange = mean[size - 1] - mean[0];
  const sortedCounts = [...count].sort((left, right) => left - right);
  const positions = lineage.data.position;
  return {
    horizons: size,
    span: time[size - 1] - time[0],
    firstPosition: positions[0] ?? null,
    lastPosition: positions[size - 1] ?? null,
    shortestInterval: size > 1 ? shortest : 0,
    longestInterval: longest,
    specimens: {
      smallest: sortedCounts[0],
      median: medianSorted(sortedCounts),
      largest: sortedCounts[size - 1],
      total: count.reduce((sum, value) => sum + value, 0),
    },
    netChange,
    rangeOfMeans: Math.max(...mean) - Math.min(...mean),
    varianceOfMeans,
    typicalStandardError,
    changeToError: typicalStandardError > 0 ? Math.abs(netChange) / typicalStandardError : null,
    samplingShare: varianceOfMeans > 0 ? averageSampling / varianceOfMeans : null,
    exactHorizons: sampling.filter((value) => value === 0).length,
    extrapolatedHorizons: lineage.data.extrapolated.filter(Boolean).length,
  };
}
