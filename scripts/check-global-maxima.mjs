#!/usr/bin/env node
// Issue 25 sweep: on seeded simulated lineages (14 and 25 horizons, walks and trends), is every classic model's
// maximum at least a dense reference's (a scan of the dense multivariate-normal profile likelihood, written here
// with its own Cholesky and GLS, refined by golden sections), and every one-shift model's at least the best full
// fit over all shift positions? Too slow for the test suite (test/fit/global-maxima.test.ts runs a small part).
//   npm run build && node scripts/check-global-maxima.mjs [replicates per design, default 200]
// Prints the misses and a summary; exit code 1 when any maximum falls short by more than 1e-6.
import { fitAtConfiguration } from '../dist/src/fit/fit-configurations.js';
import { fitModel } from '../dist/src/fit/fit-model.js';
import { lineageFromArrays } from '../dist/src/lineage.js';
import { extensionModels } from '../dist/src/models/extensions.js';
import { findModel } from '../dist/src/models/registry.js';
import { createRandom } from '../dist/src/random/random.js';

const replicates = Number(process.argv[2] ?? 200);
const tolerance = 1e-6;

/** Dense profile logL: V = covariance + diag(e), location columns by GLS (normal equations on the whitened data). */
function denseProfile(mean, sampling, covariance, columns) {
  const n = mean.length;
  const l = Array.from({ length: n }, () => new Float64Array(n));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = covariance(i, j) + (i === j ? sampling[i] : 0);
      for (let k = 0; k < j; k++) sum -= l[i][k] * l[j][k];
      if (i === j) {
        if (!(sum > 0)) return -Infinity;
        l[i][i] = Math.sqrt(sum);
      } else l[i][j] = sum / l[j][j];
    }
  }
  const solve = (b) => {
    const z = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let sum = b[i];
      for (let k = 0; k < i; k++) sum -= l[i][k] * z[k];
      z[i] = sum / l[i][i];
    }
    return z;
  };
  const y = solve(mean);
  const w = columns.map(solve);
  const p = w.length;
  const a = Array.from({ length: p }, (_, r) => Array.from({ length: p }, (_, c) => w[r].reduce((s, v, i) => s + v * w[c][i], 0)));
  const b = w.map((column) => column.reduce((s, v, i) => s + v * y[i], 0));
  // Solve a beta = b by Gaussian elimination (p <= 2).
  for (let r = 0; r < p; r++) {
    for (let q = r + 1; q < p; q++) {
      const f = a[q][r] / a[r][r];
      for (let c = r; c < p; c++) a[q][c] -= f * a[r][c];
      b[q] -= f * b[r];
    }
  }
  const beta = new Array(p);
  for (let r = p - 1; r >= 0; r--) {
    let sum = b[r];
    for (let c = r + 1; c < p; c++) sum -= a[r][c] * beta[c];
    beta[r] = sum / a[r][r];
  }
  let residual = 0;
  for (let i = 0; i < n; i++) {
    let fitted = 0;
    for (let r = 0; r < p; r++) fitted += w[r][i] * beta[r];
    residual += (y[i] - fitted) ** 2;
  }
  let logDet = 0;
  for (let i = 0; i < n; i++) logDet += 2 * Math.log(l[i][i]);
  return -0.5 * (n * Math.log(2 * Math.PI) + logDet + residual);
}

/** Maximum of f over [low, high] (ln scale): scan, then golden sections around every local maximum of the scan. */
function scanMaximum(f, low, high, points) {
  const us = Array.from({ length: points }, (_, k) => low + ((high - low) * k) / (points - 1));
  const values = us.map(f);
  let best = -Infinity;
  let at = low;
  for (let k = 0; k < points; k++) {
    if (values[k] > best) [best, at] = [values[k], us[k]];
    if (!(values[k] >= (values[k - 1] ?? -Infinity) && values[k] > (values[k + 1] ?? -Infinity))) continue;
    let a = us[Math.max(0, k - 1)];
    let b = us[Math.min(points - 1, k + 1)];
    const ratio = (Math.sqrt(5) - 1) / 2;
    for (let step = 0; step < 60; step++) {
      const c = b - ratio * (b - a);
      const d = a + ratio * (b - a);
      if (f(c) > f(d)) b = d;
      else a = c;
    }
    const value = f((a + b) / 2);
    if (value > best) [best, at] = [value, (a + b) / 2];
  }
  return { value: best, at };
}

