import { allocateStateSpace, type StateSpace } from '../engine/state-space.js';
import type { Lineage } from '../lineage.js';
import type { EvolutionModel, MeanCovariance, ParameterSpec } from '../models/model.js';
import { distinctTimes, mergeSections, stackSections, unionAxes } from './stack.js';

/** The hypotheses `compare` ranks for each model family. */
export type HypothesisId = 'separate' | 'shared' | 'shared-offset';

/** A joint model over several sections and the one stacked lineage it is fitted to. */
export interface JointModel {
  readonly hypothesis: Exclude<HypothesisId, 'separate'>;
  readonly base: EvolutionModel;
  readonly sections: readonly Lineage[];
  /** Satisfies EvolutionModel, so the ordinary fitter fits it. */
  readonly model: EvolutionModel;
  /** The lineage the model is fitted to (all horizons of all sections). */
  readonly lineage: Lineage;
  /** The base model's parameters for section s, from the joint estimates. */
  sectionParameters(estimates: Record<string, number>, s: number): Record<string, number>;
}

/**
 * Name of a per-section parameter: `ancestral_mean[Section name]`.
 *
 * @example
 * perSectionName('ancestral_mean', 'Upper cliff'); // 'ancestral_mean[Upper cliff]'
 */
export function perSectionName(name: string, section: string): string {
  return `${name}[${section}]`;
}

/** The base parameters that each section keeps for itself under "shared": its starting value. */
export const perSectionParameters: readonly string[] = ['ancestral_mean'];

function middleProcess(base: EvolutionModel, lineage: Lineage): number[] {
  const chosen: number[] = [];
  for (const axis of base.process) {
    const [lower, upper] = axis.range(lineage, chosen);
    chosen.push(Math.sqrt(lower * upper));
  }
  return chosen;
}

function uniqueSectionNames(sections: readonly Lineage[]): string[] {
  const names = sections.map((section, s) => section.section || `section ${s + 1}`);
  if (new Set(names).size !== names.length) throw new Error('compare: two sections with the same name');
  return names;
}

/**
 * Shared process, own starting values: every section follows the base model
 * with the same process parameters (drift, step variance, stasis variance,
 * alpha, optimum, stasis mean — everything but the starting value), each
 * section starting from its own ancestral_mean at its own first horizon, and
 * the sections' latent processes independent of one another. Models without a
 * starting value (stasis, strict stasis) share everything: one mean and one
 * variance for all sections.
 *
 * Likelihood: the sections stacked end to end, the latent process restarted
 * (transition 0, the base model's initial variance) at each section's first
 * horizon, so the covariance is block-diagonal with the base model's blocks
 * and the log-likelihood at given parameters is the sum of the sections'.
 * K = K_base + (S - 1) x (number of per-section parameters).
 *
 * @example
 * const a = lineageFromArrays({ section: 'A', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] });
 * const b = lineageFromArrays({ section: 'B', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] });
 * const joint = sharedModel(randomWalk, [a, b]);
 * joint.model.parameters.map((parameter) => parameter.name); // ['ancestral_mean[A]', 'ancestral_mean[B]', 'step_variance']
 * Array.from(joint.lineage.time); // [0, 1, 0, 1] (each section keeps its own clock)
 * joint.sectionParameters({ 'ancestral_mean[A]': 1, 'ancestral_mean[B]': 4, step_variance: 2 }, 1); // { ancestral_mean: 4, step_variance: 2 }
 */
