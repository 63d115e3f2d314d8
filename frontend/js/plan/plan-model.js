// The plan as the form edits it: the plan JSON itself (the same object the batch command reads), with the
// rules the form needs to count specifications and to start new decisions and alternatives.

export const KINDS = Object.freeze(['outcome', 'predictor', 'controls', 'sample', 'errors', 'absorb', 'model',
  'weights']);

export const KIND_TITLES = Object.freeze({
  outcome: 'Outcome: which measure of the result',
  predictor: 'Key predictor: how the effect of interest is coded',
  controls: 'Controls: which covariates are held constant',
  sample: 'Rows: which observations are used',
  errors: 'Standard errors: how uncertainty is computed',
  absorb: 'Fixed effects: which groupings are absorbed',
  model: 'Model: which estimator each specification fits',
  weights: 'Weights: whether rows count by a weight column',
});

/** What a weight column does, shown beside each weighted alternative (README, "Plan file", weights). */
export const WEIGHTS_HELP = Object.freeze({
  text: 'Analytic weights: weighted least squares, or prior weights in logit, probit and Poisson, as R\u2019s '
    + 'lm(weights = w) and glm(weights = w) use them. A row of weight 0 takes no part (N counts the rows with '
    + 'positive weight), a missing weight drops the row, a negative one is refused.',
  source: 'weighted least squares and prior weights as in McCullagh & Nelder 1989, Generalized Linear Models, '
    + '2nd ed., section 2.5',
});

export const TRANSFORMS = Object.freeze(['none', 'log', 'log1p', 'sqrt', 'standardize', 'winsorize']);
export const ERROR_TYPES = Object.freeze(['classical', 'HC0', 'HC1', 'HC2', 'HC3', 'cluster']);

/** The models of a model decision, as plans spell them, each with what it is for. */
export const MODELS = Object.freeze([
  { value: 'ols', text: 'ols: least squares', note: 'Least squares, for any numeric outcome; on a 0/1 outcome it is '
    + 'the linear probability model.' },
  { value: 'logit', text: 'logit: logistic regression', note: 'For an outcome coded 0/1; the coefficient is in '
    + 'log-odds.' },
  { value: 'probit', text: 'probit: probit regression', note: 'For an outcome coded 0/1; the coefficient is on the '
    + 'scale of a standard normal quantile.' },
  { value: 'poisson', text: 'poisson: Poisson regression', note: 'For counts or other non-negative outcomes; the '
    + 'coefficient is on the log scale of the expected outcome.' },
]);

/**
 * What each technical choice means, in a line, with its source: shown beside the choice in the form. The
 * sources are the ones the engine cites where it computes the choice (fit/KeyCoefficientSandwich,
 * infer/ResampleDesign).
 */
export const ERROR_HELP = Object.freeze({
  classical: { text: 'The textbook least-squares formula: assumes every row\u2019s error has the same variance and '
    + 'is independent of the others.', source: 'the usual least-squares variance (common practice)' },
  HC0: { text: 'Robust to errors whose variance differs from row to row (heteroskedasticity), without a '
    + 'small-sample correction.', source: 'White 1980, Econometrica 48(4)' },
  HC1: { text: 'HC0 times N/(N \u2212 K), a degrees-of-freedom correction; the robust errors most software reports '
    + 'by default.', source: 'MacKinnon & White 1985, Journal of Econometrics 29(3)' },
  HC2: { text: 'Each row\u2019s squared residual divided by 1 \u2212 h, its leverage; unbiased when the variance is '
    + 'in fact constant.', source: 'MacKinnon & White 1985, Journal of Econometrics 29(3)' },
  HC3: { text: 'Each squared residual divided by (1 \u2212 h)\u00b2, which weighs high-leverage rows more; the '
    + 'safer choice in small samples.',
  source: 'MacKinnon & White 1985, Journal of Econometrics 29(3); Long & Ervin 2000, The American Statistician 54(3)' },
  cluster: { text: 'Cluster-robust (CR1): errors may be correlated within each group of the chosen column, with '
    + 'the correction G/(G \u2212 1) (N \u2212 1)/(N \u2212 K); with few clusters its p-values are too small.',
  source: 'Cameron, Gelbach & Miller 2008, Review of Economics and Statistics 90(3); Cameron & Miller 2015, '
    + 'Journal of Human Resources 50(2)' },
});

