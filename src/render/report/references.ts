/**
 * The published sources the report cites, and which method cites which.
 * Journal, volume and pages are as given in the project's model
 * specification and issues; titles of works not quoted in the model files
 * are given from memory and should be checked against the journal before a
 * paper goes out (the report says so in its reference list).
 */
import { findModel } from '../../models/registry.js';

/** One entry of the reference list. */
export interface Reference {
  /** Stable key used by the methods text. */
  readonly key: string;
  /** How the text cites it, e.g. "Hunt 2006". */
  readonly cite: string;
  /** The full entry. */
  readonly entry: string;
}

/** Every source the report can cite, keyed by `Reference.key`. */
export const referenceCatalogue: Readonly<Record<string, Reference>> = {
  hunt2006: {
    key: 'hunt2006',
    cite: 'Hunt 2006',
    entry: 'Hunt, G. (2006). Fitting and comparing models of phyletic evolution: random walks and beyond. Paleobiology 32:578–601.',
  },
  hunt2008: {
    key: 'hunt2008',
    cite: 'Hunt 2008',
    entry: 'Hunt, G. (2008). Gradual or pulsed evolution: when should punctuational explanations be preferred? Paleobiology 34:360–377.',
  },
  huntBellTravis2008: {
    key: 'huntBellTravis2008',
    cite: 'Hunt, Bell & Travis 2008',
    entry: 'Hunt, G., Bell, M. A. & Travis, M. P. (2008). Evolution toward a new adaptive optimum: phenotypic evolution in a fossil stickleback lineage. Evolution 62:700–710.',
  },
  huntHopkinsLidgard2015: {
    key: 'huntHopkinsLidgard2015',
    cite: 'Hunt, Hopkins & Lidgard 2015',
    entry: 'Hunt, G., Hopkins, M. J. & Lidgard, S. (2015). Simple versus complex models of trait evolution and stasis as a response to environmental change. Proceedings of the National Academy of Sciences USA 112:4885–4890.',
  },
  hurvichTsai1989: {
    key: 'hurvichTsai1989',
    cite: 'Hurvich & Tsai 1989',
    entry: 'Hurvich, C. M. & Tsai, C.-L. (1989). Regression and time series model selection in small samples. Biometrika 76:297–307.',
  },
  burnhamAnderson2002: {
    key: 'burnhamAnderson2002',
    cite: 'Burnham & Anderson 2002',
    entry: 'Burnham, K. P. & Anderson, D. R. (2002). Model Selection and Multimodel Inference: A Practical Information-Theoretic Approach, 2nd edition. Springer, New York.',
  },
  deJong1991: {
    key: 'deJong1991',
    cite: 'de Jong 1991',
    entry: 'de Jong, P. (1991). The diffuse Kalman filter. Annals of Statistics 19:1073–1083.',
  },
  kalman1960: {
    key: 'kalman1960',
    cite: 'Kalman 1960',
    entry: 'Kalman, R. E. (1960). A new approach to linear filtering and prediction problems. Journal of Basic Engineering 82:35–45.',
  },
  rauchTungStriebel1965: {
    key: 'rauchTungStriebel1965',
    cite: 'Rauch, Tung & Striebel 1965',
    entry: 'Rauch, H. E., Tung, F. & Striebel, C. T. (1965). Maximum likelihood estimates of linear dynamic systems. AIAA Journal 3:1445–1450.',
  },
  brent1973: {
    key: 'brent1973',
    cite: 'Brent 1973',
    entry: 'Brent, R. P. (1973). Algorithms for Minimization without Derivatives. Prentice-Hall, Englewood Cliffs, New Jersey.',
  },
  venzonMoolgavkar1988: {
    key: 'venzonMoolgavkar1988',
    cite: 'Venzon & Moolgavkar 1988',
    entry: 'Venzon, D. J. & Moolgavkar, S. H. (1988). A method for computing profile-likelihood-based confidence intervals. Applied Statistics 37:87–94.',
  },
  haldane1949: {
    key: 'haldane1949',
    cite: 'Haldane 1949',
    entry: 'Haldane, J. B. S. (1949). Suggestions as to quantitative measurement of rates of evolution. Evolution 3:51–56.',
  },
  gingerich1993: {
    key: 'gingerich1993',
    cite: 'Gingerich 1993',
    entry: 'Gingerich, P. D. (1993). Quantification and comparison of evolutionary rates. American Journal of Science 293-A:453–478.',
  },
  gingerich1983: {
    key: 'gingerich1983',
    cite: 'Gingerich 1983',
    entry: 'Gingerich, P. D. (1983). Rates of evolution: effects of time and temporal scaling. Science 222:159–161.',
  },
  hunt2012: {
    key: 'hunt2012',
    cite: 'Hunt 2012',
    entry: 'Hunt, G. (2012). Measuring rates of phenotypic evolution and the inseparability of tempo and mode. Paleobiology 38:351–373.',
  },
  lynch1990: {
    key: 'lynch1990',
    cite: 'Lynch 1990',
    entry: 'Lynch, M. (1990). The rate of morphological evolution in mammals from the standpoint of the neutral expectation. American Naturalist 136:727–741.',
  },
  vojeStarrfeltLiow2018: {
    key: 'vojeStarrfeltLiow2018',
    cite: 'Voje, Starrfelt & Liow 2018',
    entry: 'Voje, K. L., Starrfelt, J. & Liow, L. H. (2018). Model adequacy and microevolutionary explanations for stasis in the fossil record. American Naturalist 191:509–523.',
  },
  huntEtAl2010: {
    key: 'huntEtAl2010',
    cite: 'Hunt et al. 2010',
    entry: 'Hunt, G., Wicaksono, S. A., Brown, J. E. & Macleod, K. G. (2010). Climate-driven body-size trends in the ostracod fauna of the deep Indian Ocean. Palaeontology 53:1255–1268.',
  },
  bergerLiseoWolpert1999: {
    key: 'bergerLiseoWolpert1999',
    cite: 'Berger, Liseo & Wolpert 1999',
    entry: 'Berger, J. O., Liseo, B. & Wolpert, R. L. (1999). Integrated likelihood methods for eliminating nuisance parameters. Statistical Science 14:1–28.',
  },
  wilks1938: {
    key: 'wilks1938',
    cite: 'Wilks 1938',
    entry: 'Wilks, S. S. (1938). The large-sample distribution of the likelihood ratio for testing composite hypotheses. Annals of Mathematical Statistics 9:60–62.',
  },
  hansen1997: {
    key: 'hansen1997',
    cite: 'Hansen 1997',
    entry: 'Hansen, T. F. (1997). Stabilizing selection and the comparative analysis of adaptation. Evolution 51:1341–1351.',
  },
  hansenPienaarOrzack2008: {
    key: 'hansenPienaarOrzack2008',
    cite: 'Hansen, Pienaar & Orzack 2008',
    entry: 'Hansen, T. F., Pienaar, J. & Orzack, S. H. (2008). A comparative method for studying adaptation to a randomly evolving environment. Evolution 62:1965–1977.',
  },
  estesArnold2007: {
    key: 'estesArnold2007',
    cite: 'Estes & Arnold 2007',
    entry: 'Estes, S. & Arnold, S. J. (2007). Resolving the paradox of stasis: models with stabilizing selection explain evolutionary divergence on all timescales. American Naturalist 169:227–244.',
  },
  voje2023: {
    key: 'voje2023',
    cite: 'Voje 2023',
    entry: 'Voje, K. L. (2023). Fitting and evaluating univariate and multivariate models of within-lineage evolution. Paleobiology 49:747–764.',
  },
  efronTibshirani1993: {
    key: 'efronTibshirani1993',
    cite: 'Efron & Tibshirani 1993',
    entry: 'Efron, B. & Tibshirani, R. J. (1993). An Introduction to the Bootstrap. Chapman & Hall, New York.',
  },
  besagClifford1991: {
    key: 'besagClifford1991',
    cite: 'Besag & Clifford 1991',
    entry: 'Besag, J. & Clifford, P. (1991). Sequential Monte Carlo p-values. Biometrika 78:301–304.',
  },
  pattersonThompson1971: {
    key: 'pattersonThompson1971',
    cite: 'Patterson & Thompson 1971',
    entry: 'Patterson, H. D. & Thompson, R. (1971). Recovery of inter-block information when block sizes are unequal. Biometrika 58:545–554.',
  },
  davisonHinkley1997: {
    key: 'davisonHinkley1997',
    cite: 'Davison & Hinkley 1997',
    entry: 'Davison, A. C. & Hinkley, D. V. (1997). Bootstrap Methods and their Application. Cambridge University Press, Cambridge.',
  },
};

