/**
 * Interpretive cautions, shown beside the conclusions they qualify. They say
 * what model support does and does not establish, so a reader of the report
 * (who may never run the tool) does not read more into a ranking than it
 * holds.
 */

/**
 * Cautions shown with every model-support conclusion: the points of the
 * README's "Reading the results: cautions", in short.
 */
export const supportCautions: readonly string[] = [
  'Model support is not mechanism: a good fit to a random walk says nothing by itself about drift versus selection (fluctuating selection, many small directional episodes and genetic drift all produce random-walk-like sequences), and stasis describes the net pattern, not constraint or stabilising selection as such.',
  'Support depends on sampling: short sequences, few specimens per horizon and large sampling error favour the simpler models; the absence of support for a trend is not evidence of no trend unless the design could have detected one.',
  'Time-averaging within horizons and errors in the age model change the apparent tempo and mode; rates are per the time unit of the input and inherit its uncertainty.',
  'Akaike weights are relative to the models fitted: they say which of these descriptions the data favour, not that any of them is true.',
  'These numbers are a tool for the specialist; the interpretation of the lineage\'s history rests with the paleontologist\'s judgement of the material, the sections and their dating.',
];

/** Caution shown with the estimates: what the interval method promises. */
export const intervalCaution =
  'Intervals are approximate: with few horizons, and especially when a variance estimate sits at 0, a nominal 95% interval can cover the true value less often than 95% of the time.';

/** Extra caution when the best-supported model is a directional walk. */
export const directionalCaution =
  'Support for directional change needs a trend that is large against both sampling error and random wandering; check the drift interval and, for a claim in print, the power and false-trend rate of this design.';

/** Extra caution when the best-supported model is a form of stasis. */
export const stasisCaution =
  'Support for stasis means the means did not wander or trend detectably at this resolution; it does not exclude change too small, too fast or too short-lived for this sampling to resolve.';

/** Caution shown when two or more models carry similar weight. */
export const closeSupportCaution =
  'Two or more models have similar support (ΔAICc below 2); the data do not discriminate between them, and the conclusion should say so.';

/** Caution for estimates at a bound or limit. */
export const boundCaution =
  'An estimate at a bound (a variance of 0) or at a limit (alpha at the end of its range) is the supremum of the likelihood, not an interior maximum; its interval is one-sided and the model may reduce to a simpler one.';