export const NULL_METHOD_HELP = Object.freeze({
  bootstrap: { text: 'Each draw resamples the rows (or whole clusters) with replacement from data in which the key '
    + 'effect has been removed, and refits every specification.',
  source: 'Efron 1979, Annals of Statistics 7(1); whole clusters: Cameron, Gelbach & Miller 2008, Review of '
    + 'Economics and Statistics 90(3)' },
  permute: { text: 'Each draw shuffles the key predictor between rows, which breaks any link with the outcome, and '
    + 'refits every specification: right when the predictor was assigned at random; single rows only.',
  source: 'the randomization test of Fisher 1935, The Design of Experiments, Oliver & Boyd' },
});

export const MISSING_HELP = Object.freeze({
  'per-specification': { text: 'Each specification drops only the rows missing one of its own variables, as '
    + 'fitting it alone would; specifications may then differ in their rows as well as in their choices.',
  source: 'listwise deletion per model (common practice)' },
  common: { text: 'Every specification uses the same rows, those complete on every variable the plan names, so '
    + 'that specifications differ only in their choices, at the cost of the rows dropped.',
  source: 'listwise deletion over the whole plan (common practice)' },
});

/** The line beside an absorb alternative: what absorbing one or several columns computes, and its source. */
export const ABSORB_HELP = 'The same coefficients, standard errors and R-squared as entering every level as a '
  + 'dummy; two or more columns are crossed effects (as pupil and term), demeaned by alternating projections '
  + '(Gaure 2013, Computational Statistics & Data Analysis 66), for least squares and, inside each scoring step, '
  + 'for logit, probit and Poisson (Correia, Guimar\u00e3es & Zylkin 2020, Stata Journal 20(1); there without null '
  + 'draws); beside two, HC2 and HC3 '
  + 'take each row\u2019s exact leverage (Frisch\u2013Waugh\u2013Lovell; Davidson & MacKinnon 2004, Econometric '
  + 'Theory and Methods, 2.4 and 2.6) while the column with fewer levels has at most 2,000; beside three or more, '
  + 'K counts the dummies by their exact rank (computed modulo a prime and certified by exact null vectors) while '
  + 'the columns other than the one with most levels have at most 2,000 levels together, and HC2 and HC3 take '
  + 'the exact leverages too.';

/** Alternatives of one decision, as the engine counts them (every subset of the optional controls). */
export function alternativeCount(d) {
  if (d.kind === 'controls') {
    if (d.combine === 'sets') return BigInt(Object.keys(d.sets || {}).length);
    return 1n << BigInt((d.optional || []).length);
  }
  return BigInt(Array.isArray(d.alternatives) ? d.alternatives.length : 0);
}

/** Specifications of the plan: the product of every decision's alternatives (exact, as a BigInt). */
export function specificationCount(plan) {
  let n = 1n;
  for (const d of plan.decisions || []) n *= alternativeCount(d);
  return n;
}

export function newDecision(kind, plan) {
  const names = new Set((plan.decisions || []).map((d) => d.name));
  let name = kind === 'sample' ? 'rows' : kind === 'absorb' ? 'fixed effects' : kind;
  for (let i = 2; names.has(name); i++) name = `${kind} ${i}`;
  switch (kind) {
    case 'controls':
      return { name, kind, required: [], optional: [] };
    case 'sample':
      return { name, kind, alternatives: [{ label: 'all rows' }] };
    case 'errors':
      return { name, kind, alternatives: ['classical'] };
    case 'absorb':
      return { name, kind, alternatives: [{ label: 'none', columns: [] }] };
    case 'model':
      return { name, kind, alternatives: ['ols'] };
    case 'weights':
      return { name, kind, alternatives: [{ label: 'unweighted' }, { label: '', column: '' }] };
    default:
      return { name, kind, alternatives: [{ label: '', column: '' }] };
  }
}

/** A new alternative of a decision: for a model decision, the first model it does not list yet. */
export function newAlternative(kind, decision = null) {
  switch (kind) {
    case 'model': {
      const listed = new Set((decision && decision.alternatives) || []);
      const next = MODELS.find((m) => !listed.has(m.value));
      return next ? next.value : 'ols';
    }
    case 'sample':
      return { label: '', keep: '' };
    case 'errors':
      return 'HC1';
    case 'absorb':
      return { label: '', columns: [] };
    default:
      return { label: '', column: '' };
  }
}

/** The transform spelling split for the form: {name, fraction}. */
export function parseTransform(text) {
  const t = (text || 'none').trim().toLowerCase();
  if (t.startsWith('winsorize:')) return { name: 'winsorize', fraction: t.slice('winsorize:'.length) };
  return { name: t || 'none', fraction: '' };
}

