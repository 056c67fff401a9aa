import { InputError, usageError } from '../data/errors.js';
import { checkName } from '../data/names.js';
import { readTable } from '../data/read-table.js';
import { numberCell } from '../data/samples.js';
import { checkAdequacy, type AdequacyResult } from '../fit/adequacy.js';
import type { SearchProgress } from '../fit/fit-configurations.js';
import type { LineageFit } from '../fit/fit-lineage.js';
import { lineageRates, type LineageRates } from '../fit/rates.js';
import { lineageName, type Lineage } from '../lineage.js';
import type { EvolutionModel } from '../models/model.js';
import { findModel } from '../models/registry.js';
import { finiteOrNull } from '../render/fit-document.js';
import { readInput } from './input.js';

/** The `fit` options added for shift and covariate models, rates and adequacy (as commander gives them). */
export interface ExtensionOptions {
  minSegment?: string;
  covariateFile?: string;
  rates?: boolean;
  generationTime?: string;
  adequacy?: boolean;
  adequacyDraws?: string;
  adequacySeed?: string;
}

/** The same options, validated. */
export interface ExtensionSettings {
  readonly minimumSegment: number | undefined;
  readonly generationTime: number | null;
  readonly rates: boolean;
  readonly adequacy: boolean;
  readonly adequacyDraws: number;
  readonly adequacySeed: number;
}

function wholeNumber(option: string, raw: string | undefined, fallback: number, minimum: number): number {
  if (raw === undefined) return fallback;
  const value = Number(raw);
  if (!Number.isInteger(value) || value < minimum) throw usageError(`${option}: must be a whole number >= ${minimum}, got "${raw}"`);
  return value;
}

/**
 * Validate the extension options (usage errors name the option and value).
 *
 * @example
 * extensionSettings({ generationTime: '2' }); // { minimumSegment: undefined, generationTime: 2, rates: true, adequacy: false, adequacyDraws: 199, adequacySeed: 1 }
 * extensionSettings({ adequacyDraws: '5' });
 * // throws: --adequacy-draws: must be a whole number >= 19, got "5"
 */
export function extensionSettings(options: ExtensionOptions): ExtensionSettings {
  let generationTime: number | null = null;
  if (options.generationTime !== undefined) {
    generationTime = Number(options.generationTime);
    if (!(generationTime > 0) || !Number.isFinite(generationTime)) throw usageError(`--generation-time: must be a positive number of years, got "${options.generationTime}"`);
  }
  return {
    minimumSegment: options.minSegment === undefined ? undefined : wholeNumber('--min-segment', options.minSegment, 5, 2),
    generationTime,
    rates: options.rates === true || options.generationTime !== undefined,
    adequacy: options.adequacy === true,
    adequacyDraws: wholeNumber('--adequacy-draws', options.adequacyDraws, 199, 19),
    adequacySeed: wholeNumber('--adequacy-seed', options.adequacySeed, 1, 0),
  };
}

/**
 * Covariate values from a separate CSV (columns: section, optional; age,
 * time, height or depth; covariate), matched to each horizon by section and
 * that position: age (also for heights/depths placed by an age model), time,
 * or the height/depth as the samples give it.
 * Every horizon of a lineage must find its value; a file value overrides a
 * `covariate` column of the samples.
 *
 * @throws InputError naming the covariate file (bad cells) or the samples line of a horizon without a value.
 *
 * @example
 * // mkdtempSync, writeFileSync, rmSync from node:fs, tmpdir from node:os (a scratch folder)
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const folder = mkdtempSync(`${tmpdir()}/stratotrend-example-`);
 * writeFileSync(`${folder}/covariate.csv`, 'time,covariate\n0,5\n1,6\n2,7\n');
 * Array.from(attachCovariates([lineage], `${folder}/covariate.csv`)[0].covariate); // [5, 6, 7]
 * writeFileSync(`${folder}/covariate.csv`, 'time,covariate\n0,5\n1,6\n');
 * attachCovariates([lineage], `${folder}/covariate.csv`);
 * // throws: has no covariate for lineage "A / length" at time 2
 * rmSync(folder, { recursive: true });
 */
export function attachCovariates(lineages: readonly Lineage[], path: string): Lineage[] {
  const input = readInput(path);
  const table = readTable(input.text, input.name);
  const column = (name: string): number => table.header.indexOf(name);
  const key = (['age', 'time', 'height', 'depth'] as const).find((name) => column(name) >= 0) ?? null;
  if (key === null) throw new InputError('needs an "age", "time", "height" or "depth" column to match horizons', { file: input.name, line: 1 });
  if (column('covariate') < 0) throw new InputError('needs a "covariate" column', { file: input.name, line: 1 });
  const values = table.rows.map((row) => ({
    section: column('section') >= 0 ? checkName((row.cells[column('section')] ?? '').trim().normalize('NFC'), { file: input.name, line: row.line, column: 'section' }) : null,
    at: numberCell(row.cells[column(key)] ?? '', { file: input.name, line: row.line, column: key }),
    value: numberCell(row.cells[column('covariate')] ?? '', { file: input.name, line: row.line, column: 'covariate' }),
  }));
  return lineages.map((lineage) => {
    const positionOf = (i: number): number => {
      if (key === 'height' || key === 'depth') {
        // Matched by the position as the samples give it (before the age model), so the covariate file needs no ages.
        if (lineage.positionKind !== key) throw new InputError(`matches by "${key}" but the samples give "${lineage.positionKind}"; use ${lineage.positionKind === 'height' || lineage.positionKind === 'depth' ? `a "${lineage.positionKind}"` : 'an "age"'} column`, { file: input.name, line: 1 });
        return lineage.position[i];
      }
      if (key === 'time') {
        if (lineage.positionKind !== 'time') throw new InputError(`matches by "time" but the samples give "${lineage.positionKind}"; use an "age" column`, { file: input.name, line: 1 });
        return lineage.position[i];
      }
      if (lineage.positionKind === 'age') return lineage.position[i];
      if (lineage.firstAge !== undefined) return lineage.firstAge - lineage.time[i];
      throw new InputError(`matches by "age" but the samples give "${lineage.positionKind}" without ages`, { file: input.name, line: 1 });
    };
    const covariate = Float64Array.from(lineage.time, (_, i) => {
      const at = positionOf(i);
      const match = values.find((entry) => (entry.section === null || entry.section === lineage.section) && Math.abs(entry.at - at) <= 1e-9 * Math.max(1, Math.abs(at)));
      if (!match) {
        throw new InputError(`has no covariate for lineage "${lineageName(lineage)}" at ${key} ${at} (samples line ${lineage.lines[i]})`, { file: input.name });
      }
      return match.value;
    });
    return { ...lineage, covariate };
  });
}

