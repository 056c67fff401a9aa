import type { MethodsNote } from '../../models/model.js';
import { findModel } from '../../models/registry.js';
import type { FitDocumentView, LineageView, ModelView } from './document-view.js';
import { findReference, modelReferenceKeys, uniqueKeys, type Reference } from './references.js';
import { capitalised } from '../words.js';

/**
 * One sentence of the methods text. `text` may cite inline with markers
 * `[[key]]` or `[[key1;key2]]` (keys of `referenceCatalogue`); `cites` are
 * the sources cited at the end of the sentence.
 */
export interface MethodsSentence {
  readonly text: string;
  readonly cites: readonly string[];
  /** Which paragraph the sentence belongs to: the data, the models and their fitting, or model choice and further analyses. */
  readonly paragraph: 'data' | 'models' | 'choice';
}

const citeMarker = /\[\[([^\]]+)\]\]/g;

/**
 * Every source a sentence cites, inline markers first, then the end citations.
 *
 * @example
 * sentenceKeys({ text: 'Models were fitted [[hunt2006]].', cites: ['burnhamAnderson2002'] }); // ['hunt2006', 'burnhamAnderson2002']
 */
export function sentenceKeys(sentence: Pick<MethodsSentence, 'text' | 'cites'>): string[] {
  const inline = [...sentence.text.matchAll(citeMarker)].flatMap((match) => match[1].split(';'));
  return uniqueKeys([...inline, ...sentence.cites]);
}

/**
 * Render a sentence, replacing citation markers with `cite(keys)` and
 * adding the end citations in parentheses.
 *
 * @example
 * const sentence = { text: 'Models were fitted [[hunt2006]].', cites: [], paragraph: 'models' };
 * renderSentence(sentence, (text) => text, (keys) => keys.map((key) => findReference(key).cite).join('; ')); // 'Models were fitted Hunt 2006.'
 */
export function renderSentence(sentence: MethodsSentence, text: (plain: string) => string, cite: (keys: readonly string[]) => string): string {
  let output = '';
  let last = 0;
  for (const match of sentence.text.matchAll(citeMarker)) {
    output += text(sentence.text.slice(last, match.index)) + cite(match[1].split(';'));
    last = (match.index ?? 0) + match[0].length;
  }
  output += text(sentence.text.slice(last));
  return sentence.cites.length === 0 ? output : `${output.replace(/\.$/, '')} (${cite(sentence.cites)}).`;
}

/** The generated methods text and the references it cites, in alphabetical order. */
export interface MethodsText {
  readonly sentences: readonly MethodsSentence[];
  readonly references: readonly Reference[];
}

/** What the power analysis of the report did, read from its `power --json` documents. */
export interface PowerRun {
  readonly replicates?: number;
  readonly seed?: number | string;
  /** Lineages whose power analysis ran (absent: not known, e.g. an older caller). */
  readonly lineages?: readonly string[];
  /** Lineages whose power analysis could not run. */
  readonly notRun?: readonly string[];
  /** The drift grid: values per time unit, lowest and highest, how many. */
  readonly drifts?: { readonly lowest: number; readonly highest: number; readonly count: number; readonly unit: string };
  /** Where the simulated walks' step variance came from: the fitted directional walk or a value the user gave. */
  readonly stepVariance?: 'fitted' | 'given' | 'mixed';
  /** Akaike weight the directional walk had to exceed (the P(weight) rule). */
  readonly weightThreshold?: number;
  /** Level of the bootstrap likelihood-ratio test (0.05 unless the document says otherwise). */
  readonly level?: number;
}

/** Which optional analyses the report shows, so the methods text can describe them. */
export interface AnalysesRun {
  readonly comparison?: boolean;
  /** The hypotheses the comparison fitted (`separate`, `shared`, `shared-offset`), when known. */
  readonly comparisonHypotheses?: readonly string[];
  /** Likelihood-ratio tests of shared against separate were reported with the comparison. */
  readonly comparisonTests?: boolean;
  /** Rates in darwins and haldanes were reported. */
  readonly rates?: boolean;
  readonly power?: PowerRun | null;
  readonly adequacy?: { readonly replicates?: number; readonly seed?: number | string } | null;
  /** The smoothed lineage mean was drawn in the figures (`--smoothed-band`). */
  readonly smoothedBand?: boolean;
}

function listInWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  if (items.length === 2) return `${items[0]} and ${items[1]}`;
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** A count in words up to twenty (for the start of a sentence), digits beyond. */
function countWords(count: number): string {
  const words = ['no', 'one', 'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten', 'eleven', 'twelve', 'thirteen', 'fourteen', 'fifteen', 'sixteen', 'seventeen', 'eighteen', 'nineteen', 'twenty'];
  return words[count] ?? String(count);
}

function plural(count: number, word: string, many = `${word}s`): string {
  return `${count} ${count === 1 ? word : many}`;
}

/**
 * The models fitted anywhere in the document, in table order, first occurrence kept.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * modelsFitted(document).map((model) => model.id); // ['strict-stasis', 'random-walk']
 */
export function modelsFitted(document: FitDocumentView): ModelView[] {
  const seen = new Map<string, ModelView>();
  for (const lineage of document.lineages) for (const model of lineage.models) if (!seen.has(model.id)) seen.set(model.id, model);
  return [...seen.values()];
}

function distinct<T>(lineages: readonly LineageView[], pick: (lineage: LineageView) => T): T[] {
  return [...new Set(lineages.map(pick))];
}

/** The interval methods in the order the text describes them, with their words and sources. */
const intervalWords: Readonly<Record<string, { text: (models: string) => string; cites: readonly string[] }>> = {
  integrated: {
    text: (models) => `For ${models}, the 95% intervals are equal-tailed credible intervals of the integrated likelihood, with the location parameters integrated out under flat priors and the variance or rate parameter under a uniform prior on its square root.`,
    cites: ['bergerLiseoWolpert1999'],
  },
  adjusted: {
    text: (models) => `For ${models}, the approximate 95% confidence intervals come from the restricted (REML-type) adjusted profile likelihood, in which the location parameters not held fixed are integrated out rather than maximised over, with the cut-off χ²₁(0.95)/2 ≈ 1.92.`,
    cites: ['venzonMoolgavkar1988'],
  },
  profile: {
    text: (models) => `For ${models}, the approximate 95% confidence intervals are profile-likelihood intervals: the values of a parameter at which the log-likelihood, maximised over the other parameters, lies within χ²₁(0.95)/2 ≈ 1.92 of its maximum (an asymptotic cut-off).`,
    cites: ['venzonMoolgavkar1988'],
  },
  bootstrap: {
    text: (models) => `For ${models}, the approximate 95% confidence intervals are profile-likelihood intervals whose cut-off is the 95% quantile of the likelihood-ratio statistic over a parametric bootstrap of the fitted model.`,
    cites: ['venzonMoolgavkar1988', 'efronTibshirani1993'],
  },
};

/**
 * One sentence per interval method actually used, naming the models it was
 * used for (the default method hands models with two or more process
 * parameters to the adjusted profile, so a run can use two methods).
 */
function intervalSentences(document: FitDocumentView): MethodsSentence[] {
  const requested = document.provenance.options.intervals;
  if (requested === 'none' || requested === false) {
    return [{ text: 'No intervals were computed for this run.', cites: [], paragraph: 'models' }];
  }
  const byMethod = new Map<string, string[]>();
  for (const lineage of document.lineages) {
    for (const model of lineage.models) {
      if (!model.converged || model.interval_method === 'none') continue;
      const labels = byMethod.get(model.interval_method) ?? [];
      if (!labels.includes(model.label)) labels.push(model.label);
      byMethod.set(model.interval_method, labels);
    }
  }
  const sentences: MethodsSentence[] = [];
  const ordered = [...Object.keys(intervalWords).filter((method) => byMethod.has(method)), ...[...byMethod.keys()].filter((method) => !(method in intervalWords))];
  for (const method of ordered) {
    const labels = byMethod.get(method) ?? [];
    const models = labels.length === 1 ? `the ${labels[0]} model` : `the models ${listInWords(labels)}`;
    const words = intervalWords[method];
    sentences.push(words
      ? { text: words.text(byMethod.size === 1 ? 'every model' : models), cites: words.cites, paragraph: 'models' }
      : { text: `For ${models}, intervals were made by the method "${method}".`, cites: [], paragraph: 'models' });
  }
  return sentences;
}

/** Numbers in running text: up to 3 significant digits, no exponent for ordinary sizes. */
/** The labels of the adequacy checks the lineage documents report (first lineage that has them). */
function adequacyCheckLabels(lineages: readonly LineageView[]): string[] {
  for (const lineage of lineages) {
    const checks = (lineage.adequacy as { checks?: { label?: unknown }[] } | undefined)?.checks;
    if (Array.isArray(checks)) return checks.map((check) => check.label).filter((label): label is string => typeof label === 'string');
  }
  return [];
}

