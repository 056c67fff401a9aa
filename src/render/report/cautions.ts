/**
 * Interpretive cautions, shown beside the conclusions they qualify. They say
 * what model support does and does not establish, so a reader of the report
 * (who may never run the tool) does not read more into a ranking than it
 * holds.
 */

/** Cautions shown with every model-support conclusion. */
export const supportCautions: readonly string[] = [
  'Akaike weights rank the fitted models against each other only; the best-supported model may still describe the data poorly, and a model that was not fitted cannot win.',
  'Model support depends on the sampling: few horizons, small samples, time-averaging within horizons and the age model (spacing of the horizons) all change which model is favoured. Treat a weight as a statement about this data set, not about the lineage.',
  'A good fit to a random walk says nothing by itself about drift versus selection: an unbiased random walk is also what fluctuating or shifting selection produces at this time scale.',
  'Directional change in one section may reflect immigration, ecophenotypic response or a change of environment rather than evolution in place; the specialist\'s knowledge of the section and the organisms comes first.',
];

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
