import { formatNumber } from '../units.js';
import { escapeHtml, exactValue } from './html.js';

type Json = unknown;

function isRecord(value: Json): value is Record<string, Json> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

function scalarText(value: Json): string {
  if (value === null || value === undefined) return '—';
  if (typeof value === 'number') return formatNumber(value);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'string') return value;
  if (Array.isArray(value) && value.every((entry) => entry === null || typeof entry !== 'object')) return value.map(scalarText).join(', ');
  return JSON.stringify(value);
}

function isScalar(value: Json): boolean {
  return value === null || typeof value !== 'object' || (Array.isArray(value) && value.every((entry) => entry === null || typeof entry !== 'object'));
}

function cell(value: Json, field: string): string {
  if (typeof value === 'number') return `<td class="number" data-field="${escapeHtml(field)}" data-value="${exactValue(value)}">${escapeHtml(scalarText(value))}</td>`;
  return `<td>${escapeHtml(scalarText(value))}</td>`;
}

/** A table of a list of flat records: one column per scalar field, in order of first appearance. */
export function recordsTable(records: readonly Record<string, Json>[], label: string): string {
  const columns: string[] = [];
  for (const record of records) for (const [key, value] of Object.entries(record)) if (isScalar(value) && !columns.includes(key)) columns.push(key);
  const head = columns.map((column) => `<th>${escapeHtml(column.replace(/_/g, ' '))}</th>`).join('');
  const body = records.map((record) => `<tr>${columns.map((column) => cell(record[column], column)).join('')}</tr>`).join('\n');
  const nested = records.flatMap((record) => Object.entries(record).filter(([, value]) => !isScalar(value)));
  return `<table aria-label="${escapeHtml(label)}"><thead><tr>${head}</tr></thead><tbody>\n${body}\n</tbody></table>`
    + nested.map(([key, value]) => `<details><summary>${escapeHtml(key.replace(/_/g, ' '))}</summary>${jsonBlock(value, 1)}</details>`).join('');
}

/**
 * Any JSON value as readable HTML: scalars as a list of facts, lists of
 * records as tables, nested objects as sub-blocks. Used for results of
 * analyses whose exact layout the report does not know in advance, so a new
 * analysis shows up in the report as soon as its results are in the document.
 */
export function jsonBlock(value: Json, depth = 0): string {
  if (isScalar(value)) return `<p>${escapeHtml(scalarText(value))}</p>`;
  if (Array.isArray(value)) {
    if (value.every(isRecord)) return recordsTable(value as Record<string, Json>[], 'results');
    return value.map((entry) => jsonBlock(entry, depth + 1)).join('');
  }
  const record = value as Record<string, Json>;
  const scalars = Object.entries(record).filter(([, entry]) => isScalar(entry));
  const nested = Object.entries(record).filter(([, entry]) => !isScalar(entry));
  const facts = scalars.length > 0
    ? `<dl class="facts">${scalars.map(([key, entry]) => `<dt>${escapeHtml(key.replace(/_/g, ' '))}</dt><dd${typeof entry === 'number' ? ` data-field="${escapeHtml(key)}" data-value="${exactValue(entry)}"` : ''}>${escapeHtml(scalarText(entry))}</dd>`).join('')}</dl>`
    : '';
  const heading = depth < 2 ? 'h4' : 'p';
  return facts + nested.map(([key, entry]) => `<${heading}><strong>${escapeHtml(key.replace(/_/g, ' '))}</strong></${heading}>${jsonBlock(entry, depth + 1)}`).join('');
}

/**
 * The comparison of sections, from the `compare --json` layout
 * (`{traits: [{trait, hypotheses: [{id, model, k, logLik, aicc, weight}]}]}`);
 * other layouts fall back to {@link jsonBlock}.
 */
export function comparisonBlock(comparison: Json): string {
  if (!isRecord(comparison) || !Array.isArray(comparison.traits)) return jsonBlock(comparison);
  const parts = (comparison.traits as Json[]).map((entry) => {
    if (!isRecord(entry) || !Array.isArray(entry.hypotheses)) return jsonBlock(entry);
    const hypotheses = (entry.hypotheses as Json[]).filter(isRecord);
    const best = hypotheses.reduce<Record<string, Json> | null>((winner, hypothesis) => (typeof hypothesis.aicc === 'number' && (winner === null || (hypothesis.aicc as number) < (winner.aicc as number)) ? hypothesis : winner), null);
    const { hypotheses: _, ...rest } = entry;
    return `<h3>${escapeHtml(String(entry.trait ?? 'trait'))}</h3>`
      + (Object.keys(rest).length > 1 ? jsonBlock(rest) : '')
      + recordsTable(hypotheses, 'section comparison')
      + (best ? `<p>Lowest AICc: <strong>${escapeHtml(String(best.id ?? ''))}</strong>${best.model ? ` ${escapeHtml(String(best.model))}` : ''}${typeof best.weight === 'number' ? ` (Akaike weight ${(best.weight as number).toFixed(3)})` : ''}.</p>` : '');
  });
  const { traits: _, ...rest } = comparison;
  return (Object.keys(rest).length > 0 ? jsonBlock(rest) : '') + parts.join('\n');
}

/**
 * Power results, from the `power --json` layout (`{grid: [{drift, p_best,
 * p_weight, p_lrt}], …}`); other layouts fall back to {@link jsonBlock}.
 */
export function powerBlock(power: Json): string {
  if (!isRecord(power) || !Array.isArray(power.grid)) return jsonBlock(power);
  const { grid, ...rest } = power;
  return (Object.keys(rest).length > 0 ? jsonBlock(rest) : '') + recordsTable((grid as Json[]).filter(isRecord), 'power');
}