function shortNumber(value: number): string {
  return String(Number(value.toPrecision(3)));
}

interface AgeModelView {
  readonly file?: string;
  readonly position_kind?: string;
  readonly sections?: readonly { readonly section: string; readonly ties: readonly { readonly age_sd?: number }[]; readonly sedimentation_rates: readonly { readonly rate: number }[] }[];
}

/** The age model's sentences: ties, interpolation, sedimentation rates, extrapolated horizons and age draws; none without an age model. */
function ageModelSentences(document: FitDocumentView): MethodsSentence[] {
  const ageModel = document.age_model as AgeModelView | undefined | null;
  const placed = document.lineages.filter((lineage) => lineage.position_kind === 'height' || lineage.position_kind === 'depth');
  if (!ageModel || !Array.isArray(ageModel.sections) || placed.length === 0) return [];
  const sentences: MethodsSentence[] = [];
  const kind = ageModel.position_kind === 'depth' ? 'depths' : 'heights';
  const ties = ageModel.sections.reduce((sum, section) => sum + section.ties.length, 0);
  const rates = ageModel.sections.flatMap((section) => section.sedimentation_rates.map((segment: { rate: number }) => segment.rate)).filter((rate) => Number.isFinite(rate));
  const unit = placed[0].time_unit;
  const named = ageModel.sections.filter((section) => section.section !== '').length;
  const rateWords = rates.length === 0 ? '' : Math.min(...rates) === Math.max(...rates)
    ? `, ${shortNumber(rates[0])} m per ${unit}`
    : `, from ${shortNumber(Math.min(...rates))} to ${shortNumber(Math.max(...rates))} m per ${unit}`;
  sentences.push({
    text: `Stratigraphic ${kind} were converted to ages with an age model of ${plural(ties, 'tie point')}${named > 0 ? ` in ${plural(named, 'section')}` : ''}, interpolating linearly between consecutive ties, that is, assuming a constant sedimentation rate between them${rateWords ? ` (rates${rateWords.replace(/^,/, '')})` : ''}.`,
    cites: [], paragraph: 'data',
  });
  const extrapolated = placed.reduce((sum, lineage) => sum + lineage.data.extrapolated.filter(Boolean).length, 0);
  if (extrapolated > 0) {
    sentences.push({
      text: `${capitalised(plural(extrapolated, 'horizon'))} lay beyond the outermost ties; their ages were extrapolated at the rate of the nearest stretch, and results that depend on them should be read with that in mind.`,
      cites: [], paragraph: 'data',
    });
  }
  const draws = document.age_uncertainty as { draws?: number; seed?: number } | undefined;
  if (draws && typeof draws.draws === 'number' && draws.draws > 0) {
    sentences.push({
      text: `To gauge the effect of dating uncertainty, the tie ages were redrawn ${draws.draws} times from normal distributions with their standard errors (each draw kept in stratigraphic order; random seed ${draws.seed ?? 'not recorded'}), every lineage was refitted without intervals, and the spread of the Akaike weights and estimates over the draws was reported; this spread does not include sampling error.`,
      cites: [], paragraph: 'choice',
    });
  }
  return sentences;
}

/**
 * Write the methods text of a report from what was actually run: the models
 * fitted, the likelihood, the treatment of sampling variance, the
 * transform, the time unit, the model-choice criterion, the interval method,
 * the optional analyses and the software version, each with its published
 * source. The wording is the project's own; the user is expected to adapt it.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * methodsText(document).sentences[0].text; // 'Trait means of 1 lineage (1 section, 1 trait, 3 horizons in all) were analysed with stratotrend 0.1.0.'
 */