function references(time, mean, sampling) {
  const n = time.length;
  const span = time[n - 1];
  let shortest = Infinity;
  for (let i = 1; i < n; i++) shortest = Math.min(shortest, time[i] - time[i - 1]);
  const centre = mean.reduce((s, x) => s + x, 0) / n;
  const scale = Math.max(mean.reduce((s, x) => s + (x - centre) ** 2, 0) / (n - 1), sampling.reduce((s, e) => s + e, 0) / n);
  const ones = time.map(() => 1);
  const walk = (columns) => (u) => denseProfile(mean, sampling, (i, j) => Math.exp(u) * Math.min(time[i], time[j]), columns);
  const walkMax = (columns) => Math.max(walk(columns)(-Infinity), scanMaximum(walk(columns), Math.log((1e-9 * scale) / span), Math.log((1e3 * scale) / shortest), 400).value);
  const stasisProfile = (u) => denseProfile(mean, sampling, (i, j) => (i === j ? Math.exp(u) : 0), [ones]);
  const result = {
    stasis: Math.max(stasisProfile(-Infinity), scanMaximum(stasisProfile, Math.log(1e-9 * scale), Math.log(1e3 * scale), 400).value),
    'random-walk': walkMax([ones]),
    'directional-walk': walkMax([ones, time]),
  };
  // ou: alpha scanned on ln scale over its search range, the step variance maximised at each alpha; the alpha -> 0
  // limit is the directional walk.
  const ouAt = (alpha) => (u) => {
    const s2 = Math.exp(u);
    const cov = (i, j) => (s2 * Math.exp(-alpha * Math.abs(time[i] - time[j])) * -Math.expm1(-2 * alpha * Math.min(time[i], time[j]))) / (2 * alpha);
    return denseProfile(mean, sampling, cov, [ones, time.map((t) => -Math.expm1(-alpha * t) / alpha)]);
  };
  const ouProfile = (v) => {
    const alpha = Math.exp(v);
    return Math.max(ouAt(alpha)(-Infinity), scanMaximum(ouAt(alpha), Math.log((1e-9 * scale) / span), Math.log((1e3 * scale) / shortest), 80).value);
  };
  result.ou = Math.max(result['directional-walk'], scanMaximum(ouProfile, Math.log(1e-5 / span), Math.log(40 / shortest), 60).value);
  return result;
}

const designs = [
  { horizons: 14, drift: 0.5, label: 'trends, 14 horizons' },
  { horizons: 14, drift: 0, label: 'walks, 14 horizons' },
  { horizons: 25, drift: 0.5, label: 'trends, 25 horizons' },
  { horizons: 25, drift: 0, label: 'walks, 25 horizons' },
];
const oneShift = extensionModels.filter((model) => model.configurations && !/-2/.test(model.id));
let misses = 0;
for (const [d, design] of designs.entries()) {
  const worst = {};
  for (let replicate = 0; replicate < replicates; replicate++) {
    const random = createRandom(100000 * (d + 1) + replicate);
    const time = [0];
    for (let i = 1; i < design.horizons; i++) time.push(time[i - 1] + 0.2 + 1.6 * random.uniform());
    const level = [0.05, 0.1, 0.2][replicate % 3];
    const sampling = time.map(() => level * (0.5 + random.uniform()));
    let latent = 0;
    const mean = time.map((t, i) => {
      if (i > 0) latent += design.drift * (t - time[i - 1]) + Math.sqrt(0.125 * (t - time[i - 1])) * random.normal();
      return latent + Math.sqrt(sampling[i]) * random.normal();
    });
    const lineage = lineageFromArrays({ time, mean, samplingVariance: sampling });
    const reference = references(time, mean, sampling);
    const record = (id, shortfall) => {
      worst[id] = Math.max(worst[id] ?? -Infinity, shortfall);
      if (shortfall > tolerance) {
        misses += 1;
        console.log(`${design.label}, replicate ${replicate}: ${id} below the reference by ${shortfall.toExponential(3)}`);
      }
    };
    for (const [id, value] of Object.entries(reference)) record(id, value - fitModel(findModel(id), lineage, { intervals: false }).logLik);
    if (design.horizons >= 25) {
      for (const model of oneShift) {
        let exhaustive = -Infinity;
        for (const configuration of model.configurations(lineage, {})) {
          const full = fitAtConfiguration(model, lineage, configuration, { intervals: false }, fitModel);
          if (full.converged) exhaustive = Math.max(exhaustive, full.logLik);
        }
        record(model.id, exhaustive - fitModel(model, lineage, { intervals: false }).logLik);
      }
    }
  }
  console.log(`${design.label}: ${replicates} lineages; largest shortfall per model: ${Object.entries(worst).map(([id, value]) => `${id} ${value.toExponential(2)}`).join(', ')}`);
}
console.log(misses === 0 ? 'no maximum below its reference' : `${misses} maxima below their reference`);
process.exit(misses === 0 ? 0 : 1);