export function sharedModel(base: EvolutionModel, sections: readonly Lineage[]): JointModel {
  const names = uniqueSectionNames(sections);
  const count = sections.length;
  const { lineage, rows } = stackSections(sections);
  const baseWidth = base.width(sections[0]);
  const probe = middleProcess(base, distinctTimes(sections[0]));
  // Which base design columns are per section: those the starting value fixes.
  const ownNames = base.parameters.filter((spec) => spec.role === 'location' && perSectionParameters.includes(spec.name)).map((spec) => spec.name);
  const ownColumns = ownNames.map((name) => base.fixLocation(name, 0, probe, sections[0]).index);
  const sharedColumns = Array.from({ length: baseWidth }, (_, j) => j).filter((j) => !ownColumns.includes(j));
  const own = ownColumns.length;
  const width = own * count + sharedColumns.length;
  /** Joint design column of base column j in section s. */
  const columnOf = (s: number, j: number): number => {
    const q = ownColumns.indexOf(j);
    return q >= 0 ? s * own + q : own * count + sharedColumns.indexOf(j);
  };
  const subspaces: StateSpace[] = sections.map((section) => allocateStateSpace(section.mean.length, baseWidth, section.samplingVariance));
  const parameters: ParameterSpec[] = [
    ...sections.flatMap((_, s) => base.parameters
      .filter((spec) => ownNames.includes(spec.name))
      .map((spec) => ({ ...spec, name: perSectionName(spec.name, names[s]), label: `${spec.label}, ${names[s]}` }))),
    // A runaway parameter names the base design column of its finite limit coefficient; here that column sits at its joint place.
    ...base.parameters.filter((spec) => !ownNames.includes(spec.name))
      .map((spec) => (spec.runaway ? { ...spec, runaway: { ...spec.runaway, coefficient: columnOf(0, spec.runaway.coefficient) } } : spec)),
  ];
  const sectionParameters = (estimates: Record<string, number>, s: number): Record<string, number> => {
    const out: Record<string, number> = {};
    for (const spec of base.parameters) out[spec.name] = ownNames.includes(spec.name) ? estimates[perSectionName(spec.name, names[s])] : estimates[spec.name];
    return out;
  };
  const model: EvolutionModel = {
    id: base.id,
    label: base.label,
    summary: `${base.summary} Shared by every section; each section starts from its own value.`,
    citation: base.citation,
    parameters,
    process: unionAxes(base, sections.map(distinctTimes)),
    minimumHorizons: base.minimumHorizons,
    width: () => width,
    parameterCount: () => base.parameterCount(sections[0]) + (count - 1) * own,
    fillSpace(_lineage, process, space) {
      space.design.fill(0);
      for (let s = 0; s < count; s++) {
        const sub = subspaces[s];
        base.fillSpace(sections[s], process, sub);
        const start = rows[s];
        for (let i = 0; i < sub.size; i++) {
          space.transition[start + i] = i === 0 ? 0 : sub.transition[i];
          space.processVariance[start + i] = sub.processVariance[i];
          for (let j = 0; j < baseWidth; j++) space.design[(start + i) * width + columnOf(s, j)] = sub.design[i * baseWidth + j];
        }
      }
    },
    toParameters(coefficients, process) {
      const out: Record<string, number> = {};
      for (let s = 0; s < count; s++) {
        const baseCoefficients = Array.from({ length: baseWidth }, (_, j) => coefficients[columnOf(s, j)]);
        const values = base.toParameters(baseCoefficients, process, sections[s]);
        for (const [name, value] of Object.entries(values)) {
          if (ownNames.includes(name)) out[perSectionName(name, names[s])] = value;
          else if (s === 0) out[name] = value;
        }
      }
      return out;
    },
    constantCoefficients(process) {
      const constant = base.constantCoefficients(process, sections[0]);
      const out = new Float64Array(width);
      for (let s = 0; s < count; s++) for (let j = 0; j < baseWidth; j++) out[columnOf(s, j)] = constant[j];
      return out;
    },
    fixLocation(name, value, process) {
      for (let s = 0; s < count; s++) {
        for (const ownName of ownNames) {
          if (name === perSectionName(ownName, names[s])) {
            const fixed = base.fixLocation(ownName, value, process, sections[s]);
            return { index: columnOf(s, fixed.index), coefficient: fixed.coefficient };
          }
        }
      }
      const fixed = base.fixLocation(name, value, process, sections[0]);
      return { index: columnOf(0, fixed.index), coefficient: fixed.coefficient };
    },
    processFrom: (values) => base.processFrom(sectionParameters(values, 0), sections[0]),
    coefficientsFrom(values) {
      const out = new Array<number>(width).fill(0);
      for (let s = 0; s < count; s++) {
        const baseCoefficients = base.coefficientsFrom(sectionParameters(values, s), sections[s]);
        for (let j = 0; j < baseWidth; j++) out[columnOf(s, j)] = baseCoefficients[j];
      }
      return out;
    },
    meanCovariance(_lineage, values): MeanCovariance {
      // Block-diagonal: each section's own dense form (MODELS.md) on its own time axis, independent across sections.
      const size = lineage.mean.length;
      const mean = new Float64Array(size);
      const covariance = Array.from({ length: size }, () => new Array<number>(size).fill(0));
      for (let s = 0; s < count; s++) {
        const block = base.meanCovariance(sections[s], sectionParameters(values, s));
        const start = rows[s];
        for (let i = 0; i < block.mean.length; i++) {
          mean[start + i] = block.mean[i];
          for (let j = 0; j < block.mean.length; j++) covariance[start + i][start + j] = block.covariance[i][j];
        }
      }
      return { mean, covariance };
    },
    expectation: (values, time) => base.expectation(sectionParameters(values, 0), time),
  };
  return { hypothesis: 'shared', base, sections, model, lineage, sectionParameters };
}

