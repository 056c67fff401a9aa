import { InputError, usageError } from '../data/errors.js';
import { WarningLog, type Warning } from '../data/warnings.js';
import { fitModel } from '../fit/fit-model.js';
import { lineageName, type Lineage } from '../lineage.js';
import { findModel } from '../models/registry.js';
import { designFromOptions, designLineage } from '../simulate/design.js';
import { simulatedTable } from '../simulate/sample-table.js';
import { lineagesWithAgeModel, type AgeModelOptions } from './age-model-options.js';
import { loadSamplesStreamed, timeUnitOption, type SampleFileOptions } from './input.js';
import { readingProgress } from '../io/progress.js';
import { numberOption, seedOption, wholeOption } from './option-values.js';

/** Options of `stratotrend simulate`. */
export interface SimulateCommandOptions extends SampleFileOptions, AgeModelOptions {
  model?: string;
  parameters?: string;
  horizons?: string;
  spacing?: string;
  n?: string;
  withinVariance?: string;
  replicates?: string;
  seed?: string;
  form?: string;
  out?: string;
}

/**
 * Parse "name=value,name=value" into natural parameters, checking names against the model.
 *
 * @example
 * parseParameters('step_variance=0.01, ancestral_mean=5', ['ancestral_mean', 'step_variance']); // { step_variance: 0.01, ancestral_mean: 5 }
 * parseParameters('drift=1', ['step_variance']);
 * // throws: --parameters: "drift" is not a parameter of this model; its parameters are step_variance
 */
export function parseParameters(text: string | undefined, known: readonly string[]): Record<string, number> {
  const values: Record<string, number> = {};
  if (text === undefined) return values;
  for (const part of text.split(',').map((piece) => piece.trim()).filter((piece) => piece !== '')) {
    const match = /^([a-z_]+)\s*=\s*(.+)$/.exec(part);
    if (!match) throw usageError(`--parameters: expected name=value, got "${part}"`);
    const [, name, raw] = match;
    if (!known.includes(name)) throw usageError(`--parameters: "${name}" is not a parameter of this model; its parameters are ${known.join(', ')}`);
    const value = Number(raw);
    if (!Number.isFinite(value)) throw usageError(`--parameters: ${name} must be a number, got "${raw}"`);
    values[name] = value;
  }
  return values;
}

/**
 * Sequences from a model with given parameters on the design of FILE (each
 * of its lineages) or of the design options, as the text of a samples CSV the
 * tool reads back. Parameters not given are taken from the model fitted to
 * each lineage of FILE.
 *
 * @param onRead called with the reading's time-axis and input warnings as soon as FILE is read
 *
 * @example
 * const text = await runSimulate(undefined, { model: 'random-walk', parameters: 'ancestral_mean=5,step_variance=0.01', seed: '7' });
 * text.split('\n')[0]; // 'section,trait,time,n,mean,sd'
 * text.split('\n')[1]; // 'simulated,trait,0,20,5.095820306,1' (seed 7)
 * await runSimulate(undefined, { model: 'random-walk', parameters: 'step_variance=-1' });
 * // throws: --parameters: step_variance must be at least 0, got -1
 */
export async function runSimulate(file: string | undefined, options: SimulateCommandOptions, onRead?: (warnings: readonly Warning[]) => void): Promise<string> {
  const model = findModel(options.model ?? 'directional-walk');
  if (!model) throw usageError(`--model: unknown model "${options.model}"`);
  const names = model.parameters.map((spec) => spec.name);
  const given = parseParameters(options.parameters, names);
  for (const spec of model.parameters) {
    const value = given[spec.name];
    if (value !== undefined && value < spec.lowerBound) throw usageError(`--parameters: ${spec.name} must be at least ${spec.lowerBound}, got ${value}`);
  }
  const form = options.form ?? 'summary';
  if (form !== 'summary' && form !== 'specimen') throw usageError(`--form must be summary or specimen, got "${form}"`);
  const replicates = wholeOption(options.replicates, '--replicates', 1, 1, 100000);
  const seed = seedOption(options.seed);
  let designs: Lineage[];
  const designOptionsGiven = [options.horizons, options.spacing, options.n, options.withinVariance].some((value) => value !== undefined);
  if (file === undefined && (options.ageModel !== undefined || options.extrapolate)) throw usageError('--age-model and --extrapolate place the heights or depths of a samples FILE; the design options give times directly');
  if (file !== undefined) {
    if (designOptionsGiven) throw usageError('give a FILE or the design options (--horizons, --spacing, --n, --within-variance), not both');
    // Read as a stream: only the design (times, n, within variances) is needed, in bounded memory.
    const warnings = new WarningLog();
    const { samples } = await loadSamplesStreamed(file, options, readingProgress(file));
    // Heights and depths become ages through the same age-model options as fit; the output then gives those ages.
    designs = lineagesWithAgeModel(file, samples, options, warnings).lineages;
    onRead?.(warnings.list().filter((warning) => warning.category === 'time-axis' || warning.category === 'input'));
  } else {
    timeUnitOption(options.timeUnit); // the label is printed and written: refuse an empty one or control characters
    const design = designFromOptions({
      horizons: wholeOption(options.horizons, '--horizons', 25, 3, 100000),
      spacing: numberOption(options.spacing, '--spacing', true) ?? 0.1,
      count: wholeOption(options.n, '--n', 20, 2, 100000),
      withinVariance: numberOption(options.withinVariance, '--within-variance', true) ?? 1,
      timeUnit: options.timeUnit ?? 'Myr',
    });
    designs = [designLineage(design)];
  }
  const parameters = designs.map((design) => {
    const missing = names.filter((name) => given[name] === undefined);
    if (missing.length === 0) return { ...given };
    if (file === undefined) throw usageError(`--parameters: give ${missing.join(', ')} (or a FILE, whose fitted values fill in what is not given)`);
    const fit = fitModel(model, design, { intervals: false });
    if (!fit.converged || missing.some((name) => !Number.isFinite(fit.estimates[name]))) {
      throw new InputError(`${model.id} could not be fitted to "${lineageName(design)}" to fill in ${missing.join(', ')}; give them with --parameters`, { file });
    }
    return { ...fit.estimates, ...given };
  });
  return simulatedTable({ model, designs, parameters, replicates, seed, form });
}
