#!/usr/bin/env node
// Writes invented demonstration data for the shift and covariate models
// (fictional section and lineage; nothing here is real). Deterministic: run it
// again and the files come out byte-identical.
//
// Scenario: a fictional benthic lineage measured for "umbilical width" (mm) in
// one fictional section, "Hollin Reach", 40 horizons from 20.0 to about 16 Ma.
// The true process is punctuated stasis: mean 8.00 mm up to horizon 17
// (0-based), 9.10 mm from horizon 18 on, stasis variance 0.02 mm^2, within-horizon
// sd 0.60 mm, 15 to 25 specimens per horizon. A fictional "bottom-water proxy"
// (a random walk, unrelated to the trait) is written to a separate file for
// --covariate-file.
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generator } from './demo-random.mjs';

const seed = 20261202;
const truth = { before: 8.0, after: 9.1, shiftIndex: 18, stasisVariance: 0.02, withinSd: 0.6, horizons: 40 };


const random = generator(seed);
const samples = ['section,trait,age,n,mean,sd'];
const proxy = ['section,age,covariate'];
let age = 20.0;
let level = 3.0;
for (let i = 0; i < truth.horizons; i++) {
  const n = 15 + Math.floor(random.uniform() * 11);
  const latent = (i < truth.shiftIndex ? truth.before : truth.after) + Math.sqrt(truth.stasisVariance) * random.normal();
  let sum = 0;
  let squares = 0;
  const values = [];
  for (let k = 0; k < n; k++) values.push(latent + truth.withinSd * random.normal());
  for (const value of values) sum += value;
  const mean = sum / n;
  for (const value of values) squares += (value - mean) ** 2;
  const sd = Math.sqrt(squares / (n - 1));
  samples.push(`Hollin Reach,umbilical width,${age.toFixed(2)},${n},${mean.toFixed(4)},${sd.toFixed(4)}`);
  level += 0.3 * random.normal();
  proxy.push(`Hollin Reach,${age.toFixed(2)},${level.toFixed(3)}`);
  age -= 0.06 + 0.08 * random.uniform();
}

const folder = join(dirname(fileURLToPath(import.meta.url)), '..', 'sample-data');
mkdirSync(folder, { recursive: true });
writeFileSync(join(folder, 'pulsed-width.csv'), samples.join('\n') + '\n');
writeFileSync(join(folder, 'pulsed-width-proxy.csv'), proxy.join('\n') + '\n');