/**
 * One lineage with a constant offset per locality: all sections record the
 * same evolving lineage — one latent trajectory of the base model on the
 * common timescale, starting at the oldest horizon of all sections with one
 * set of parameters (ancestral mean, drift, optimum, variances, alpha) — and
 * each section's horizon means are shifted by a constant offset c_s
 * (ecophenotypic or calibration difference), with c = 0 for the first
 * section (the reference) so the offsets are identifiable.
 *
 * mean_i = mu_base(T_i) + c_{s(i)}, C_ij = C_base(T_i, T_j) for all pairs,
 * including horizons of different sections (T = common time; coeval horizons
 * are separate observations of the same latent state).
 * K = K_base + (S - 1).
 *
 * @example
 * const a = { ...lineageFromArrays({ section: 'A', time: [0, 1], mean: [1, 3], samplingVariance: [1, 1] }), firstAge: 10 };
 * const b = { ...lineageFromArrays({ section: 'B', time: [0, 1], mean: [4, 4], samplingVariance: [1, 1] }), firstAge: 9 };
 * const joint = offsetModel(randomWalk, [a, b]);
 * joint.model.parameters.map((parameter) => parameter.name); // ['ancestral_mean', 'step_variance', 'offset[B]']
 * Array.from(joint.lineage.time); // [0, 1, 1, 2] (common time from age 10)
 */
export function offsetModel(base: EvolutionModel, sections: readonly Lineage[]): JointModel {
  const names = uniqueSectionNames(sections);
  const count = sections.length;
  const { lineage, sectionOf } = mergeSections(sections);
  const rangeLineage = distinctTimes(lineage);
  const baseWidth = base.width(lineage);
  const width = baseWidth + count - 1;
  const sub = allocateStateSpace(lineage.mean.length, baseWidth, lineage.samplingVariance);
  const offsetName = (s: number): string => perSectionName('offset', names[s]);
  const offsets: ParameterSpec[] = names.slice(1).map((name, k) => ({
    name: offsetName(k + 1),
    label: `offset of ${name} from ${names[0]}`,
    role: 'location',
    unit: { trait: 1, time: 0 },
    lowerBound: Number.NEGATIVE_INFINITY,
  }));
  const baseParameters = (values: Record<string, number>): Record<string, number> => {
    const out: Record<string, number> = {};
    for (const spec of base.parameters) out[spec.name] = values[spec.name];
    return out;
  };
  const sectionParameters = (estimates: Record<string, number>, s: number): Record<string, number> => {
    const out = baseParameters(estimates);
    const shift = s === 0 ? 0 : estimates[offsetName(s)];
    // The section's own view: the shared trajectory shifted by its offset.
    for (const spec of base.parameters) if (spec.role === 'location' && spec.unit.time === 0) out[spec.name] += shift;
    return out;
  };
  const model: EvolutionModel = {
    id: base.id,
    label: base.label,
    summary: `${base.summary} One trajectory for all sections on the common timescale, with a constant offset per section.`,
    citation: base.citation,
    parameters: [...base.parameters, ...offsets],
    process: unionAxes(base, [rangeLineage, ...sections]),
    minimumHorizons: base.minimumHorizons + count - 1,
    width: () => width,
    parameterCount: () => base.parameterCount(lineage) + count - 1,
    fillSpace(_lineage, process, space) {
      base.fillSpace(lineage, process, sub);
      space.design.fill(0);
      for (let i = 0; i < sub.size; i++) {
        space.transition[i] = sub.transition[i];
        space.processVariance[i] = sub.processVariance[i];
        for (let j = 0; j < baseWidth; j++) space.design[i * width + j] = sub.design[i * baseWidth + j];
        if (sectionOf[i] > 0) space.design[i * width + baseWidth + sectionOf[i] - 1] = 1;
      }
    },
    toParameters(coefficients, process) {
      const out = base.toParameters(Array.from({ length: baseWidth }, (_, j) => coefficients[j]), process, lineage);
      for (let s = 1; s < count; s++) out[offsetName(s)] = coefficients[baseWidth + s - 1];
      return out;
    },
    constantCoefficients(process) {
      const out = new Float64Array(width);
      out.set(base.constantCoefficients(process, lineage));
      return out;
    },
    fixLocation(name, value, process) {
      for (let s = 1; s < count; s++) if (name === offsetName(s)) return { index: baseWidth + s - 1, coefficient: value };
      return base.fixLocation(name, value, process, lineage);
    },
    processFrom: (values) => base.processFrom(baseParameters(values), lineage),
    coefficientsFrom(values) {
      return [...base.coefficientsFrom(baseParameters(values), lineage), ...names.slice(1).map((_, k) => values[offsetName(k + 1)])];
    },
    meanCovariance(_lineage, values): MeanCovariance {
      // Straight from the definition: the base model's dense form on common time, plus each row's section offset.
      const dense = base.meanCovariance(lineage, baseParameters(values));
      const mean = Float64Array.from(dense.mean, (value, i) => value + (sectionOf[i] === 0 ? 0 : values[offsetName(sectionOf[i])]));
      return { mean, covariance: dense.covariance };
    },
    expectation: (values, time) => base.expectation(baseParameters(values), time),
  };
  return { hypothesis: 'shared-offset', base, sections, model, lineage, sectionParameters };
}
