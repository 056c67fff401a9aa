import { buildCovariance, sliceLineage, stasisVarianceRange, type EvolutionModel, type LikelihoodBlock, type ParameterSpec } from './model.js';
import { directionalWalk } from './directional-walk.js';
import { minimumSegmentOf, shiftEstimates, shiftIndicesFrom, shiftMethodsNote, shiftPlacements, shiftsOf } from './punctuated-shifts.js';
import { randomWalk } from './random-walk.js';
import { stasis } from './stasis.js';
import { stepVarianceRange } from './walk-dynamics.js';

/** A mode of evolution a segment can follow. */
export type SegmentMode = 'stasis' | 'random-walk' | 'directional-walk';

const modeWords: Record<SegmentMode, string> = { stasis: 'stasis', 'random-walk': 'random walk', 'directional-walk': 'directional walk' };

const modeShiftHelp = {
  heading: 'FIRST-then-SECOND',
  lines: [
    'mode shift: one shift between two different modes from stasis, random-walk,',
    'directional-walk (all 6 ordered pairs, e.g. stasis-then-random-walk). A stasis',
    'segment has its own mean and variance; a walk after the shift continues from',
    'the latent lineage mean at the last horizon before it; a walk first starts at',
    'ancestral_mean (K = its parameters + 1: 4 to 6)',
  ],
};

// A location per time unit is a segment's drift, a variance per time unit its step variance: rates of the lineage (`--rates`).
const location = (name: string, label: string, time = 0): ParameterSpec => ({ name, label, role: 'location', unit: { trait: 1, time }, lowerBound: Number.NEGATIVE_INFINITY, ...(time === -1 ? { rate: 'drift' as const } : {}) });
const variance = (name: string, label: string, time = 0): ParameterSpec => ({ name, label, role: 'variance', unit: { trait: 2, time }, lowerBound: 0, ...(time === -1 ? { rate: 'step-variance' as const } : {}) });

/**
 * A mode shift: one shift splits the sequence into two segments that follow
 * different modes (stasis, random-walk, directional-walk). Horizons
 * 0..s-1 form segment 1 and s..N-1 segment 2 (s the shift index), with
 * t_p = t_{s-1} the time of the last horizon of segment 1.
 *
 * - A stasis segment has its own mean theta and variance omega: z_i = theta + N(0, omega), independent.
 * - A walk segment that comes first starts exactly at ancestral_mean a at t_0.
 * - A walk segment that comes second continues from the latent lineage mean
 *   z_{s-1} at the last horizon of segment 1: z_i = z_{s-1} + delta (t_i - t_p)
 *   + W(t_i - t_p), W Brownian with step variance sigma2 (delta = 0 for a
 *   random walk). So the latent mean is continuous at the shift.
 *
 * Mean and covariance (written out in {@link EvolutionModel.meanCovariance}):
 * stasis then walk: mu_i = theta (i < s), theta + delta_2 (t_i - t_p) (i >= s);
 * C = omega on the diagonal of segment 1, Cov(z_{s-1}, z_j) = omega for j >= s,
 * and omega + sigma2_2 (min(t_i, t_j) - t_p) within segment 2.
 * walk then stasis: the two segments are independent (a walk on segment 1,
 * stasis on segment 2). walk then walk: mu_i = a + delta_1 min(t_i, t_p) +
 * delta_2 max(0, t_i - t_p), C_ij = sigma2_1 min(t_i, t_j, t_p) + sigma2_2
 * max(0, min(t_i, t_j) - t_p).
 *
 * Parameters carry the segment number: segment_1_mean, segment_1_variance,
 * ancestral_mean, segment_K_drift (trait per time unit), segment_K_step_variance
 * (trait^2 per time unit). K = the parameters listed + 1 for the shift position.
 *
 * After Hunt, G., Hopkins, M. J. & Lidgard, S. (2015). Simple versus complex
 * models of trait evolution and stasis as a response to environmental change.
 * PNAS 112:4885-4890.
 *
 * @example
 * const model = modeShift('stasis', 'random-walk');
 * model.parameters.map((parameter) => parameter.name); // ['segment_1_mean', 'segment_1_variance', 'segment_2_step_variance']
 * modeShift('stasis', 'stasis');
 * // throws: a mode shift needs two different modes
 */
