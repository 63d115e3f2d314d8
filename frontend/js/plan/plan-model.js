// The plan as the form edits it: the plan JSON itself (the same object the batch command reads), with the
// rules the form needs to count specifications and to start new decisions and alternatives.

export const KINDS = Object.freeze(['outcome', 'predictor', 'controls', 'sample', 'errors', 'absorb', 'model']);

export const KIND_TITLES = Object.freeze({
  outcome: 'Outcome: which measure of the result',
  predictor: 'Key predictor: how the effect of interest is coded',
  controls: 'Controls: which covariates are held constant',
  sample: 'Rows: which observations are used',
  errors: 'Standard errors: how uncertainty is computed',
  absorb: 'Fixed effects: which groupings are absorbed',
  model: 'Model: which estimator each specification fits',
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