/**
 * The reference keys for a model id: the model's own `referenceKeys` (each
 * model file names the paper that introduced it in this form: stasis and
 * the two walks Hunt 2006; ou Hunt, Bell & Travis 2008; strict stasis
 * Hunt, Hopkins & Lidgard 2015, whose abstract names "a strict version of
 * stasis that entails no real evolutionary changes", checked against the
 * published abstract, issue 19; punctuated Hunt 2008; mode shifts Hunt,
 * Hopkins & Lidgard 2015; covariate tracking Hunt et al. 2010); a model
 * without them cites the `citation` of its model file, under the key
 * `model:<id>` (see {@link findReference}); an unknown id Hunt 2006.
 *
 * @example
 * modelReferenceKeys('ou'); // ['huntBellTravis2008']
 * modelReferenceKeys('stasis-then-random-walk'); // ['huntHopkinsLidgard2015']
 */
export function modelReferenceKeys(id: string): readonly string[] {
  const model = findModel(id);
  if (!model) return ['hunt2006'];
  return model.referenceKeys ?? [`model:${id}`];
}

/**
 * A reference by key: from the catalogue, or for `model:<id>` built from the
 * model file's citation ("Authors (year). Title. Journal vol:pages."), cited
 * by first author and year.
 *
 * @throws TypeError for a key that is neither
 *
 * @example
 * findReference('hunt2006').cite; // 'Hunt 2006'
 */
export function findReference(key: string): Reference {
  const known = referenceCatalogue[key];
  if (known) return known;
  const model = key.startsWith('model:') ? findModel(key.slice('model:'.length)) : undefined;
  if (!model) throw new TypeError(`no reference "${key}"`);
  const entry = model.citation.replace(/^After\s+/, '');
  const match = entry.match(/^([^,(]+)[^(]*\((\d{4})\)/);
  const several = (entry.split('(')[0].match(/&|,.*,/) ?? null) !== null;
  const cite = match ? `${match[1].trim()}${several ? ' et al.' : ''} ${match[2]}` : model.label;
  return { key, cite, entry };
}

/**
 * Citation keys in the order they first appear, without repeats.
 *
 * @example
 * uniqueKeys(['hunt2006', 'burnhamAnderson2002', 'hunt2006']); // ['hunt2006', 'burnhamAnderson2002']
 */
export function uniqueKeys(keys: readonly string[]): string[] {
  return [...new Set(keys)];
}
