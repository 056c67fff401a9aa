#!/usr/bin/env node
// Issue 14b: are interval ends unchanged by a speed-up of the interval search? Two modes.
//
//   npm run build && node scripts/interval-ends.mjs snapshot out.json
//     fits the five classic models to seeded invented lineages (the benchmark's `benchLineage`: 30 horizons,
//     each generating model, plus shorter ones) with every interval method but the bootstrap, and writes every
//     estimate, interval end, open-end flag and the method used.
//   node scripts/interval-ends.mjs compare before.json after.json [tolerance, default 1e-8]
//     compares two such files, or two `stratotrend fit --json` outputs, number by number: a relative difference
//     above the tolerance (relative to the larger magnitude, and at least 1e-300), a null against a number, or a
//     changed string or flag is listed; exit code 1 when anything differs.
import { readFileSync, writeFileSync } from 'node:fs';

const [mode, first, second, toleranceText] = process.argv.slice(2);

if (mode === 'snapshot') {
  const { fitModel } = await import('../dist/src/fit/fit-model.js');
  const { classicModels } = await import('../dist/src/models/registry.js');
  const { benchLineage } = await import('../dist/bench/workload.js');
  const lineages = [];
  for (const horizons of [30, 12]) for (let k = 0; k < 5; k++) lineages.push({ name: `bench ${horizons}/${k}`, lineage: benchLineage(horizons, 1400 + 17 * horizons + k, k) });
  const result = {};
  for (const { name, lineage } of lineages) {
    for (const method of ['profile', 'adjusted', 'integrated']) {
      for (const model of classicModels) {
        const fit = fitModel(model, lineage, { intervals: true, intervalMethod: method });
        result[`${name} ${method} ${model.id}`] = { logLik: fit.logLik, intervalMethod: fit.intervalMethod, flags: fit.flags, parameters: fit.parameters, derived: fit.derived };
      }
    }
  }
  writeFileSync(first, JSON.stringify(result, null, 1));
  process.stdout.write(`${Object.keys(result).length} fits written to ${first}\n`);
} else if (mode === 'compare') {
  const tolerance = Number(toleranceText ?? 1e-8);
  const before = JSON.parse(readFileSync(first, 'utf8'));
  const after = JSON.parse(readFileSync(second, 'utf8'));
  const differences = [];
  let numbers = 0;
  let largest = 0;
  // Fields that record the run rather than the answer.
  const ignored = new Set(['command', 'date', 'version', 'evaluations', 'elapsed', 'seconds']);
  const walk = (a, b, path) => {
    if (typeof a === 'number' && typeof b === 'number') {
      numbers += 1;
      const scale = Math.max(Math.abs(a), Math.abs(b), 1e-300);
      const relative = a === b ? 0 : Math.abs(a - b) / scale;
      largest = Math.max(largest, relative);
      if (!(relative <= tolerance)) differences.push(`${path}: ${a} -> ${b} (relative ${relative.toExponential(2)})`);
      return;
    }
    if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') {
      if (a !== b) differences.push(`${path}: ${JSON.stringify(a)} -> ${JSON.stringify(b)}`);
      return;
    }
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const key of keys) if (!ignored.has(key)) walk(a[key], b[key], `${path}.${key}`);
  };
  walk(before, after, '');
  for (const line of differences) process.stdout.write(`${line}\n`);
  process.stdout.write(`${numbers} numbers compared, largest relative difference ${largest.toExponential(2)}, ${differences.length} beyond ${tolerance}\n`);
  process.exit(differences.length > 0 ? 1 : 0);
} else {
  process.stderr.write('usage: node scripts/interval-ends.mjs snapshot out.json | compare before.json after.json [tolerance]\n');
  process.exit(2);
}
