/**
 * Lineage documents for the figure tests, in the exact shape `lineageDocument`
 * (src/render/fit-document.ts) writes into fit.json. The numbers are invented
 * for drawing and carry no statistical claim; where a test needs a real fit it
 * builds one with `fitLineage` + `lineageDocument` instead.
 */

/** A parameter entry as fit.json writes it. */
function estimate(value: number) {
  return { estimate: value, lower: null, upper: null, at_bound: null, lower_at_bound: false, upper_at_bound: false };
}

interface ModelRow {
  id: string;
  label: string;
  k: number;
  logLik: number | null;
  aicc: number | null;
  delta: number | null;
  weight: number | null;
  params: Record<string, number>;
  notCompared?: string;
}

function modelEntry(row: ModelRow) {
  return {
    id: row.id,
    label: row.label,
    k: row.k,
    logLik: row.logLik,
    aicc: row.aicc,
    delta_aicc: row.delta,
    weight: row.weight,
    converged: row.logLik !== null,
    compared: row.aicc !== null,
    not_compared_reason: row.notCompared ?? null,
    interval_method: 'none',
    params: Object.fromEntries(Object.entries(row.params).map(([name, value]) => [name, estimate(value)])),
    derived: {},
    flags: [],
  };
}

/** Ages of the test lineage (Ma, oldest first, unequal steps) and its horizon means and sampling variances. */
export const ridgeAges = [10.0, 9.6, 9.1, 8.9, 8.4, 8.0, 7.7, 7.2, 6.9, 6.5, 6.2, 6.0];
export const ridgeMeans = [3.1, 3.25, 3.2, 3.45, 3.6, 3.55, 3.8, 3.95, 3.9, 4.15, 4.3, 4.25];
export const ridgeSamplingVariances = [0.004, 0.006, 0.003, 0.008, 0.005, 0.004, 0.007, 0.005, 0.006, 0.004, 0.009, 0.005];

/**
 * One lineage ("Test Ridge" / "valve width") with all five classic models;
 * `best` picks the best-supported one. Random-walk parameters give a wide
 * envelope (σ² = 0.05 per Myr over 4 Myr), stasis a flat band.
 */
export function ridgeDocument(options: { best?: string; section?: string; offset?: number; ageShift?: number; withOuNotCompared?: boolean } = {}) {
  const offset = options.offset ?? 0;
  const shift = options.ageShift ?? 0;
  const ages = ridgeAges.map((age) => age + shift);
  const time = ages.map((age) => Number((ages[0] - age).toFixed(10)));
  const means = ridgeMeans.map((mean) => mean + offset);
  const best = options.best ?? 'random-walk';
  const rows: ModelRow[] = [
    { id: 'strict-stasis', label: 'strict stasis', k: 1, logLik: -40.1, aicc: 82.6, delta: 60.2, weight: 0, params: { stasis_mean: 3.7 + offset } },
    { id: 'stasis', label: 'stasis', k: 2, logLik: -2.5, aicc: 10.3, delta: 13.2, weight: 0.001, params: { stasis_mean: 3.7 + offset, stasis_variance: 0.15 } },
    { id: 'random-walk', label: 'unbiased random walk', k: 2, logLik: 4.1, aicc: -2.9, delta: 0, weight: 0.64, params: { ancestral_mean: 3.12 + offset, step_variance: 0.05 } },
    { id: 'directional-walk', label: 'directional walk (random walk with drift)', k: 3, logLik: 5.0, aicc: -1.5, delta: 1.4, weight: 0.32, params: { ancestral_mean: 3.1 + offset, drift: 0.29, step_variance: 0.004 } },
    options.withOuNotCompared
      ? { id: 'ou', label: 'Ornstein–Uhlenbeck (approach to an optimum)', k: 4, logLik: null, aicc: null, delta: null, weight: null, params: {}, notCompared: 'not fitted: the search did not converge' }
      : { id: 'ou', label: 'Ornstein–Uhlenbeck (approach to an optimum)', k: 4, logLik: 5.2, aicc: 3.9, delta: 6.8, weight: 0.039, params: { ancestral_mean: 3.1 + offset, optimum: 4.6 + offset, alpha: 0.35, step_variance: 0.01 } },
  ];
  // Rank: the chosen best gets ΔAICc 0 (the weights stay as listed; the figures only read them).
  const document = {
    section: options.section ?? 'Test Ridge',
    trait: 'valve width',
    horizons: ages.length,
    time_unit: 'Myr',
    position_kind: 'age',
    transform: 'none',
    sampling_variance: 'per-horizon',
    best_model: best,
    models: rows.map(modelEntry),
    data: {
      time,
      position: ages,
      mean: means,
      n: ages.map(() => 20),
      within_variance: ridgeSamplingVariances.map((value) => value * 20),
      sampling_variance: ridgeSamplingVariances,
      extrapolated: ages.map(() => false),
      line: ages.map((_, i) => i + 2),
    },
    smoothed: {
      model: best,
      mean: means.map((mean, i) => mean - 0.01 * Math.sin(i)),
      standard_error: ridgeSamplingVariances.map((value) => Math.sqrt(value) * 0.8),
    },
  };
  return document;
}
