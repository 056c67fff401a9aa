import { buildCovariance, sliceLineage, stasisVarianceRange, type EvolutionModel, type ParameterSpec } from './model.js';
import {
  minimumSegmentOf,
  boundSeparateVariances,
  segmentOfIndex,
  segmentOfTime,
  shiftEstimates,
  shiftIndicesFrom,
  shiftMethodsNote,
  shiftPlacements,
  shiftTimesOf,
  shiftsOf,
} from './punctuated-shifts.js';
import { stasis } from './stasis.js';

/**
 * Punctuated stasis with a variance per segment: `shiftCount` shifts split
 * the sequence into contiguous stasis segments, segment k with its own mean
 * theta_k and its own stasis variance omega_k.
 *
 * mu_i = theta_{segment(i)}, C_ij = omega_{segment(i)} if i = j, else 0.
 *
 * Parameters: segment_K_mean (trait units) and segment_K_variance (trait^2,
 * >= 0), K = 1..shiftCount + 1, oldest first. The covariance is diagonal and
 * no parameter is shared, so the likelihood is the sum of one stasis
 * likelihood per segment ({@link EvolutionModel.blocks}); each segment needs
 * at least 3 horizons (a stasis fit) and at least the minimum segment length.
 * K = 2 (shiftCount + 1) + shiftCount.
 *
 * Hunt, G. (2008). Gradual or pulsed evolution: when should punctuational
 * explanations be preferred? Paleobiology 34:360-377.
 *
 * @example
 * const model = punctuatedSeparateVariances(1);
 * model.parameters.map((parameter) => parameter.name); // ['segment_1_mean', 'segment_1_variance', 'segment_2_mean', 'segment_2_variance']
 * model.parameterCount(lineageFromArrays({ time: [0, 1, 2, 3, 4, 5], mean: [0, 0, 0, 1, 1, 1], samplingVariance: Array(6).fill(0.1) })); // 5 (2 means, 2 variances, 1 shift position)
 */
export function punctuatedSeparateVariances(shiftCount: number): EvolutionModel {
  const segments = shiftCount + 1;
  const meanName = (k: number): string => `segment_${k + 1}_mean`;
  const varianceName = (k: number): string => `segment_${k + 1}_variance`;
  const parameters: ParameterSpec[] = Array.from({ length: segments }, (_, k): ParameterSpec[] => [
    { name: meanName(k), label: `segment ${k + 1} mean`, role: 'location', unit: { trait: 1, time: 0 }, lowerBound: Number.NEGATIVE_INFINITY },
    { name: varianceName(k), label: `segment ${k + 1} stasis variance`, role: 'variance', unit: { trait: 2, time: 0 }, lowerBound: 0 },
  ]).flat();
  const minimumSegment = (options: { minimumSegment?: number }): number => minimumSegmentOf(options, stasis.minimumHorizons);
  return {
    id: `punctuated-${shiftCount}-separate`,
    label: `punctuated, ${shiftCount} shift${shiftCount === 1 ? '' : 's'} (stasis segments, variance per segment)`,
    summary: `${shiftCount} shift${shiftCount === 1 ? '' : 's'} split the sequence into ${segments} stasis segments, each with its own mean and its own variance; shift positions searched exhaustively.`,
    citation: 'Hunt, G. (2008). Gradual or pulsed evolution: when should punctuational explanations be preferred? Paleobiology 34:360-377.',
    referenceKeys: ['hunt2008'],
    plainWords: 'the trait mean stayed constant within segments and shifted between them',
    methodsNotes: [shiftMethodsNote],
    ...(shiftCount === 1
      ? { help: { heading: 'punctuated-1-separate, punctuated-2-separate', lines: ['the same with a stasis variance per segment (segment_K_variance) (K = 5, 8)'] } }
      : {}),
    parameters,
    process: Array.from({ length: segments }, (_, k) => ({
      name: varianceName(k),
      allowZero: true,
      range: (lineage) => stasisVarianceRange(lineage),
    })),
    minimumHorizons: stasis.minimumHorizons * segments,
    width: () => segments,
    parameterCount: () => 2 * segments + shiftCount,
    configurations: (lineage, options) => shiftPlacements(lineage.mean.length, shiftCount, minimumSegment(options)),
    shiftCount,
    screenBound: (lineage, configurations) => boundSeparateVariances(lineage, configurations),
    blocks(lineage, configuration) {
      const bounds = [0, ...configuration.shifts, lineage.mean.length];
      return Array.from({ length: segments }, (_, k) => ({
        model: stasis,
        lineage: sliceLineage(lineage, bounds[k], bounds[k + 1]),
        names: { stasis_mean: meanName(k), stasis_variance: varianceName(k) },
      }));
    },
    fillSpace(_lineage, process, space) {
      const shifts = shiftsOf(process, segments, shiftCount);
      space.transition.fill(0);
      space.design.fill(0);
      for (let i = 0; i < space.size; i++) {
        const segment = segmentOfIndex(i, shifts);
        space.processVariance[i] = process[segment];
        space.design[i * segments + segment] = 1;
      }
    },
    toParameters(coefficients, process, lineage) {
      const record: Record<string, number> = {};
      for (let k = 0; k < segments; k++) {
        record[meanName(k)] = coefficients[k];
        record[varianceName(k)] = process[k];
      }
      return { ...record, ...shiftEstimates(lineage, shiftsOf(process, segments, shiftCount)) };
    },
    constantCoefficients: () => new Float64Array(segments).fill(1),
    fixLocation: (name, value) => ({ index: Number(/^segment_(\d+)_mean$/.exec(name)?.[1] ?? 1) - 1, coefficient: value }),
    processFrom: (parameters, lineage) => [
      ...Array.from({ length: segments }, (_, k) => parameters[varianceName(k)]),
      ...shiftIndicesFrom(parameters, shiftCount, lineage),
    ],
    coefficientsFrom: (parameters) => Array.from({ length: segments }, (_, k) => parameters[meanName(k)]),
    meanCovariance(lineage, parameters) {
      const shiftTimes = shiftTimesOf(parameters, shiftCount);
      const time = lineage.time;
      return {
        mean: Float64Array.from(time, (t) => parameters[meanName(segmentOfTime(t, shiftTimes))]),
        covariance: buildCovariance(time.length, (i, j) => (i === j ? parameters[varianceName(segmentOfTime(time[i], shiftTimes))] : 0)),
      };
    },
    expectation(parameters, time) {
      const shiftTimes = shiftTimesOf(parameters, shiftCount);
      return {
        mean: Float64Array.from(time, (t) => parameters[meanName(segmentOfTime(t, shiftTimes))]),
        variance: Float64Array.from(time, (t) => parameters[varianceName(segmentOfTime(t, shiftTimes))]),
      };
    },
  };
}

/** One shift, a stasis variance per segment (K = 2 means + 2 variances + 1 position = 5). */
export const punctuatedOneSeparate = punctuatedSeparateVariances(1);
/** Two shifts, a stasis variance per segment (K = 3 means + 3 variances + 2 positions = 8). */
export const punctuatedTwoSeparate = punctuatedSeparateVariances(2);
