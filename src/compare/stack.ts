import type { Lineage } from '../lineage.js';
import type { EvolutionModel, ProcessAxis } from '../models/model.js';

/**
 * Sections of one trait laid on one common timescale: each section's horizon
 * ages are age_i = firstAge - t_i (its `firstAge`, 0 when absent), and common
 * time is measured from the oldest horizon of all sections.
 */
export interface CommonTime {
  /** Age of the oldest horizon over all sections. */
  readonly origin: number;
  /** Common time of each section's first horizon: origin - firstAge_s (0 for the oldest section). */
  readonly starts: readonly number[];
}

/**
 * The common timescale of a set of sections (see {@link CommonTime}).
 *
 * @example
 * const a = { ...lineageFromArrays({ section: 'A', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] }), firstAge: 9 };
 * commonTime([a, b]); // { origin: 10, starts: [0, 1] }
 */
export function commonTime(sections: readonly Lineage[]): CommonTime {
  const ages = sections.map((section) => section.firstAge ?? 0);
  const origin = Math.max(...ages);
  return { origin, starts: ages.map((age) => origin - age) };
}

/** Concatenate typed arrays. */
function concatenate(parts: readonly ArrayLike<number>[]): Float64Array {
  const total = parts.reduce((sum, part) => sum + part.length, 0);
  const out = new Float64Array(total);
  let offset = 0;
  for (const part of parts) {
    out.set(Array.from(part), offset);
    offset += part.length;
  }
  return out;
}

/**
 * Display name of several sections together.
 *
 * @example
 * const section = (name) => lineageFromArrays({ section: name, time: [0, 1], mean: [1, 2], samplingVariance: [1, 1] });
 * sectionsName([section('A'), section('')]); // 'A + lineage'
 */
export function sectionsName(sections: readonly Lineage[]): string {
  return sections.map((section) => section.section || 'lineage').join(' + ');
}

/**
 * Sections stacked end to end as one "lineage" whose elapsed time restarts at
 * 0 at each section's first horizon (each section keeps its own time axis).
 * Used by the shared hypothesis, where the latent process restarts per
 * section (a block-diagonal covariance). `rows[s]` is the first row of section s.
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', time: [0, 1, 2], mean: [4, 4, 5], samplingVariance: [1, 1, 1] });
 * const stacked = stackSections([a, b]);
 * stacked.rows; // [0, 2]
 * Array.from(stacked.lineage.time); // [0, 1, 0, 1, 2]
 * stacked.lineage.section; // 'A + B'
 */
export function stackSections(sections: readonly Lineage[]): { lineage: Lineage; rows: number[] } {
  const rows: number[] = [];
  let row = 0;
  for (const section of sections) {
    rows.push(row);
    row += section.mean.length;
  }
  const first = sections[0];
  return {
    rows,
    lineage: {
      section: sectionsName(sections),
      trait: first.trait,
      time: concatenate(sections.map((section) => section.time)),
      position: concatenate(sections.map((section) => section.position)),
      positionKind: first.positionKind,
      mean: concatenate(sections.map((section) => section.mean)),
      count: concatenate(sections.map((section) => section.count)),
      withinVariance: concatenate(sections.map((section) => section.withinVariance)),
      samplingVariance: concatenate(sections.map((section) => section.samplingVariance)),
      covariate: null,
      lines: sections.flatMap((section) => [...section.lines]),
      extrapolated: sections.flatMap((section) => [...section.extrapolated]),
      firstAge: first.firstAge,
      timeUnit: first.timeUnit,
      traitUnit: first.traitUnit ?? null,
      pooled: first.pooled,
      logTransformed: first.logTransformed,
    },
  };
}

/** Horizons of several sections merged onto the common timescale, with the section each came from. */
export interface MergedSections {
  /** One lineage, sorted by common time (oldest first; coeval horizons in section order). Times may repeat. */
  readonly lineage: Lineage;
  /** Index of the section of each row. */
  readonly sectionOf: readonly number[];
}

/**
 * Merge sections onto one timeline: time T_i = origin - age_i from the oldest
 * horizon of all sections. Coeval horizons (equal ages in different sections)
 * stay separate rows with equal times unless `mergeCoeval`, which pools them
 * into one horizon: n = sum n_k, mean = sum n_k x_k / n, within-horizon
 * variance = (sum (n_k - 1) v_k + sum n_k (x_k - mean)^2) / (n - 1) — the
 * sample variance of the pooled specimens (common practice) — and sampling
 * variance v / n. A merged row belongs to the first of its sections.
 *
 * @example
 * // Coeval horizons at common time 1: n = 1 + 1, mean (3 + 4) / 2, variance ((3 - 3.5)^2 + (4 - 3.5)^2) / 1 = 0.5.
 * const a = { ...lineageFromArrays({ section: 'A', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] }), firstAge: 9 };
 * mergeSections([a, b]).sectionOf; // [0, 0, 1, 1]
 * const merged = mergeSections([a, b], { mergeCoeval: true }).lineage;
 * Array.from(merged.time); // [0, 1, 2]
 * Array.from(merged.mean); // [1, 3.5, 4]
 * Array.from(merged.withinVariance); // [1, 0.5, 1]
 */
