import { buildCovariance, type EvolutionModel, type ParameterSpec, stasisVarianceRange } from './model.js';
import {
  minimumSegmentOf,
  boundSharedVariance,
  segmentOfIndex,
  segmentOfTime,
  shiftEstimates,
  shiftIndicesFrom,
  shiftMethodsNote,
  shiftPlacements,
  shiftTimesOf,
  shiftsOf,
} from './punctuated-shifts.js';

const hunt2008 = 'Hunt, G. (2008). Gradual or pulsed evolution: when should punctuational explanations be preferred? Paleobiology 34:360-377.';

/**
 * Punctuated stasis with a shared variance: `shiftCount` shifts split the
 * sequence into contiguous stasis segments, segment k with its own mean
 * theta_k, all with one stasis variance omega. Segment k covers the horizons
 * from shift k - 1 (or the first horizon) up to the horizon before shift k.
 *
 * mu_i = theta_{segment(i)}, C_ij = omega if i = j, else 0.
 *
 * Parameters: segment_K_mean (trait units, K = 1..shiftCount + 1, oldest
 * first) and stasis_variance (trait^2, >= 0). The shift positions are
 * found by exhaustive search over every placement that leaves each segment at
 * least the minimum segment length, and each counts one parameter in K:
 * K = (shiftCount + 1) means + 1 variance + shiftCount positions.
 *
 * Hunt, G. (2008). Gradual or pulsed evolution: when should punctuational
 * explanations be preferred? Paleobiology 34:360-377.
 *
 * @example
 * const model = punctuatedSharedVariance(2);
 * model.parameters.map((parameter) => parameter.name); // ['segment_1_mean', 'segment_2_mean', 'segment_3_mean', 'stasis_variance']
 * model.parameterCount(lineageFromArrays({ time: [0, 1, 2, 3, 4, 5], mean: [0, 0, 0, 1, 1, 1], samplingVariance: Array(6).fill(0.1) })); // 6 (3 means, 1 variance, 2 shift positions)
 */
export function punctuatedSharedVariance(shiftCount: number): EvolutionModel {
  const segments = shiftCount + 1;
  const meanName = (k: number): string => `segment_${k + 1}_mean`;
  const parameters: ParameterSpec[] = [
    ...Array.from({ length: segments }, (_, k): ParameterSpec => ({
      name: meanName(k),
      label: `segment ${k + 1} mean`,
      role: 'location',
      unit: { trait: 1, time: 0 },
      lowerBound: Number.NEGATIVE_INFINITY,
    })),
    { name: 'stasis_variance', label: 'stasis variance (shared by all segments)', role: 'variance', unit: { trait: 2, time: 0 }, lowerBound: 0 },
  ];
  return {
    id: `punctuated-${shiftCount}`,
    label: `punctuated, ${shiftCount} shift${shiftCount === 1 ? '' : 's'} (stasis segments, shared variance)`,
    summary: `${shiftCount} shift${shiftCount === 1 ? '' : 's'} split the sequence into ${segments} stasis segments, each with its own mean and one shared stasis_variance; shift positions searched exhaustively.`,
    citation: hunt2008,
    referenceKeys: ['hunt2008'],
    plainWords: 'the trait mean stayed constant within segments and shifted between them',
    methodsNotes: [shiftMethodsNote],
    ...(shiftCount === 1
      ? { help: { heading: 'punctuated-1, punctuated-2', lines: ['1 or 2 shifts split the sequence into stasis segments with their own means', '(segment_K_mean) and one shared stasis_variance (K = 4, 6)'] } }
      : {}),
    parameters,
    process: [
      {
        name: 'stasis_variance',
        allowZero: true,
        range: (lineage) => stasisVarianceRange(lineage),
      },
    ],
    minimumHorizons: 2 * segments,
    width: () => segments,
    parameterCount: () => segments + 1 + shiftCount,
    configurations: (lineage, options) => shiftPlacements(lineage.mean.length, shiftCount, minimumSegmentOf(options)),
    shiftCount,
    screenBound: (lineage, configurations) => boundSharedVariance(lineage, configurations),
    fillSpace(_lineage, process, space) {
      const shifts = shiftsOf(process, 1, shiftCount);
      space.transition.fill(0);
      space.processVariance.fill(process[0]);
      space.design.fill(0);
      for (let i = 0; i < space.size; i++) space.design[i * segments + segmentOfIndex(i, shifts)] = 1;
    },
    toParameters(coefficients, process, lineage) {
      const record: Record<string, number> = { stasis_variance: process[0] };
      for (let k = 0; k < segments; k++) record[meanName(k)] = coefficients[k];
      return { ...record, ...shiftEstimates(lineage, shiftsOf(process, 1, shiftCount)) };
    },
    constantCoefficients: () => new Float64Array(segments).fill(1),
    fixLocation: (name, value) => ({ index: Number(/^segment_(\d+)_mean$/.exec(name)?.[1] ?? 1) - 1, coefficient: value }),
    processFrom: (parameters, lineage) => [parameters.stasis_variance, ...shiftIndicesFrom(parameters, shiftCount, lineage)],
    coefficientsFrom: (parameters) => Array.from({ length: segments }, (_, k) => parameters[meanName(k)]),
    meanCovariance(lineage, parameters) {
      const shiftTimes = shiftTimesOf(parameters, shiftCount);
      const time = lineage.time;
      return {
        mean: Float64Array.from(time, (t) => parameters[meanName(segmentOfTime(t, shiftTimes))]),
        covariance: buildCovariance(time.length, (i, j) => (i === j ? parameters.stasis_variance : 0)),
      };
    },
    expectation(parameters, time) {
      const shiftTimes = shiftTimesOf(parameters, shiftCount);
      return {
        mean: Float64Array.from(time, (t) => parameters[meanName(segmentOfTime(t, shiftTimes))]),
        variance: Float64Array.from(time, () => parameters.stasis_variance),
      };
    },
  };
}

/** One shift, shared stasis variance (K = 2 means + 1 variance + 1 position = 4). */
export const punctuatedOne = punctuatedSharedVariance(1);
/** Two shifts, shared stasis variance (K = 3 means + 1 variance + 2 positions = 6). */
export const punctuatedTwo = punctuatedSharedVariance(2);
