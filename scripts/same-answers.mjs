#!/usr/bin/env node
// Issue 14c: the outputs that engine-speed work must not change, saved before and compared after.
//
//   node scripts/same-answers.mjs save DIR [CASE...]  run every case below (or those named; after
//                                               `npm run build`) into DIR
//   node scripts/same-answers.mjs compare A B   fits: every number equal to 1e-8 relative;
//                                               seeded simulations (power, bootstrap, simulate,
//                                               adequacy): byte-identical
//
// Exit code 1 on any difference; each difference is printed with its JSON path.
import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const shell = 'sample-data/shell-length.csv';
const pulsed = 'sample-data/pulsed-width.csv';
const proxy = 'sample-data/pulsed-width-proxy.csv';
/** name → [kind, arguments]; kind "fit" compares numbers to 1e-8 relative, "bytes" compares bytes. */
const cases = {
  'fit-classic': ['fit', ['fit', shell, '--json', '--no-trend-test']],
  'fit-extended': ['fit', ['fit', shell, '--json', '--models', 'extended', '--no-trend-test']],
  'fit-extended-pulsed': ['fit', ['fit', pulsed, '--json', '--models', 'extended', '--covariate-file', proxy, '--no-trend-test']],
  'fit-extended-pulsed-min3': ['fit', ['fit', pulsed, '--json', '--models', 'punctuated-2-separate,punctuated-2,optimum-shift,random-walk-then-directional-walk', '--min-segment', '3', '--no-intervals', '--no-trend-test']],
  'fit-trend-adequacy': ['bytes', ['fit', shell, '--json', '--adequacy', '--adequacy-draws', '49', '--threads', '1']],
  'power': ['bytes', ['power', shell, '--json', '--replicates', '20', '--threads', '1']],
  'power-2-threads': ['bytes', ['power', shell, '--json', '--replicates', '20', '--threads', '2']],
  'power-shift': ['bytes', ['power', pulsed, '--json', '--replicates', '20', '--drifts', '0,0.4', '--threads', '1', '--no-coverage', '--models', 'random-walk,directional-walk,punctuated-1,stasis-then-directional-walk']],
  'bootstrap': ['bytes', ['bootstrap', shell, '--json', '--replicates', '49', '--threads', '1', '--models', 'accelerating-walk,moving-optimum,optimum-shift']],
  'bootstrap-2-threads': ['bytes', ['bootstrap', pulsed, '--json', '--replicates', '29', '--threads', '2', '--models', 'optimum-shift']],
  'simulate-walk': ['bytes', ['simulate', shell, '--replicates', '5']],
  'simulate-ou-specimens': ['bytes', ['simulate', shell, '--model', 'ou', '--replicates', '3', '--form', 'specimen', '--seed', '7']],
  'simulate-punctuated': ['bytes', ['simulate', pulsed, '--model', 'punctuated-2', '--replicates', '4']],
  'simulate-optimum-shift': ['bytes', ['simulate', pulsed, '--model', 'optimum-shift', '--replicates', '4', '--seed', '3']],
  'simulate-mode-shift': ['bytes', ['simulate', pulsed, '--model', 'stasis-then-random-walk', '--replicates', '3', '--form', 'specimen']],
};

function save(directory) {
  mkdirSync(directory, { recursive: true });
  const only = process.argv.slice(4);
  for (const [name, [, args]] of Object.entries(cases)) {
    if (only.length > 0 && !only.includes(name)) continue;
    const started = Date.now();
    const output = execFileSync(process.execPath, ['bin/stratotrend', ...args], { maxBuffer: 1 << 28, stdio: ['ignore', 'pipe', 'pipe'] });
    writeFileSync(join(directory, `${name}.out`), output);
    process.stdout.write(`${name}: ${output.length} bytes, ${((Date.now() - started) / 1000).toFixed(1)} s\n`);
  }
}

/** Keys whose values record the run rather than the answer. */
const runKeys = new Set(['created', 'date', 'command', 'version', 'elapsed_seconds', 'seconds']);

function compareValues(left, right, path, differences) {
  if (typeof left === 'number' && typeof right === 'number') {
    if (left === right || Math.abs(left - right) <= 1e-8 * Math.max(Math.abs(left), Math.abs(right))) return;
    differences.push(`${path}: ${left} → ${right}`);
  } else if (Array.isArray(left) && Array.isArray(right)) {
    if (left.length !== right.length) differences.push(`${path}: length ${left.length} → ${right.length}`);
    for (let k = 0; k < Math.min(left.length, right.length); k++) compareValues(left[k], right[k], `${path}[${k}]`, differences);
  } else if (left && right && typeof left === 'object' && typeof right === 'object') {
    for (const key of new Set([...Object.keys(left), ...Object.keys(right)])) {
      if (runKeys.has(key)) continue;
      if (!(key in left) || !(key in right)) differences.push(`${path}.${key}: only on one side`);
      else compareValues(left[key], right[key], `${path}.${key}`, differences);
    }
  } else if (left !== right) differences.push(`${path}: ${JSON.stringify(left)} → ${JSON.stringify(right)}`);
}

function compare(before, after) {
  let failed = false;
  for (const [name, [kind]] of Object.entries(cases)) {
    const left = readFileSync(join(before, `${name}.out`));
    const right = readFileSync(join(after, `${name}.out`));
    const differences = [];
    if (kind === 'bytes') {
      if (!left.equals(right)) differences.push('bytes differ');
    } else compareValues(JSON.parse(left.toString()), JSON.parse(right.toString()), '', differences);
    failed ||= differences.length > 0;
    process.stdout.write(`${name}: ${differences.length === 0 ? (kind === 'bytes' ? 'byte-identical' : 'same to 1e-8') : 'DIFFERENT'}\n`);
    for (const difference of differences.slice(0, 20)) process.stdout.write(`  ${difference}\n`);
  }
  process.exit(failed ? 1 : 0);
}

const [mode, first, second] = process.argv.slice(2);
if (mode === 'save' && first) save(first);
else if (mode === 'compare' && first && second) compare(first, second);
else {
  process.stderr.write('usage: node scripts/same-answers.mjs save DIR | compare BEFORE AFTER\n');
  process.exit(2);
}