export function mergeSections(sections: readonly Lineage[], options: { mergeCoeval?: boolean } = {}): MergedSections {
  const { starts } = commonTime(sections);
  const rows: { time: number; section: number; index: number }[] = [];
  sections.forEach((section, s) => {
    for (let i = 0; i < section.time.length; i++) rows.push({ time: starts[s] + section.time[i], section: s, index: i });
  });
  rows.sort((a, b) => a.time - b.time || a.section - b.section);
  type Row = { time: number; section: number; position: number; mean: number; count: number; within: number; sampling: number; line: number; extrapolated: boolean };
  let merged: Row[] = rows.map(({ time, section, index }) => {
    const lineage = sections[section];
    return {
      time,
      section,
      position: lineage.position[index],
      mean: lineage.mean[index],
      count: lineage.count[index],
      within: lineage.withinVariance[index],
      sampling: lineage.samplingVariance[index],
      line: lineage.lines[index],
      extrapolated: lineage.extrapolated[index],
    };
  });
  if (options.mergeCoeval) {
    const pooled: Row[] = [];
    for (const row of merged) {
      const previous = pooled[pooled.length - 1];
      if (!previous || previous.time !== row.time) {
        pooled.push({ ...row });
        continue;
      }
      const count = previous.count + row.count;
      const mean = (previous.count * previous.mean + row.count * row.mean) / count;
      const squares = (previous.count - 1) * previous.within + (row.count - 1) * row.within
        + previous.count * (previous.mean - mean) ** 2 + row.count * (row.mean - mean) ** 2;
      const within = squares / (count - 1);
      pooled[pooled.length - 1] = { ...previous, count, mean, within, sampling: within / count, extrapolated: previous.extrapolated || row.extrapolated };
    }
    merged = pooled;
  }
  const first = sections[0];
  const origin = commonTime(sections).origin;
  return {
    sectionOf: merged.map((row) => row.section),
    lineage: {
      section: options.mergeCoeval ? `composite of ${sectionsName(sections)} (coeval horizons merged)` : `composite of ${sectionsName(sections)}`,
      trait: first.trait,
      time: Float64Array.from(merged, (row) => row.time),
      position: Float64Array.from(merged, (row) => row.position),
      positionKind: first.positionKind,
      mean: Float64Array.from(merged, (row) => row.mean),
      count: Float64Array.from(merged, (row) => row.count),
      withinVariance: Float64Array.from(merged, (row) => row.within),
      samplingVariance: Float64Array.from(merged, (row) => row.sampling),
      covariate: null,
      lines: merged.map((row) => row.line),
      extrapolated: merged.map((row) => row.extrapolated),
      firstAge: origin,
      timeUnit: first.timeUnit,
      traitUnit: first.traitUnit ?? null,
      pooled: first.pooled,
      logTransformed: first.logTransformed,
    },
  };
}

/**
 * The lineage with repeated times removed (first row of each time kept), so
 * search ranges built from the shortest interval stay finite.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 1, 3], mean: [4, 4, 1, 2], samplingVariance: [1, 1, 1, 1] });
 * Array.from(distinctTimes(lineage).mean); // [4, 4, 2] (the first row of time 1 kept)
 */
export function distinctTimes(lineage: Lineage): Lineage {
  const keep: number[] = [];
  for (let i = 0; i < lineage.time.length; i++) if (i === 0 || lineage.time[i] !== lineage.time[i - 1]) keep.push(i);
  if (keep.length === lineage.time.length) return lineage;
  const pick = (values: ArrayLike<number>): Float64Array => Float64Array.from(keep, (i) => values[i]);
  return {
    ...lineage,
    time: pick(lineage.time),
    position: pick(lineage.position),
    mean: pick(lineage.mean),
    count: pick(lineage.count),
    withinVariance: pick(lineage.withinVariance),
    samplingVariance: pick(lineage.samplingVariance),
    lines: keep.map((i) => lineage.lines[i]),
    extrapolated: keep.map((i) => lineage.extrapolated[i]),
  };
}

/**
 * A model whose search ranges are taken from the lineage without repeated
 * times: fits a composite with coeval horizons kept as separate samples (a
 * zero interval is legitimate there — no process change between coeval
 * samples — but would make range ends infinite). Everything else is the model itself.
 *
 * @example
 * const lineage = lineageFromArrays({ time: [0, 1, 1, 3], mean: [4, 4, 1, 2], samplingVariance: [1, 1, 1, 1] });
 * toleratingCoeval(randomWalk).process[0].range(lineage, []); // [4.4444444444444443e-10, 1333.3333333333333] (the walk's range on times 0, 1, 3)
 * randomWalk.process[0].range(distinctTimes(lineage), []); // [4.4444444444444443e-10, 1333.3333333333333]
 */
export function toleratingCoeval(model: EvolutionModel): EvolutionModel {
  return {
    ...model,
    process: model.process.map((axis): ProcessAxis => ({ ...axis, range: (lineage, before) => axis.range(distinctTimes(lineage), before) })),
  };
}

/**
 * Search axes of a joint model: the base model's axes, each range the union
 * of the ranges over the given lineages (so every section's plausible values
 * are searched). Limit names are kept.
 *
 * @example
 * const a = lineageFromArrays({ time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ time: [0, 2], mean: [4, 4], samplingVariance: [1, 1] });
 * randomWalk.process[0].range(a, []); // [2e-9, 2000]
 * randomWalk.process[0].range(b, []); // [5e-10, 500]
 * unionAxes(randomWalk, [a, b])[0].range(a, []); // [5e-10, 2000]
 */
export function unionAxes(base: EvolutionModel, lineages: readonly Lineage[]): ProcessAxis[] {
  return base.process.map((axis): ProcessAxis => ({
    ...axis,
    range: (_lineage, before) => {
      let lower = Number.POSITIVE_INFINITY;
      let upper = 0;
      for (const lineage of lineages) {
        const [low, high] = axis.range(lineage, before);
        lower = Math.min(lower, low);
        upper = Math.max(upper, high);
      }
      return [lower, upper];
    },
  }));
}
