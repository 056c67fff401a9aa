import { formatNumber, traitUnitLabel } from '../units.js';
import { lineageTitle, type LineageView } from './document-view.js';
import { escapeHtml } from './html.js';

/** Pixel size of the sketch. */
const width = 640;
const height = 520;
const margin = { left: 78, right: 24, top: 40, bottom: 56 };

/**
 * Round tick values spanning [low, high], about `count` of them (1-2-5 steps, common practice).
 *
 * @example
 * niceTicks(0, 10); // [0, 2, 4, 6, 8, 10]
 * niceTicks(0.13, 0.91); // [0.2, 0.4, 0.6, 0.8]
 */
export function niceTicks(low: number, high: number, count = 5): number[] {
  if (!(high > low)) return [low];
  const raw = (high - low) / count;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((factor) => factor * power).find((candidate) => candidate >= raw) ?? 10 * power;
  // Ticks by an integer count, at most 100, of safe integers (beyond 2^53, k + 1 rounds back to k): a step that underflows
  // to 0, overflows, or is below the values' rounding never loops.
  const first = Math.ceil(low / step);
  const last = Math.floor(high / step + 1e-9);
  if (!(step > 0 && step < Number.POSITIVE_INFINITY) || !Number.isSafeInteger(first) || !Number.isSafeInteger(last) || last - first > 100) return [low, high];
  const ticks: number[] = [];
  for (let k = first; k <= last; k++) ticks.push(Number((k * step).toPrecision(12)));
  return ticks;
}

/**
 * A plain SVG trajectory sketch of one lineage from its fit.json entry, used
 * in the report only when the figure module cannot be loaded: time runs up
 * the page (oldest at the bottom), each horizon's mean with its 95% sampling
 * interval (±1.96 √e_i), and the smoothed lineage mean under the best model
 * with its 95% band when the document has it. Deterministic text output.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * sketchTrajectory(document.lineages[0]).svg.startsWith('<svg'); // true
 */
export function sketchTrajectory(lineage: LineageView): { svg: string; width: number; height: number } {
  const time = lineage.data.time.map((value) => value ?? Number.NaN);
  const mean = lineage.data.mean.map((value) => value ?? Number.NaN);
  const halfWidth = lineage.data.sampling_variance.map((value) => 1.96 * Math.sqrt(value ?? 0));
  const smoothMean = lineage.smoothed?.mean.map((value) => value ?? Number.NaN) ?? [];
  const smoothHalf = lineage.smoothed?.standard_error.map((value) => 1.96 * (value ?? 0)) ?? [];
  const lows = [...mean.map((value, i) => value - halfWidth[i]), ...smoothMean.map((value, i) => value - smoothHalf[i])].filter(Number.isFinite);
  const highs = [...mean.map((value, i) => value + halfWidth[i]), ...smoothMean.map((value, i) => value + smoothHalf[i])].filter(Number.isFinite);
  let traitLow = Math.min(...lows);
  let traitHigh = Math.max(...highs);
  if (!(traitHigh > traitLow)) { traitLow -= 1; traitHigh += 1; }
  const pad = (traitHigh - traitLow) * 0.05;
  traitLow -= pad;
  traitHigh += pad;
  const timeLast = Math.max(...time) || 1;
  const timeLow = -0.04 * timeLast;
  const timeHigh = timeLast * 1.04;
  const plotWidth = width - margin.left - margin.right;
  const plotHeight = height - margin.top - margin.bottom;
  const x = (value: number): number => margin.left + ((value - traitLow) / (traitHigh - traitLow)) * plotWidth;
  const y = (value: number): number => margin.top + plotHeight - ((value - timeLow) / (timeHigh - timeLow)) * plotHeight;
  const f = (value: number): string => value.toFixed(1);
  const parts: string[] = [];
  parts.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`);
  parts.push(`<text x="${width / 2}" y="22" text-anchor="middle" font-size="15" font-weight="600">${escapeHtml(lineageTitle(lineage))}</text>`);
  for (const tick of niceTicks(traitLow, traitHigh)) {
    parts.push(`<line x1="${f(x(tick))}" y1="${margin.top}" x2="${f(x(tick))}" y2="${margin.top + plotHeight}" stroke="#e3e6ea"/>`);
    parts.push(`<text x="${f(x(tick))}" y="${margin.top + plotHeight + 18}" text-anchor="middle" font-size="12">${escapeHtml(formatNumber(tick))}</text>`);
  }
  for (const tick of niceTicks(0, timeLast)) {
    parts.push(`<line x1="${margin.left}" y1="${f(y(tick))}" x2="${margin.left + plotWidth}" y2="${f(y(tick))}" stroke="#e3e6ea"/>`);
    parts.push(`<text x="${margin.left - 8}" y="${f(y(tick) + 4)}" text-anchor="end" font-size="12">${escapeHtml(formatNumber(tick))}</text>`);
  }
  parts.push(`<rect x="${margin.left}" y="${margin.top}" width="${plotWidth}" height="${plotHeight}" fill="none" stroke="#1d2430"/>`);
  if (smoothMean.length === mean.length && smoothMean.length > 1) {
    const left = smoothMean.map((value, i) => `${f(x(value - smoothHalf[i]))},${f(y(time[i]))}`);
    const right = smoothMean.map((value, i) => `${f(x(value + smoothHalf[i]))},${f(y(time[i]))}`).reverse();
    parts.push(`<polygon points="${[...left, ...right].join(' ')}" fill="#1f5fa6" fill-opacity="0.15" stroke="none"/>`);
    parts.push(`<polyline points="${smoothMean.map((value, i) => `${f(x(value))},${f(y(time[i]))}`).join(' ')}" fill="none" stroke="#1f5fa6" stroke-width="2"/>`);
  }
  mean.forEach((value, i) => {
    parts.push(`<line x1="${f(x(value - halfWidth[i]))}" y1="${f(y(time[i]))}" x2="${f(x(value + halfWidth[i]))}" y2="${f(y(time[i]))}" stroke="#1d2430" stroke-width="1.2"/>`);
    parts.push(`<circle cx="${f(x(value))}" cy="${f(y(time[i]))}" r="3.5" fill="#b55d00" stroke="#1d2430" stroke-width="0.8"/>`);
  });
  const unit = lineage.trait_unit ? `, ${traitUnitLabel(lineage.trait_unit, lineage.transform === 'ln', '')}` : '';
  const traitName = `${lineage.trait || 'trait'}${lineage.transform === 'ln' ? ` (natural log${unit})` : unit ? ` (${unit.slice(2)})` : ''}`;
  parts.push(`<text x="${margin.left + plotWidth / 2}" y="${height - 14}" text-anchor="middle" font-size="13">${escapeHtml(traitName)}</text>`);
  parts.push(`<text transform="translate(20 ${margin.top + plotHeight / 2}) rotate(-90)" text-anchor="middle" font-size="13">${escapeHtml(`time since oldest horizon (${lineage.time_unit})`)}</text>`);
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="system-ui, sans-serif" fill="#1d2430">${parts.join('')}</svg>`;
  return { svg, width, height };
}