export function methodsText(document: FitDocumentView, analyses: AnalysesRun = {}): MethodsText {
  const { lineages, provenance } = document;
  const sentences: MethodsSentence[] = [];
  const sections = distinct(lineages, (lineage) => lineage.section).filter((name) => name !== '');
  const traits = distinct(lineages, (lineage) => lineage.trait).filter((name) => name !== '');
  const horizons = lineages.reduce((sum, lineage) => sum + lineage.horizons, 0);
  const detail = [sections.length > 0 ? plural(sections.length, 'section') : null, traits.length > 0 ? plural(traits.length, 'trait') : null, `${plural(horizons, 'horizon')} in all`]
    .filter((part) => part !== null)
    .join(', ');
  sentences.push({
    text: `Trait means of ${plural(lineages.length, 'lineage')} (${detail}) were analysed with ${provenance.tool} ${provenance.version}.`,
    cites: [], paragraph: 'data',
  });

  const transforms = distinct(lineages, (lineage) => lineage.transform);
  if (transforms.includes('ln') || provenance.options.log === true) {
    sentences.push({
      text: 'The trait was analysed on the natural-log scale: specimen measurements were log-transformed one by one before the horizon summaries were taken, and horizons given only as summaries were transformed by the delta method (mean ln(x̄), variance (s/x̄)²), so rates are proportional changes.',
      cites: [], paragraph: 'data',
    });
  } else {
    sentences.push({ text: 'The trait was analysed on its original scale (no transform).', cites: [], paragraph: 'data' });
  }

  // Only with --trait-unit (fit.json trait_unit): without it the text is as before the option.
  const traitUnits = distinct(lineages, (lineage) => lineage.trait_unit).filter((unit): unit is string => typeof unit === 'string' && unit !== '');
  if (traitUnits.length > 0) {
    const logged = transforms.includes('ln');
    const unitWords = listInWords(traitUnits);
    sentences.push({
      text: `Trait values were measured in ${unitWords}${logged ? `, so the log-scale means and their estimates are in ${listInWords(traitUnits.map((unit) => `ln ${unit}`))}` : ''}; the unit is as recorded with the data and no values were converted.`,
      cites: [], paragraph: 'data',
    });
  }

  const treatments = distinct(lineages, (lineage) => lineage.sampling_variance);
  if (treatments.includes('pooled') || provenance.options.pool === true) {
    sentences.push({
      text: 'The sampling variance of each horizon mean was treated as known: the within-horizon variance was pooled over the horizons of each lineage, v = Σ(nᵢ − 1)vᵢ / Σ(nᵢ − 1), and divided by the number of specimens of the horizon, eᵢ = v / nᵢ.',
      cites: [], paragraph: 'data',
    });
  } else {
    sentences.push({
      text: 'The sampling variance of each horizon mean was treated as known, eᵢ = vᵢ / nᵢ, from the within-horizon variance vᵢ (n − 1 divisor) and the number of specimens nᵢ of that horizon.',
      cites: [], paragraph: 'data',
    });
  }

  const units = distinct(lineages, (lineage) => lineage.time_unit);
  const kinds = distinct(lineages, (lineage) => lineage.position_kind);
  const origin = kinds.includes('height') || kinds.includes('depth')
    ? 'from stratigraphic positions converted to ages through the age model'
    : kinds.includes('age')
      ? 'from ages before present'
      : 'as given';
  sentences.push({
    text: `Time was measured as elapsed time since the oldest horizon of each lineage (${origin}), in ${listInWords(units)}; every rate is per ${listInWords(units)}.`,
    cites: [], paragraph: 'data',
  });
  sentences.push(...ageModelSentences(document).filter((sentence) => sentence.paragraph === 'data'));

  const models = modelsFitted(document);
  const modelParts = models.map((model) => `${model.label} (K = ${model.k}; [[${modelReferenceKeys(model.id).join(';')}]])`);
  const setWords = document.model_set === 'classic' ? ' (the classic set)' : document.model_set === 'custom' ? ' (a set chosen by the user)' : ` (the "${document.model_set}" set)`;
  sentences.push({
    text: `${capitalised(countWords(models.length))} ${models.length === 1 ? 'model' : 'models'} of phyletic evolution${setWords} ${models.length === 1 ? 'was' : 'were'} fitted to every lineage by maximum likelihood: ${listInWords(modelParts)}.`,
    cites: [],
    paragraph: 'models',
  });
  // Each family's sentences once (`EvolutionModel.methodsNotes`), in table order.
  const notes = new Map<string, MethodsNote>();
  for (const model of models) {
    for (const note of findModel(model.id)?.methodsNotes ?? []) if (!notes.has(note.key)) notes.set(note.key, note);
  }
  for (const note of notes.values()) sentences.push({ text: note.sentence(provenance.options), cites: [], paragraph: 'models' });
  sentences.push({
    text: 'The likelihood is the exact joint multivariate-normal density of all horizon means, with the model\'s process covariance plus the sampling variances on the diagonal; it was computed in a number of steps proportional to the number of horizons by a Kalman filter on the state-space form of each model, with the parameters that enter the mean linearly estimated exactly by generalised least squares through the augmented filter.',
    cites: ['kalman1960', 'deJong1991'], paragraph: 'models',
  });
  sentences.push({
    text: 'The remaining (variance and rate) parameters were maximised numerically on a logarithmic grid, every local maximum of the grid refined by Brent\'s method (applied to the slope of the likelihood, computed exactly by the filter, for the classic and covariate models), with variances allowed to reach their bound of zero; estimates at a bound or a limit are reported as such. The fit was made on the data rescaled to a unit time span and trait scale and reported in the original units.',
    cites: ['brent1973'], paragraph: 'models',
  });
  sentences.push(...intervalSentences(document));
  sentences.push({
    text: 'Models were ranked by the small-sample Akaike information criterion, AICc = −2 logL + 2K + 2K(K + 1)/(N − K − 1) with N the number of horizons, and their relative support expressed as Akaike weights; a model with N − K − 1 ≤ 0 was not compared.',
    cites: ['hurvichTsai1989', 'burnhamAnderson2002'], paragraph: 'choice',
  });
  if (analyses.smoothedBand && lineages.some((lineage) => lineage.smoothed !== null)) {
    sentences.push({
      text: 'The lineage mean drawn in the figures was smoothed under the best-supported model with a fixed-interval (Rauch–Tung–Striebel) smoother.',
      cites: ['rauchTungStriebel1965'], paragraph: 'choice',
    });
  }
  sentences.push(...trendSentences(document));
  sentences.push(...ageModelSentences(document).filter((sentence) => sentence.paragraph === 'choice'));
  if (analyses.comparison) {
    const hypotheses = analyses.comparisonHypotheses ?? ['separate', 'shared'];
    const offset = hypotheses.includes('shared-offset');
    sentences.push({
      text: `Where a trait was measured in two or more sections, hypotheses that the sections each follow their own process (separate) or share one evolutionary process with their own starting values (shared)${offset ? ', or record one lineage on the common timescale with a constant offset per section (shared offset)' : ''} were fitted to all horizons together and ranked by AICc and Akaike weights in the same way, with N the number of horizons of all sections of the trait.`,
      cites: ['hurvichTsai1989', 'burnhamAnderson2002'], paragraph: 'choice',
    });
    if (analyses.comparisonTests) {
      sentences.push({
        text: 'Nested shared and separate hypotheses of the same model were also compared by likelihood-ratio tests with the χ² reference distribution, which is approximate when a variance lies on its bound of zero.',
        cites: ['wilks1938'], paragraph: 'choice',
      });
    }
  }
  if (analyses.rates) {
    const generation = provenance.options.generation_time_years;
    const haldanes = typeof generation === 'number'
      ? `in haldanes (change in within-sample standard deviations per generation, for an assumed generation time of ${shortNumber(generation)} ${generation === 1 ? 'year' : 'years'})`
      : 'in haldanes (change in within-sample standard deviations per generation)';
    sentences.push({
      text: `Rates of change were expressed in darwins (change in the natural logarithm of the trait per million years) and ${haldanes}, and model-based rates were set against the range expected under neutral drift.`,
      cites: ['haldane1949', 'gingerich1993', 'lynch1990'], paragraph: 'choice',
    });
    sentences.push({
      text: 'Measured rates depend on the interval over which they are measured, so they are compared only over similar intervals.',
      cites: ['gingerich1983', 'hunt2012'], paragraph: 'choice',
    });
  }
  const power = analyses.power;
  if (power && (power.lineages === undefined || power.lineages.length > 0)) {
    const which = power.lineages === undefined || power.notRun === undefined || power.notRun.length === 0
      ? 'this sampling design'
      : `the sampling design of ${listInWords(power.lineages.map((name) => `"${name}"`))}`;
    const grid = power.drifts
      ? ` over a grid of ${power.drifts.count} drift values from ${shortNumber(power.drifts.lowest)} to ${shortNumber(power.drifts.highest)} per ${power.drifts.unit}`
      : ' over a grid of drift values';
    const step = power.stepVariance === 'given' ? 'a step variance given by the analyst' : power.stepVariance === 'mixed' ? 'a fitted or given step variance' : 'the step variance of the fitted directional walk';
    const details = [power.replicates ? `${power.replicates} replicates per drift value` : null, power.seed !== undefined ? `random seed ${power.seed}` : null].filter(Boolean).join(', ');
    sentences.push({
      text: `The power of ${which} to detect a directional trend was estimated by simulating the directional walk, with ${step}, on the design of the data (its times, sample sizes and within-horizon variances)${grid}, refitting every model to each replicate${details ? ` (${details})` : ''}, and counting how often the directional walk was best supported${power.weightThreshold !== undefined ? `, had an Akaike weight above ${power.weightThreshold}` : ''} or was preferred by a likelihood-ratio test against the random walk at the ${shortNumber(100 * (power.level ?? 0.05))}% level with a parametric-bootstrap critical value; the same counts at zero drift give the false-trend rate.`,
      cites: ['efronTibshirani1993'], paragraph: 'choice',
    });
  }
  if (analyses.adequacy) {
    const details = [analyses.adequacy.replicates ? `${analyses.adequacy.replicates} replicates` : null, analyses.adequacy.seed !== undefined ? `random seed ${analyses.adequacy.seed}` : null].filter(Boolean).join(', ');
    const checks = adequacyCheckLabels(lineages);
    sentences.push({
      text: `The adequacy of the best-supported model was checked on its standardised one-step prediction errors${checks.length > 0 ? ` (${listInWords(checks)})` : ''}, with p-values from a parametric bootstrap of the fitted model${details ? ` (${details})` : ''}.`,
      cites: ['vojeStarrfeltLiow2018', 'efronTibshirani1993'], paragraph: 'choice',
    });
  }
  const cited = uniqueKeys(sentences.flatMap(sentenceKeys));
  // The reference list is alphabetical, as journals print it.
  const references = cited.map((key) => findReference(key)).sort((left, right) => left.entry.localeCompare(right.entry, 'en'));
  return { sentences, references };
}

