#!/usr/bin/env node
// Writes the invented two-trait demonstration data for `stratotrend joint`
// (fictional section "Marrowind Wash"; nothing here is real). Deterministic:
// run it again and the files come out byte-identical.
//
// Scenario: a fictional bivalve lineage measured for shell length and shell
// width (mm) on the same specimens at 24 horizons from 6.00 to 3.70 Ma. The
// true process is a correlated random walk: ancestral means 30 mm and 18 mm,
// step variances 12 and 6 mm^2 per Myr, step correlation 0.8. Within a
// horizon the specimens' length and width are correlated 0.6 (sd 2.0 and
// 1.2 mm), 8 to 20 specimens; width was not measured at two horizons.
//   sample-data/shell-shape.csv            summary rows (n, mean, sd per trait)
//   sample-data/shell-shape-specimens.csv  specimen rows with a "specimen" column
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generator } from './demo-random.mjs';

const random = generator(20261204);
const folder = join(dirname(fileURLToPath(import.meta.url)), '..', 'sample-data');
const step = { length: 12, width: 6, correlation: 0.8 };
const within = { length: 2.0, width: 1.2, correlation: 0.6 };
const missingWidth = new Set([7, 15]);

const pair = (sdA, sdB, rho) => {
  const first = random.normal();
  const second = rho * first + Math.sqrt(1 - rho * rho) * random.normal();
  return [sdA * first, sdB * second];
};

let length = 30;
let width = 18;
let age = 6.0;
const summary = ['section,trait,age,n,mean,sd'];
const specimens = ['section,trait,age,specimen,value'];
for (let i = 0; i < 24; i++) {
  if (i > 0) {
    const tau = 0.05 + 0.1 * random.uniform();
    age -= tau;
    const [dl, dw] = pair(Math.sqrt(step.length * tau), Math.sqrt(step.width * tau), step.correlation);
    length += dl;
    width += dw;
  }
  const ageText = age.toFixed(2);
  const n = 8 + Math.floor(13 * random.uniform());
  const rows = [];
  for (let s = 0; s < n; s++) {
    const [el, ew] = pair(within.length, within.width, within.correlation);
    rows.push({ id: `MW-${String(i + 1).padStart(2, '0')}-${String(s + 1).padStart(2, '0')}`, length: length + el, width: width + ew });
  }
  for (const trait of ['length', 'width']) {
    if (trait === 'width' && missingWidth.has(i)) continue;
    const values = rows.map((row) => row[trait]);
    const mean = values.reduce((sum, value) => sum + value, 0) / n;
    const sd = Math.sqrt(values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (n - 1));
    summary.push(`Marrowind Wash,shell ${trait},${ageText},${n},${mean.toFixed(4)},${sd.toFixed(4)}`);
    for (const row of rows) specimens.push(`Marrowind Wash,shell ${trait},${ageText},${row.id},${row[trait].toFixed(3)}`);
  }
}
writeFileSync(join(folder, 'shell-shape.csv'), summary.join('\n') + '\n');
writeFileSync(join(folder, 'shell-shape-specimens.csv'), specimens.join('\n') + '\n');