/** The JSON path of the field a problem names, shortened one step (the enclosing field). */
export function parentPath(path) {
  const m = path.match(/^(.*?)(\[\d+\]|\.[^.[\]]+)$/);
  return m ? m[1] : '';
}

const ORDINALS = ['first', 'second', 'third', 'fourth', 'fifth', 'sixth', 'seventh', 'eighth', 'ninth', 'tenth'];

const SETTING_NAMES = Object.freeze({
  title: 'the title', description: 'the description', data: 'the data file', confidence: 'the confidence level',
  missing: 'rows with missing cells', sample: 'the random sample', seed: 'the seed',
  maxSpecifications: 'the largest number of specifications', nullDraws: 'the null draws',
  nullMethod: 'the null-draw method', nullCluster: 'what the bootstrap resamples',
  reported: 'the reported specification',
});

const ALTERNATIVE_PARTS = Object.freeze({
  label: 'the label', column: 'the column', transform: 'the transform', keep: 'the rule', cluster: 'the clusters',
  'trim.column': 'the trim column', 'trim.z': 'the largest |z| kept', trim: 'the trim', columns: 'the fixed-effect column',
});

/**
 * A JSON path of the plan in words: {place, part}, as in {place: 'Decision 2 (predictor), first alternative',
 * part: 'the label'} for decisions[1].alternatives[0].label.
 */
export function describePath(path, plan) {
  if (!path) return { place: 'The plan', part: '' };
  if (path === 'decisions') return { place: 'The decisions', part: '' };
  const reported = path.match(/^reported\.(.+)$/);
  if (reported) return { place: 'The reported specification', part: `the decision "${reported[1]}"` };
  const top = path.match(/^([A-Za-z]+)$/);
  if (top) return { place: 'Settings', part: SETTING_NAMES[top[1]] || `the key "${top[1]}"` };
  const m = path.match(/^decisions\[(\d+)\](.*)$/);
  if (!m) return { place: 'The plan', part: path };
  const i = Number(m[1]);
  const d = (plan.decisions || [])[i] || {};
  const places = [`Decision ${i + 1}${d.name ? ` (${d.name})` : ''}`];
  let rest = m[2];
  const alt = rest.match(/^\.alternatives\[(\d+)\](.*)$/);
  if (alt) {
    const j = Number(alt[1]);
    places.push(`${ORDINALS[j] || `alternative ${j + 1}`}${ORDINALS[j] ? ' alternative' : ''}`);
    const absorbed = alt[2].match(/^\.columns(?:\[(\d+)\])?$/);
    if (absorbed) {
      const k = absorbed[1] === undefined ? null : Number(absorbed[1]);
      return { place: places.join(', '), part: k === null ? 'the fixed-effect columns'
        : `the ${ORDINALS[k] || `number ${k + 1}`} fixed-effect column` };
    }
    rest = alt[2].replace(/^\./, '').replace(/\[\d+\]$/, '');
    return { place: places.join(', '), part: rest ? ALTERNATIVE_PARTS[rest] || `the key "${rest}"` : '' };
  }
  if (rest === '.alternatives') return { place: places[0], part: 'its alternatives' };
  if (rest === '.name') return { place: places[0], part: 'the decision name' };
  if (rest === '.kind') return { place: places[0], part: 'the kind' };
  const list = rest.match(/^\.(required|optional)(?:\[(\d+)\])?$/);
  if (list) {
    const k = list[2] === undefined ? null : Number(list[2]);
    return { place: places[0], part: `${k === null ? 'the' : `the ${ORDINALS[k] || `number ${k + 1}`}`} ${list[1]} control${k === null ? 's' : ''}` };
  }
  const set = rest.match(/^\.sets(?:\.(.*?))?(?:\[(\d+)\])?$/);
  if (set) return { place: places[0], part: set[1] ? `the set "${set[1]}"` : 'the sets' };
  if (rest === '.combine') return { place: places[0], part: 'how the controls combine' };
  return { place: places[0], part: rest ? `the key "${rest.replace(/^\./, '')}"` : '' };
}

/** A problem of the plan in words, as in "Decision 2 (predictor), first alternative: the label is empty". */
export function problemInWords(where, message, plan) {
  const { place, part } = describePath(where, plan);
  const startsWithVerb = /^(is|are|must|has|needs|should|unknown key)\b/.test(message);
  if (part && startsWithVerb) return `${place}: ${part} ${message}`;
  if (part) return `${place}, ${part}: ${message}`;
  return `${place}: ${message}`;
}