/**
 * The models to fit to one lineage: a named set leaves out models the
 * lineage does not allow (e.g. covariate models without a covariate); an
 * explicit list keeps them (they show as not fitted, with the reason).
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * modelsForLineage(lineage, [randomWalk, covariateWalk], 'extended').leftOut; // ['covariate-walk'] (no covariate)
 * modelsForLineage(lineage, [randomWalk, covariateWalk], 'custom').models.length; // 2 (an explicit list keeps it)
 */
export function modelsForLineage(lineage: Lineage, models: readonly EvolutionModel[], setName: string): { models: EvolutionModel[]; leftOut: string[] } {
  if (setName === 'custom') return { models: [...models], leftOut: [] };
  const kept: EvolutionModel[] = [];
  const leftOut: string[] = [];
  for (const model of models) {
    if (model.unavailable?.(lineage)) leftOut.push(model.id);
    else kept.push(model);
  }
  return { models: kept, leftOut };
}


/** Rates and adequacy of one lineage, when asked for. */
export interface LineageExtras {
  readonly rates: LineageRates | null;
  readonly adequacy: AdequacyResult | null;
  /** Models of the named set left out because the lineage does not allow them. */
  readonly leftOut: readonly string[];
}

/**
 * Rates (from the lineage and its fitted models) and adequacy of the best model.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 3, 2], samplingVariance: [1, 1, 1] });
 * const fit = fitLineage(lineage, [strictStasis, randomWalk], { intervals: false });
 * lineageExtras(fit, extensionSettings({}), ['covariate-walk']); // { rates: null, adequacy: null, leftOut: ['covariate-walk'] } (neither asked for)
 */
export function lineageExtras(fit: LineageFit, settings: ExtensionSettings, leftOut: readonly string[]): LineageExtras {
  const rates = settings.rates ? lineageRates(fit.lineage, fit.models.filter((model) => model.aicc !== null), settings.generationTime) : null;
  let adequacy: AdequacyResult | null = null;
  const best = fit.models.find((model) => model.id === fit.best);
  const model = best ? findModel(best.id) : undefined;
  if (settings.adequacy && best && model) {
    adequacy = checkAdequacy(model, best, fit.lineage, {
      draws: settings.adequacyDraws,
      seed: settings.adequacySeed,
      fitOptions: { minimumSegment: settings.minimumSegment },
    });
  }
  return { rates, adequacy, leftOut };
}

/**
 * JSON of rates and adequacy for one lineage document (numbers finite or null).
 *
 * @example
 * extrasDocument({ rates: null, adequacy: null, leftOut: ['covariate-walk'] }); // { models_left_out: ['covariate-walk'] }
 * extrasDocument({ rates: null, adequacy: null, leftOut: [] }); // {}
 */
export function extrasDocument(extras: LineageExtras): Record<string, unknown> {
  const document: Record<string, unknown> = {};
  if (extras.leftOut.length > 0) document.models_left_out = extras.leftOut;
  if (extras.rates) {
    const interval = (rate: LineageRates['whole']) => ({
      from: rate.from,
      to: rate.to,
      interval: finiteOrNull(rate.interval),
      ln_change: finiteOrNull(rate.lnChange),
      darwins: finiteOrNull(rate.darwins),
      generations: finiteOrNull(rate.generations),
      haldanes: finiteOrNull(rate.haldanes),
    });
    document.rates = {
      ln_scale: extras.rates.scale,
      generation_time_years: extras.rates.generationTime,
      time_unit: extras.rates.timeUnit,
      whole_sequence: interval(extras.rates.whole),
      intervals: extras.rates.intervals.map(interval),
      model_based: extras.rates.model.map((rate) => ({
        model: rate.model,
        parameter: rate.parameter,
        kind: rate.kind,
        estimate: finiteOrNull(rate.estimate),
        per_million_years: finiteOrNull(rate.perMillionYears),
        per_generation: finiteOrNull(rate.perGeneration),
        neutral_range: rate.neutral,
      })),
      pooled_within_variance: finiteOrNull(extras.rates.pooledWithinVariance),
      notes: extras.rates.notes,
      caution: extras.rates.caution,
    };
  }
  if (extras.adequacy) {
    const result = extras.adequacy;
    document.adequacy = {
      model: result.model,
      draws: result.draws,
      failed_draws: result.failedDraws,
      seed: result.seed,
      level: result.level,
      adequate: result.adequate,
      checks: result.checks.map((check) => ({ name: check.name, label: check.label, statistic: finiteOrNull(check.statistic), p_value: finiteOrNull(check.pValue), adequate: check.adequate })),
      note: result.note,
    };
  }
  return document;
}