export function modeShift(first: SegmentMode, second: SegmentMode): EvolutionModel {
  if (first === second) throw new RangeError('a mode shift needs two different modes');
  const locations: ParameterSpec[] = [];
  const variances: ParameterSpec[] = [];
  if (first === 'stasis') {
    locations.push(location('segment_1_mean', 'segment 1 (stasis) mean'));
    variances.push(variance('segment_1_variance', 'segment 1 stasis variance'));
  } else {
    locations.push(location('ancestral_mean', 'ancestral mean'));
    if (first === 'directional-walk') locations.push(location('segment_1_drift', 'segment 1 drift', -1));
    variances.push(variance('segment_1_step_variance', 'segment 1 step variance', -1));
  }
  if (second === 'stasis') {
    locations.push(location('segment_2_mean', 'segment 2 (stasis) mean'));
    variances.push(variance('segment_2_variance', 'segment 2 stasis variance'));
  } else {
    if (second === 'directional-walk') locations.push(location('segment_2_drift', 'segment 2 drift', -1));
    variances.push(variance('segment_2_step_variance', 'segment 2 step variance', -1));
  }
  const locationNames = locations.map((spec) => spec.name);
  const varianceNames = variances.map((spec) => spec.name);
  const width = locations.length;
  const secondIsWalk = second !== 'stasis';
  const firstIsStasis = first === 'stasis';
  const column = (name: string): number => locationNames.indexOf(name);
  /** Design row i, given the shift index s and t_p. */
  const designValue = (name: string, i: number, t: number, shift: number, previousTime: number): number => {
    const inFirst = i < shift;
    switch (name) {
      case 'segment_1_mean':
      case 'ancestral_mean':
        return inFirst || secondIsWalk ? 1 : 0;
      case 'segment_1_drift':
        return inFirst ? t : secondIsWalk ? previousTime : 0;
      case 'segment_2_mean':
        return inFirst ? 0 : 1;
      case 'segment_2_drift':
        return inFirst ? 0 : t - previousTime;
      default:
        return 0;
    }
  };
  const get = (parameters: Record<string, number>, name: string): number => (locationNames.includes(name) || varianceNames.includes(name) ? parameters[name] : 0);
  /** Mean of z at elapsed time t, straight from the definition. */
  const meanAt = (parameters: Record<string, number>, t: number, inFirst: boolean, previousTime: number): number => {
    if (first === 'stasis') return inFirst ? parameters.segment_1_mean : parameters.segment_1_mean + get(parameters, 'segment_2_drift') * (t - previousTime);
    const start = parameters.ancestral_mean;
    const drift1 = get(parameters, 'segment_1_drift');
    if (!secondIsWalk) return inFirst ? start + drift1 * t : parameters.segment_2_mean;
    return start + drift1 * Math.min(t, previousTime) + get(parameters, 'segment_2_drift') * Math.max(0, t - previousTime);
  };
  /** The design at shift index `shift` over one time axis, kept for the last shift asked for (per model and time axis). */
  const designs = new WeakMap<Float64Array, { shift: number; design: Float64Array }>();
  const designAt = (time: Float64Array, shift: number): Float64Array => {
    let kept = designs.get(time);
    if (kept === undefined || kept.design.length !== time.length * width) {
      kept = { shift: -1, design: new Float64Array(time.length * width) };
      designs.set(time, kept);
    }
    if (kept.shift !== shift) {
      const previousTime = time[shift - 1];
      for (let i = 0; i < time.length; i++) for (let j = 0; j < width; j++) kept.design[i * width + j] = designValue(locationNames[j], i, time[i], shift, previousTime);
      kept.shift = shift;
    }
    return kept.design;
  };
  const id = `${first}-then-${second}`;
  const minimumSegment = (options: { minimumSegment?: number }): number => minimumSegmentOf(options, 3);
  const model: EvolutionModel = {
    id,
    label: `mode shift: ${modeWords[first]}, then ${modeWords[second]}`,
    summary: `One shift: ${modeWords[first]} up to the shift, ${modeWords[second]} after it${secondIsWalk ? ' (the walk continues from the latent lineage mean at the last horizon before the shift)' : ' (a stasis segment with its own mean and variance)'}; shift position searched exhaustively.`,
    citation: 'After Hunt, G., Hopkins, M. J. & Lidgard, S. (2015). Simple versus complex models of trait evolution and stasis as a response to environmental change. PNAS 112:4885-4890.',
    referenceKeys: ['huntHopkinsLidgard2015'],
    plainWords: 'the mode of change shifted once during the sequence',
    methodsNotes: [shiftMethodsNote],
    // The six pairs share one help entry, given by the first of them.
    ...(first === 'stasis' && second === 'random-walk' ? { help: modeShiftHelp } : {}),
    parameters: [...locations, ...variances],
    process: variances.map((spec) => ({
      name: spec.name,
      allowZero: true,
      range: (lineage) => {
        return spec.unit.time === -1 ? stepVarianceRange(lineage) : stasisVarianceRange(lineage);
      },
    })),
    minimumHorizons: 6,
    width: () => width,
    parameterCount: () => locations.length + variances.length + 1,
    configurations: (lineage, options) => shiftPlacements(lineage.mean.length, 1, minimumSegment(options)),
    shiftCount: 1,
    // Rows before the shift follow the first mode with the first variance, and their design does not depend on
    // the shift (designValue for i < s), so the search resumes the filter there (issue 14).
    prefixAxes: 1,
    fillSpace(lineage, process, space) {
      // Called for every likelihood evaluation of the shift search: no array per call, and the design (which
      // depends on the shift only) kept for the last shift per time axis (issue 14).
      const shift = Math.round(process[2]);
      const time = lineage.time;
      space.design.set(designAt(time, shift).subarray(0, space.size * width));
      for (let i = 0; i < space.size; i++) {
        const inFirst = i < shift;
        const stasisMode = inFirst ? firstIsStasis : !secondIsWalk;
        const processValue = inFirst ? process[0] : process[1];
        if (stasisMode) {
          space.transition[i] = 0;
          space.processVariance[i] = processValue;
        } else if (i === 0) {
          space.transition[i] = 0;
          space.processVariance[i] = 0;
        } else {
          space.transition[i] = 1;
          space.processVariance[i] = processValue * (time[i] - time[i - 1]);
        }
      }
    },
    toParameters(coefficients, process, lineage) {
      const record: Record<string, number> = {};
      locationNames.forEach((name, j) => (record[name] = coefficients[j]));
      varianceNames.forEach((name, j) => (record[name] = process[j]));
      return { ...record, ...shiftEstimates(lineage, shiftsOf(process, 2, 1)) };
    },
    constantCoefficients: () => Float64Array.from(locationNames, (name) => (name.endsWith('_drift') ? 0 : 1)),
    fixLocation: (name, value) => ({ index: column(name), coefficient: value }),
    processFrom: (parameters, lineage) => [...varianceNames.map((name) => parameters[name]), ...shiftIndicesFrom(parameters, 1, lineage)],
    coefficientsFrom: (parameters) => locationNames.map((name) => parameters[name]),
    meanCovariance(lineage, parameters) {
      const time = lineage.time;
      const shiftTime = parameters.shift_1_time;
      const previousTime = parameters.shift_1_previous_time;
      const inFirst = (i: number): boolean => time[i] < shiftTime;
      const first1 = varianceNames[0];
      const v1 = parameters[first1];
      const v2 = parameters[varianceNames[1]];
      const entry = (i: number, j: number): number => {
        if (first === 'stasis') {
          if (inFirst(i) && inFirst(j)) return i === j ? v1 : 0;
          if (inFirst(i) || inFirst(j)) {
            const early = inFirst(i) ? i : j;
            return time[early] === previousTime ? v1 : 0;
          }
          return v1 + v2 * (Math.min(time[i], time[j]) - previousTime);
        }
        if (!secondIsWalk) {
          if (inFirst(i) && inFirst(j)) return v1 * Math.min(time[i], time[j]);
          if (!inFirst(i) && !inFirst(j)) return i === j ? v2 : 0;
          return 0;
        }
        const shared = Math.min(time[i], time[j]);
        return v1 * Math.min(shared, previousTime) + v2 * Math.max(0, shared - previousTime);
      };
      return {
        mean: Float64Array.from(time, (t, i) => meanAt(parameters, t, inFirst(i), previousTime)),
        covariance: buildCovariance(time.length, entry),
      };
    },
    expectation(parameters, time) {
      const shiftTime = parameters.shift_1_time;
      const previousTime = parameters.shift_1_previous_time;
      const v1 = parameters[varianceNames[0]];
      const v2 = parameters[varianceNames[1]];
      // In continuous time a walk after the shift starts at t_p (the last horizon before it); a stasis segment after
      // the shift is drawn from the first horizon of the new segment.
      const firstAt = (t: number): boolean => (secondIsWalk ? t <= previousTime : t < shiftTime);
      const varianceAt = (t: number): number => {
        const inFirst = firstAt(t);
        if (first === 'stasis') return inFirst ? v1 : v1 + v2 * (t - previousTime);
        if (!secondIsWalk) return inFirst ? v1 * t : v2;
        return v1 * Math.min(t, previousTime) + v2 * Math.max(0, t - previousTime);
      };
      return {
        mean: Float64Array.from(time, (t) => meanAt(parameters, t, firstAt(t), previousTime)),
        variance: Float64Array.from(time, varianceAt),
      };
    },
  };
  if (!secondIsWalk) {
    // walk then stasis: block-diagonal covariance, no shared parameter, so the likelihood is the walk's on segment 1 plus stasis on segment 2.
    const walk = first === 'directional-walk' ? directionalWalk : randomWalk;
    const blocks = (lineage: Parameters<NonNullable<EvolutionModel['blocks']>>[0], configuration: { shifts: readonly number[] }): LikelihoodBlock[] => {
      const [shift] = configuration.shifts;
      return [
        { model: walk, lineage: sliceLineage(lineage, 0, shift), names: { ancestral_mean: 'ancestral_mean', drift: 'segment_1_drift', step_variance: 'segment_1_step_variance' } },
        { model: stasis, lineage: sliceLineage(lineage, shift, lineage.mean.length), names: { stasis_mean: 'segment_2_mean', stasis_variance: 'segment_2_variance' } },
      ];
    };
    return { ...model, blocks };
  }
  return model;
}

/** The six ordered pairs of different modes. */
export const modeShiftModels: readonly EvolutionModel[] = [
  modeShift('stasis', 'random-walk'),
  modeShift('stasis', 'directional-walk'),
  modeShift('random-walk', 'stasis'),
  modeShift('directional-walk', 'stasis'),
  modeShift('random-walk', 'directional-walk'),
  modeShift('directional-walk', 'random-walk'),
];
