#!/usr/bin/env node
// CPU milliseconds per 30-horizon lineage for the five classic models without intervals, ou alone and the
// other four (the bench's lineages 1400..1404), the fastest of five one-second rounds: longer rounds than
// bench/evaluation-cost.js's quick mode, for comparing two builds on a loaded machine (issue 14a).
//   npm run build && node scripts/fit-cpu-rounds.mjs [path to another build's dist folder]
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

const root = pathToFileURL(resolve(process.argv[2] ?? 'dist')).href;
const { fitLineage } = await import(`${root}/src/fit/fit-lineage.js`);
const { classicModels } = await import(`${root}/src/models/registry.js`);
const { benchLineage } = await import(`${root}/bench/workload.js`);
const lineages = Array.from({ length: 5 }, (_, k) => benchLineage(30, 1400 + k, k));
const ou = classicModels.filter((model) => model.id === 'ou');
const others = classicModels.filter((model) => model.id !== 'ou');
const measure = (models) => {
  let best = Infinity;
  for (let round = 0; round < 5; round++) {
    const start = process.cpuUsage();
    const wall = performance.now();
    let count = 0;
    while (performance.now() - wall < 1000) {
      for (const lineage of lineages) fitLineage(lineage, models, { intervals: false });
      count += lineages.length;
    }
    const used = process.cpuUsage(start);
    best = Math.min(best, (used.user + used.system) / 1000 / count);
  }
  return best.toFixed(2);
};
for (const lineage of lineages) fitLineage(lineage, classicModels, { intervals: false });
console.log(`${root}: five classic ${measure(classicModels)} ms, ou alone ${measure(ou)} ms, the other four ${measure(others)} ms`);
