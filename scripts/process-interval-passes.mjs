#!/usr/bin/env node
// Issue 14 (the restricted profile's derivatives): ou's process-parameter interval ends and what they cost.
//
//   npm run build && node scripts/process-interval-passes.mjs OUT.json [FIRST LAST [HORIZONS]]
//     for benchLineage(HORIZONS, seed) (default 30), seeds FIRST..LAST (default 1..20), ou's alpha and step_variance ends by the
//     plain profile (processInterval, as fit --intervals profile makes them) and by the adjusted profile
//     (intervalsByProfile with adjusted = true, as a default fit makes them for ou), each on a fresh evaluator,
//     with the filter passes (evaluator.evaluations) and score passes (evaluator.scoreEvaluations) they took;
//     also ou's whole fit (profile intervals, default intervals): its filter passes and every interval end.
//     Prints the medians and totals; OUT.json keeps every number, for scripts/interval-ends.mjs compare.
import { writeFileSync } from 'node:fs';

const [out, firstText, lastText, horizonsText] = process.argv.slice(2);
if (!out) {
  process.stderr.write('usage: node scripts/process-interval-passes.mjs OUT.json [FIRST LAST [HORIZONS]]\n');
  process.exit(2);
}
const { LikelihoodEvaluator } = await import('../dist/src/fit/evaluator.js');
const { fitModel, processInterval, profileDrop } = await import('../dist/src/fit/fit-model.js');
const { intervalsByProfile } = await import('../dist/src/fit/intervals.js');
const { chiSquare1At95 } = await import('../dist/src/fit/model-choice.js');
const { maximiseProcess } = await import('../dist/src/fit/search.js');
const { findModel } = await import('../dist/src/models/registry.js');
const { intervalOptions } = await import('../dist/src/fit/intervals.js');
const { benchLineage } = await import('../dist/bench/workload.js');

const ou = findModel('ou');
const first = Number(firstText ?? 1);
const last = Number(lastText ?? 20);
const horizons = Number(horizonsText ?? 30);
const result = {};
const counts = { plain: [], adjusted: [], plainScore: [], adjustedScore: [], fitProfile: [], fitDefault: [] };
for (let seed = first; seed <= last; seed++) {
  const lineage = benchLineage(horizons, seed);
  // Plain: the fit's own search for the maximum (not counted), then each end as fitModel makes it.
  const plainEvaluator = new LikelihoodEvaluator(ou, lineage);
  const slopes = new Float64Array(2);
  const gradient = (process) => (plainEvaluator.profileScore(process, slopes), slopes);
  const evaluate = (process) => plainEvaluator.profile(process);
  const maximum = maximiseProcess(evaluate, ou.process, lineage, { polish: true, gradient });
  const before = plainEvaluator.evaluations;
  const beforeScore = plainEvaluator.scoreEvaluations;
  const plain = {};
  for (const [axisIndex, name] of [[0, 'alpha'], [1, 'step_variance']]) {
    plain[name] = processInterval(evaluate, ou, lineage, maximum.process, axisIndex, maximum.logLik - profileDrop, gradient);
  }
  counts.plain.push(plainEvaluator.evaluations - before);
  counts.plainScore.push(plainEvaluator.scoreEvaluations - beforeScore);
  // Adjusted: the restricted maximum and both ends, as replaceIntervals makes them.
  const adjustedEvaluator = new LikelihoodEvaluator(ou, lineage);
  const ends = (evaluateEnds, best, axisIndex, cutoff, gradientEnds) => processInterval(evaluateEnds, ou, lineage, best, axisIndex, cutoff, gradientEnds);
  const adjusted = intervalsByProfile(adjustedEvaluator, ['alpha', 'step_variance'], { adjusted: true, ratioCutoff: () => chiSquare1At95 }, ends);
  counts.adjusted.push(adjustedEvaluator.evaluations);
  counts.adjustedScore.push(adjustedEvaluator.scoreEvaluations);
  const fitProfile = fitModel(ou, lineage, { intervals: true, intervalMethod: 'profile' });
  const fitDefault = fitModel(ou, lineage, intervalOptions(undefined));
  counts.fitProfile.push(fitProfile.evaluations);
  counts.fitDefault.push(fitDefault.evaluations);
  result[`seed ${seed}`] = {
    plain,
    adjusted,
    fitProfile: { logLik: fitProfile.logLik, intervalMethod: fitProfile.intervalMethod, parameters: fitProfile.parameters, derived: fitProfile.derived },
    fitDefault: { logLik: fitDefault.logLik, intervalMethod: fitDefault.intervalMethod, parameters: fitDefault.parameters, derived: fitDefault.derived },
  };
}
const median = (values) => {
  const sorted = values.slice().sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
};
const total = (values) => values.reduce((sum, value) => sum + value, 0);
writeFileSync(out, JSON.stringify(result, null, 1));
const row = (label, key) => `${label}: median ${median(counts[key])}, total ${total(counts[key])}`;
process.stdout.write(
  [
    `ou on benchLineage(${horizons}, seed), seeds ${first}..${last}`,
    row('plain process ends (alpha + step_variance), filter passes', 'plain'),
    row('plain process ends, score passes', 'plainScore'),
    row('adjusted process ends incl. the restricted maximum, filter passes', 'adjusted'),
    row('adjusted process ends, score passes', 'adjustedScore'),
    row('whole ou fit, profile intervals, filter passes', 'fitProfile'),
    row('whole ou fit, default intervals, filter passes', 'fitDefault'),
  ].join('\n') + '\n',
);
