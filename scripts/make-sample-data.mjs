#!/usr/bin/env node
// Writes the invented demonstration data in sample-data/ (fictional sections
// and lineage; nothing here is real). Deterministic: run it again and the
// files come out byte-identical.
//
// Scenario: a fictional planktonic lineage measured for test diameter (µm... here
// "shell length" in mm) in two fictional measured sections, "Varnek Draw" and
// "Tolloway Bluff". The true process is a directional walk:
//   ancestral mean 4.20 mm at 12.40 Ma, drift +0.45 mm per Myr,
//   step variance 0.004 mm^2 per Myr, within-horizon sd 0.55 mm,
//   12 to 30 specimens per horizon.
// Tolloway Bluff starts later (11.90 Ma) from the walk's state there.
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generator } from './demo-random.mjs';

const seed = 20261201;
const truth = { ancestralMean: 4.2, drift: 0.45, stepVariance: 0.004, withinSd: 0.55, startAge: 12.4 };


const random = generator(seed);
// One latent lineage mean on a fine grid (0.01 Myr), shared by both sections.
const grid = [];
let latent = truth.ancestralMean;
for (let age = truth.startAge; age >= 7.99; age -= 0.01) {
  grid.push({ age: Math.round(age * 100) / 100, mean: latent });
  latent += truth.drift * 0.01 + Math.sqrt(truth.stepVariance * 0.01) * random.normal();
}
const latentAt = (age) => grid.reduce((best, point) => (Math.abs(point.age - age) < Math.abs(best.age - age) ? point : best)).mean;

const sections = [
  { name: 'Varnek Draw', from: 12.4, to: 8.1, horizons: 24 },
  { name: 'Tolloway Bluff', from: 11.9, to: 8.6, horizons: 16 },
];
const summary = ['section,trait,age,n,mean,sd'];
const specimens = ['section,trait,age,value'];
for (const section of sections) {
  for (let k = 0; k < section.horizons; k++) {
    const jitter = k === 0 || k === section.horizons - 1 ? 0 : (random.uniform() - 0.5) * 0.6;
    const step = (section.from - section.to) / (section.horizons - 1);
    const age = Math.round((section.from - k * step + jitter * step) * 100) / 100;
    const n = 12 + Math.floor(random.uniform() * 19);
    const values = [];
    for (let j = 0; j < n; j++) values.push(Math.round((latentAt(age) + truth.withinSd * random.normal()) * 1000) / 1000);
    const mean = values.reduce((sum, value) => sum + value, 0) / n;
    const sd = Math.sqrt(values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (n - 1));
    summary.push(`${section.name},shell length,${age.toFixed(2)},${n},${mean.toFixed(4)},${sd.toFixed(4)}`);
    for (const value of values) specimens.push(`${section.name},shell length,${age.toFixed(2)},${value.toFixed(3)}`);
  }
}
const folder = join(dirname(fileURLToPath(import.meta.url)), '..', 'sample-data');
mkdirSync(folder, { recursive: true });
writeFileSync(join(folder, 'shell-length.csv'), summary.join('\n') + '\n');
writeFileSync(join(folder, 'shell-length-specimens.csv'), specimens.join('\n') + '\n');
// sample-data/README.md documents these files (and the other demo scripts' files); it is kept by hand.
console.log('wrote sample-data/shell-length.csv, sample-data/shell-length-specimens.csv');
