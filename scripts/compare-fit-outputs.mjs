#!/usr/bin/env node
// Save or compare the `fit --json` documents of the sample data (issue 14: the
// engine's speed work must leave every estimate and interval end unchanged to
// 1e-8 relative). After a build:
//   node scripts/compare-fit-outputs.mjs save DIR      (before a change)
//   node scripts/compare-fit-outputs.mjs compare DIR   (after it; exit 1 on a difference)
// Numbers are compared with a relative tolerance (default 1e-8, --tolerance X)
// with an absolute floor of tolerance × 1e-6 for values near 0; text must be
// equal except the run's own date, command, timings and checksums of itself.
import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const runs = [
  ['shell-length', ['sample-data/shell-length.csv']],
  ['shell-length-extended', ['sample-data/shell-length.csv', '--models', 'extended']],
  ['shell-length-specimens', ['sample-data/shell-length-specimens.csv']],
  ['shell-shape', ['sample-data/shell-shape.csv']],
  ['shell-shape-extended', ['sample-data/shell-shape.csv', '--models', 'extended']],
  ['pulsed-width', ['sample-data/pulsed-width.csv']],
  [
    'pulsed-width-extended',
    ['sample-data/pulsed-width.csv', '--models', 'extended', '--covariate-file', 'sample-data/pulsed-width-proxy.csv'],
  ],
  ['locality-heights', ['sample-data/locality-heights.csv', '--age-model', 'sample-data/locality-ties.csv']],
  [
    'locality-heights-extended',
    ['sample-data/locality-heights.csv', '--age-model', 'sample-data/locality-ties.csv', '--models', 'extended'],
  ],
];

/** Keys that describe the run rather than the fit. */
const ignored = new Set(['date', 'created', 'command', 'elapsed', 'elapsed_seconds', 'seconds', 'version']);

const [mode, folder, ...rest] = process.argv.slice(2);
const toleranceAt = rest.indexOf('--tolerance');
const tolerance = toleranceAt >= 0 ? Number(rest[toleranceAt + 1]) : 1e-8;
if ((mode !== 'save' && mode !== 'compare') || !folder) {
  console.error('usage: compare-fit-outputs.mjs save|compare DIR [--tolerance X]');
  process.exit(2);
}

function fitJson(args) {
  return execFileSync('node', ['bin/stratotrend', 'fit', ...args, '--json'], { encoding: 'utf8', maxBuffer: 1 << 28 });
}

function compare(before, after, path, differences) {
  if (typeof before === 'number' && typeof after === 'number') {
    const scale = Math.max(Math.abs(before), Math.abs(after));
    const difference = Math.abs(before - after);
    if (!(difference <= tolerance * scale || difference <= tolerance * 1e-6 || (Number.isNaN(before) && Number.isNaN(after)))) {
      differences.push(`${path}: ${before} -> ${after} (relative ${(difference / scale).toExponential(2)})`);
    }
    return;
  }
  if (Array.isArray(before) && Array.isArray(after)) {
    if (before.length !== after.length) differences.push(`${path}: length ${before.length} -> ${after.length}`);
    for (let i = 0; i < Math.min(before.length, after.length); i++) compare(before[i], after[i], `${path}[${i}]`, differences);
    return;
  }
  if (before !== null && after !== null && typeof before === 'object' && typeof after === 'object') {
    const keys = new Set([...Object.keys(before), ...Object.keys(after)]);
    for (const key of keys) {
      if (ignored.has(key)) continue;
      if (!(key in before) || !(key in after)) {
        differences.push(`${path}.${key}: ${key in before ? 'removed' : 'added'}`);
        continue;
      }
      compare(before[key], after[key], `${path}.${key}`, differences);
    }
    return;
  }
  if (before !== after) differences.push(`${path}: ${JSON.stringify(before)} -> ${JSON.stringify(after)}`);
}

mkdirSync(folder, { recursive: true });
let failed = 0;
for (const [name, args] of runs) {
  const text = fitJson(args);
  const file = join(folder, `${name}.json`);
  if (mode === 'save') {
    writeFileSync(file, text);
    console.log(`saved ${file}`);
    continue;
  }
  const differences = [];
  compare(JSON.parse(readFileSync(file, 'utf8')), JSON.parse(text), name, differences);
  if (differences.length === 0) console.log(`${name}: same to ${tolerance} relative`);
  else {
    failed += 1;
    console.log(`${name}: ${differences.length} difference(s)`);
    for (const line of differences.slice(0, 40)) console.log(`  ${line}`);
  }
}
process.exit(failed === 0 ? 0 : 1);