/**
 * The methods text as plain paragraphs with author–year citations, ready to paste.
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * methodsPlainText(methodsText(document)).startsWith('Trait means of 1 lineage (1 section, 1 trait, 3 horizons in all) were analysed with stratotrend 0.1.0. The trait was analysed on its original scale'); // true
 */
export function methodsPlainText(methods: MethodsText): string {
  return methodsParagraphs(methods)
    .map((sentences) => sentences.map((sentence) => renderSentence(sentence, (text) => text, (keys) => keys.map((key) => findReference(key).cite).join('; '))).join(' '))
    .join('\n\n');
}

/**
 * The sentences grouped into their paragraphs, in order (empty paragraphs left out).
 *
 * @example
 * const lineage = lineageFromArrays({ section: 'A', trait: 'length', time: [0, 1, 2], mean: [1, 2, 3], samplingVariance: [0.04, 0.04, 0.04] });
 * const provenance = { tool: 'stratotrend', version: '0.1.0', inputs: [{ file: 'a.csv', sha256: '0' }], options: {} };
 * const document = asFitDocument(fitDocument([fitLineage(lineage, [strictStasis, randomWalk], { intervals: false })], provenance, [], 'classic'));
 * methodsParagraphs(methodsText(document)).map((paragraph) => paragraph[0].paragraph); // ['data', 'models', 'choice']
 */
