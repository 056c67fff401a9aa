import { acceleratingWalk } from './accelerating-walk.js';
import { covariateStasis } from './covariate-stasis.js';
import { covariateWalk } from './covariate-walk.js';
import type { EvolutionModel } from './model.js';
import { modeShiftModels } from './mode-shift.js';
import { movingOptimum } from './moving-optimum.js';
import { optimumShift } from './optimum-shift.js';
import { punctuatedOne, punctuatedTwo } from './punctuated.js';
import { punctuatedOneSeparate, punctuatedTwoSeparate } from './punctuated-separate.js';

/**
 * The models beyond the classic five, in the order tables list them:
 * punctuated (1 and 2 shifts, shared or separate variances), the six mode
 * shifts, covariate tracking (stasis and walk variants), and the models
 * whose adaptive landscape changes (issue 16).
 */
export const extensionModels: readonly EvolutionModel[] = [
  punctuatedOne,
  punctuatedOneSeparate,
  punctuatedTwo,
  punctuatedTwoSeparate,
  ...modeShiftModels,
  covariateStasis,
  covariateWalk,
  acceleratingWalk,
  movingOptimum,
  optimumShift,
];