export function methodsParagraphs(methods: MethodsText): MethodsSentence[][] {
  return (['data', 'models', 'choice'] as const)
    .map((paragraph) => methods.sentences.filter((sentence) => sentence.paragraph === paragraph))
    .filter((sentences) => sentences.length > 0);
}

/**
 * The trend test's methods sentences, when the fit made it (fit.json
 * `provenance.options.trend_test`, a lineage's `trend_test`).
 */
function trendSentences(document: FitDocumentView): MethodsSentence[] {
  const options = document.provenance.options.trend_test as { level?: number; seed?: number } | null | undefined;
  if (!options || !document.lineages.some((lineage) => lineage.trend_test !== undefined && lineage.trend_test !== null)) return [];
  const level = typeof options.level === 'number' ? options.level : 0.05;
  return [{
    text: `Directional change was tested in every lineage against the null hypothesis of no directional change (unbiased random walk, stasis or strict stasis): the statistic was the squared generalised-least-squares drift of the directional walk divided by its variance, both computed at the step variance of the random walk's restricted-likelihood (REML) fit, and its null distribution was simulated by a parametric bootstrap on each lineage's own times and sampling variances from the REML fits of the random walk (at its step variance and at three times it) and of the best-supported non-directional model, the largest p-value being reported, with sequential Monte Carlo p-values (at most 199 replicates per null model, stopping at 10 exceedances${typeof options.seed === 'number' ? `; random seed ${options.seed}` : ''}); a trend was called supported when p < ${shortNumber(level)}. A supported trend describes the net pattern on this design; by itself it says nothing about selection versus drift, and it depends on the age model and time-averaging.`,
    cites: ['davisonHinkley1997', 'pattersonThompson1971', 'besagClifford1991'], paragraph: 'choice',
  }];
}
