// The explorer page: scale, filter panel, summary cards, curve and choice grid, influence, full fits, exports.
// Estimates of different units never share an axis: as fitted, one comparable group (an outcome alternative
// with a key-predictor alternative and, with a model decision, a model) is shown at a time; the average
// marginal effects one outcome and coding at a time, every model together; the other scales are unit-free.
import { Chart, drawMark } from '../chart-setup.js';
import { getJson, ApiError } from '../api.js';
import { SIGNIFICANCE, PALETTE, append, clear, debounce, download, el, num, withAlpha } from '../helpers.js';
import { PLAIN_SHAPE, colourKey } from './colour-by.js';
import { count, drawClaim, drawTally, number, pValue, share } from '../numbers.js';
import { curveConfig } from './curve-config.js';
import { showSet, redraw } from './curve-actions.js';
import { gridRows } from './grid-data.js';
import { gridConfig } from './grid-config.js';
import { showGrid, sizeGrid } from './grid-actions.js';
import { positionAt } from './highlight.js';
import { filterWords, withText } from './figure-caption.js';
import { influenceConfig } from './influence-config.js';
import { reportedSentence } from './reported-mark.js';
import { showInfluence } from './influence-actions.js';

const root = document.getElementById('explorer');
const analysis = root.dataset.analysis;
const run = root.dataset.run;
const api = `/api/analyses/${encodeURIComponent(analysis)}/runs/${encodeURIComponent(run)}`;

const state = { layout: null, view: null, shaped: null, grid: null, marks: null, influence: null, highlight: null,
  colourKey: null, reported: null };
const influenceState = { influence: null };
const dropped = new Set();
let sort = 'estimate';
let scale = 'fitted';
let group = null;
let colourBy = null;
let inFlight = null;
let detailsFor = null;

const setCount = document.getElementById('set-count');

function query(extra = {}) {
  const params = new URLSearchParams({ drop: [...dropped].join(','), sort, scale,
    ...(!scaleInfo().unitFree && group !== null ? { group } : {}), ...extra });
  return params.toString();
}

function scaleInfo() {
  return state.layout.scales.find((s) => s.id === scale);
}

/** The chosen scale in words: its title and, on a scale with units and several groups, the group shown. */
function scaleName() {
  const info = scaleInfo();
  if (info.unitFree) return info.title;
  const g = info.groups[state.view ? state.view.group : group];
  return info.unitsDiffer ? `${info.title}, ${g.title}` : info.title;
}

function confidenceLabel() {
  return `${Math.round(state.layout.confidence * 100)}%`;
}

// ---- charts

let curveChart;
let gridChart;
let influenceChart;

function onHover(event, _elements, chart) {
  if (!state.view || state.view.curve.count === 0) return;
  const p = positionAt(chart, event, state.view.curve.count);
  if (p === null) hideTip();
  else placeTip(chart.canvas, event.x, event.y);
  if (p !== state.highlight) {
    state.highlight = p;
    redraw(curveChart, gridChart);
    if (p !== null) tipFor(p);
  }
  chart.canvas.style.cursor = p === null ? 'default' : 'pointer';
}

function onClick(event, _elements, chart) {
  if (!state.view || state.view.curve.count === 0) return;
  const p = positionAt(chart, event, state.view.curve.count);
  if (p !== null) {
    details(p);
    openFit(p);
  }
}

function makeCharts() {
  const layout = state.layout;
  curveChart = new Chart(document.getElementById('curve-canvas'), curveConfig(state, '', onHover, onClick));
  state.grid = gridRows(layout);
  sizeGrid(document.getElementById('grid-box'), state.grid.rows);
  gridChart = new Chart(document.getElementById('grid-canvas'), gridConfig(state, onHover, onClick));
  influenceChart = new Chart(document.getElementById('influence-canvas'),
    influenceConfig(influenceState, ''));
  for (const canvas of [curveChart.canvas, gridChart.canvas]) {
    canvas.addEventListener('mouseleave', () => {
      state.highlight = null;
      hideTip();
      redraw(curveChart, gridChart);
    });
  }
}

// ---- the set

async function refresh() {
  if (inFlight) inFlight.abort();
  const controller = new AbortController();
  inFlight = controller;
  const width = Math.max(50, Math.round(curveChart.chartArea.right - curveChart.chartArea.left));
  let view;
  try {
    view = await getJson(`${api}/curve?${query({ width })}`, controller.signal);
  } catch (e) {
    if (e.name === 'AbortError') return;
    setCount.textContent = `The set could not be computed: ${e.message}`;
    return;
  }
  inFlight = null;
  state.view = view;
  state.highlight = null;
  detailsFor = null;
  atCache.clear();
  hideTip();
  noDetails();
  const ordered = orderWords();
  const interval = scaleInfo().interval;
  const { band, reason } = nullBand(view);
  state.nullBand = band;
  legend();
  nullOverlay(view, reason);
  curveInference(view);
  showSet(curveChart, state, `Specifications, ${ordered}`, view.unit, interval);
  showGrid(gridChart, state);
  showInfluence(influenceChart, document.querySelector('.influence-box'), influenceState, view.influence, view.unit);
  scaleNote(view);
  setCount.textContent = `Showing ${count(view.summary.count)} of ${count(view.total)} specifications`
    + (view.leftOut > 0 ? ` (${count(view.leftOut)} more have no value on this scale)` : '')
    + (view.summary.count === 0 ? ': no specification is left; tick an alternative again.' : '');
  summaryCards(view.summary);
  filterCounts(view);
  influenceTable(view.influence);
  caption(view);
  placeReported(view);
  history.replaceState(null, '', `?${query(colourBy === null ? {} : { colour: colourBy })}`);
}

/**
 * The plan's reported specification: its position in the set shown, asked of the server as for any named
 * specification, marked in both panels, and the sentence of where it sits in the run (from summary.json).
 */
async function placeReported(view) {
  const reported = state.layout.summary.reported;
  const note = document.getElementById('reported-note');
  state.reported = null;
  note.hidden = !reported;
  if (!reported) return;
  let position = -1;
  if (reported.in_run && reported.scales) {
    try {
      position = (await getJson(`${api}/specifications/${reported.spec}/position?${query()}`)).position;
    } catch (e) {
      note.textContent = `Where the reported specification sits could not be found: ${e.message}`;
      return;
    }
  }
  if (state.view !== view) return;
  state.reported = position >= 0 ? position : null;
  redraw(curveChart, gridChart);
  note.textContent = reportedSentence(reported, scale, position, scaleInfo().title);
}

/**
 * The null draws of the curve shown, from summary.json's by_scale: as fitted, its comparable group's (one
 * outcome, key-predictor coding and model: one set of units); on the t and partial-correlation scales, those of
 * every specification on that scale. Null when the run has no draws on this curve (or predates by_scale).
 */
function shownCurve(view) {
  const by = state.layout.summary.by_scale;
  if (!by || typeof by !== 'object') return null;
  if (scale === 'fitted') {
    const g = (by.groups || []).find((e) => e.group === view.group);
    if (!g) return null;
    const model = g.model ? `, ${g.model}` : '';
    return { title: `the comparable group ${g.outcome} on ${g.predictor}${model}`, null: g.null || null, best: g.best };
  }
  const entry = { t: by.t_statistic, partial: by.partial_correlation }[scale];
  return entry ? { title: `the ${scaleName()} of every specification with one`, null: entry.null || null, best: null }
    : null;
}

/**
 * The null band under the curve: at each kept rank of the shown curve, where the middle 95% (2.5% to 97.5%) of
 * the null draws' sorted estimates at that rank lie. It belongs to the whole curve of a group or scale, so it is
 * drawn only when the set shown is that whole curve, ordered by estimate; otherwise `reason` says why not.
 */
function nullBand(view) {
  const curve = shownCurve(view);
  const env = curve && curve.null ? curve.null.envelope : null;
  if (!env || !Array.isArray(env.ranks)) {
    const stored = state.layout.summary.by_scale && typeof state.layout.summary.by_scale === 'object';
    return { band: null, reason: !stored ? 'the run was made before the band was kept rank by rank; run it again to see it'
      : scale === 'fitted' || scale === 't' || scale === 'partial' ? 'no draws on this curve'
        : `the null draws re-estimate coefficients and standard errors only, not the ${scaleName()}` };
  }
  if (sort !== 'estimate') return { band: null, reason: 'the curve is grouped by a decision, not ordered by estimate alone' };
  if (view.summary.count !== env.specifications) {
    return { band: null, reason: `the filter shows ${count(view.summary.count)} of the curve's `
      + `${count(env.specifications)} specifications, and the band is of the whole curve` };
  }
  const ranks = [];
  const low = [];
  const high = [];
  env.ranks.forEach((r, k) => {
    if (Number.isFinite(num(env.low[k])) && Number.isFinite(num(env.high[k]))) {
      ranks.push(r);
      low.push(num(env.low[k]));
      high.push(num(env.high[k]));
    }
  });
  if (ranks.length === 0) return { band: null, reason: 'no draw could fit this curve' };
  return { band: { ranks, low, high, min: Math.min(...low), max: Math.max(...high), draws: curve.null.draws },
    reason: null };
}

const TESTS = [['median', 'median estimate'], ['share_significant', 'share significant'],
  ['stouffer', 'mean z (Stouffer)']];

/** Above the curve: what the band is, and the three joint tests of the curve shown beside it. */
function nullOverlay(view, reason) {
  const box = clear(document.getElementById('null-overlay'));
  const nul = state.layout.summary.null;
  box.hidden = !(nul && typeof nul === 'object');
  if (box.hidden) return;
  const curve = shownCurve(view);
  const own = curve && curve.null;
  const tests = own ? own.tests : (!state.layout.unitsDiffer && nul.tests) || {};
  const results = TESTS.filter(([k]) => tests[k])
    .map(([k, label]) => el('li', { id: `null-test-${k}` }, `${label}: ${drawClaim(tests[k].exceedances, tests[k].draws)}`));
  const band = state.nullBand;
  const on = own ? `on ${curve.title}` : 'on the whole run';
  append(box,
    el('p', { id: 'null-band-note' }, band
      ? `Shaded under the curve: the null band of the run's ${count(band.draws)} null draws, at each position of the `
        + 'sorted curve the middle 95% (2.5% to 97.5%) of the draws’ sorted estimates at that position, '
        + `${on}; joint tests ${on}:`
      : `The run has ${count(nul.draws)} null draws; no band is drawn because ${reason}. `
        + (results.length ? `Joint tests ${on}:` : 'Their tests pool estimates in different units here, so none is shown; '
          + 'choose a comparable group as fitted, or the t or partial-correlation scale.')),
    el('ul', {}, results));
}

function factorName(id) {
  const f = state.layout.factors[id];
  return f.control ? `${f.name} in or out` : f.name;
}

function scaleNote(view) {
  const info = scaleInfo();
  let text = `Shown on the scale ${scaleName()}: the vertical axis is ${view.unit}. `;
  const groups = info.groups.filter((g) => g.fitted > 0).length;
  if (scale === 'fitted') {
    if (info.unitsDiffer) {
      text += `Estimates as fitted come in ${count(groups)} sets of units (the plan has several outcome alternatives, `
        + `key-predictor codings${state.layout.modelFactor >= 0 ? ' or models: a logit coefficient is in log-odds, a '
          + 'least-squares one in the outcome itself' : ''}); only one comparable group is shown. `
        + (state.layout.modelFactor >= 0 ? 'Choose another group, the average marginal effect (every model in the '
          + 'units of the outcome), or a unit-free scale to see more specifications together.'
          : 'Choose another group, or a unit-free scale to see every specification together.');
    } else {
      text += 'Every specification has the same outcome and key-predictor coding, so their estimates share these units.';
    }
  } else if (scale === 'effect') {
    text += 'Each specification\u2019s average marginal effect of the key predictor, in units of the outcome itself, so '
      + 'that least-squares, logit, probit and Poisson fits of one outcome share the axis (for least squares it is the '
      + 'coefficient). Each interval is the effect \u00b1 the critical value times its delta-method standard error; the '
      + 'marks\u2019 significance is the key coefficient\u2019s own test. '
      + (info.unitsDiffer ? `The plan codes its outcome or key predictor in several ways, so the effects come in ${
        count(groups)} sets of units; only one group is shown.` : '');
  } else if (!info.interval) {
    text += 'The t statistic has no interval: it is itself the test, and a specification is significant where |t| '
      + 'exceeds its critical value; no extreme bounds either.'
      + (state.layout.modelFactor >= 0 ? ' For logit, probit and Poisson fits it is a z statistic.' : '');
  } else if (scale === 'partial') {
    text += 'Each interval is the interval of the estimate mapped through t / \u221a(t\u00b2 + df), so it excludes zero '
      + 'exactly when the estimate\u2019s interval does.';
  } else {
    text += 'Each interval is the interval of the estimate times the specification\u2019s sd(predictor) / sd(outcome).';
  }
  if (view.leftOut > 0) {
    text += ` ${count(view.leftOut)} specification${view.leftOut === 1 ? '' : 's'} of the set fit a logit, probit or `
      + 'Poisson model, for which this scale is not defined (it needs least squares\u2019 residual degrees of freedom '
      + 'and standard deviations): they are left out of the curve, the cards and the influence panel, not shown as 0. '
      + 'The t statistic and the average marginal effect show every specification.';
  }
  document.getElementById('scale-note').textContent = text;
}

function summaryCards(s) {
  const box = clear(document.getElementById('summary-cards'));
  const alpha = number(1 - state.layout.confidence, 2);
  const bounds = scaleInfo().interval
    ? `${number(s.lowestBound)} to ${number(s.highestBound)}` : '\u2013';
  const card = (label, value, detail, id) => el('div', { class: 'summary-card', id },
    el('p', { class: 'label' }, label), el('p', { class: 'value' }, value), el('p', { class: 'detail' }, detail));
  append(box,
    card('Specifications', count(s.count), `of ${count(state.view.total)} fitted`, 'card-count'),
    card(`Median, ${scaleName()}`, number(s.median), `interquartile range ${number(s.lowerQuartile)} to ${number(s.upperQuartile)}`,
      'card-median'),
    card(`Extreme bounds, ${scaleName()}`, bounds, scaleInfo().interval
      ? 'lowest and highest interval bound in the set' : 'no intervals on this scale', 'card-bounds'),
    card('Significant, positive', share(s.shareSignificantPositive), `p < ${alpha}, estimate above 0`, 'card-positive'),
    card('Significant, negative', share(s.shareSignificantNegative), `p < ${alpha}, estimate below 0`, 'card-negative'),
    card('Positive estimate', share(s.sharePositive), `range ${number(s.min)} to ${number(s.max)}`, 'card-sign'));
}

function colouredBy() {
  const key = state.colourKey;
  return key.factor === null ? '' : `, coloured by its ${key.title} (see the legend)`;
}

function caption(view) {
  const c = document.getElementById('figure-caption');
  const n = view.curve.count;
  const interval = scaleInfo().interval;
  const on = `Scale: ${scaleName()} (${view.unit}). `;
  if (view.curve.mode === 'points') {
    c.textContent = `${on}Each of the ${count(n)} specifications is one mark: its key estimate`
      + (interval ? ` with its ${confidenceLabel()} confidence interval (vertical bar)` : '')
      + ', filled when significant and hollow when not'
      + (interval ? ' (the bar heavy or light likewise)' : '')
      + (colouredBy()) + '; the solid line is zero and the dashed line the median of the set. Below, '
      + 'a tick in a row means the specification uses that alternative or control.';
  } else {
    const per = Math.round(n / view.curve.bins.from.length);
    c.textContent = `${on}${count(n)} specifications, about ${count(per)} per pixel column: the dark band spans their `
      + (interval ? `estimates, the pale band their ${confidenceLabel()} intervals, ` : 'estimates, ')
      + 'the line is the median estimate (solid where most are significant, dashed where most are not'
      + (state.colourKey.factor === null ? ')' : `; coloured by the ${state.colourKey.title} most of them use)`)
      + '. Below, the shade of a row is the share of the column\u2019s specifications that use the alternative.';
  }
}

// ---- hover details and full fits

function noDetails() {
  const box = clear(document.getElementById('spec-details'));
  box.append(el('p', { class: 'hint' }, 'No specification is selected. Point at one in the curve or the grid.'));
}

// the specification at each position of the set shown, as the server answered (cleared with every new set)
const atCache = new Map();

async function specificationAt(position) {
  if (!atCache.has(position)) atCache.set(position, getJson(`${api}/at?${query({ position })}`));
  try {
    return await atCache.get(position);
  } catch (e) {
    atCache.delete(position);
    throw e;
  }
}

/** Fills the details panel below the grid (on a click, a key, or a link to a specification). */
async function details(position) {
  if (detailsFor === position) return;
  detailsFor = position;
  try {
    const s = await specificationAt(position);
    if (detailsFor === position) showDetails(s);
  } catch (e) {
    showProblem(clear(document.getElementById('spec-details')), e);
  }
}

// ---- the tooltip that follows the pointer

const tip = document.getElementById('curve-tip');

/** Puts the tooltip beside a point of a canvas (canvas pixels), inside the figure, on the side with room. */
function placeTip(canvas, x, y) {
  const figure = document.getElementById('figure').getBoundingClientRect();
  const box = canvas.getBoundingClientRect();
  tip.hidden = false;
  const gap = 14;
  let left = box.left - figure.left + x + gap;
  if (left + tip.offsetWidth > figure.width - 4) left = box.left - figure.left + x - gap - tip.offsetWidth;
  let top = box.top - figure.top + y + gap;
  if (top + tip.offsetHeight > figure.height - 4) top = box.top - figure.top + y - gap - tip.offsetHeight;
  tip.style.left = `${Math.max(4, left)}px`;
  tip.style.top = `${Math.max(4, top)}px`;
}

function hideTip() {
  tip.hidden = true;
}

const tipFor = debounce(async (position) => {
  try {
    const s = await specificationAt(position);
    if (state.highlight !== position) return;
    clear(tip);
    append(tip,
      el('p', {}, el('strong', {}, `Specification ${s.spec}`), `, position ${count(s.position + 1)} of `
        + `${count(state.view.curve.count)}`),
      el('p', { class: 'tip-choices' }, s.choices.map((c) => `${c.decision}: ${c.label}`).join('; ')),
      el('p', { id: 'tip-numbers' }, tipNumbers(s)));
  } catch (e) {
    clear(tip).append(el('p', { class: 'problem' }, e.message));
  }
}, 30);

/** The pointed specification's value on the scale shown, its interval and p. */
function tipNumbers(s) {
  const value = { fitted: [s.estimate, s.ciLow, s.ciHigh], effect: [s.effect, s.effectLow, s.effectHigh],
    standardized: [s.standardized, s.standardizedLow, s.standardizedHigh],
    partial: [s.partialCorrelation, s.partialLow, s.partialHigh], t: [s.statistic, null, null] }[scale];
  const [v, lo, hi] = value;
  return `${scaleInfo().title} ${number(v, 4)}`
    + (lo === null ? '' : `, ${confidenceLabel()} interval ${number(lo, 4)} to ${number(hi, 4)}`)
    + `, p ${pValue(s.pValue)}, N ${count(s.nObs)}` + (state.layout.modelFactor >= 0 ? `, ${s.model}` : '');
}

function showDetails(s) {
  const box = clear(document.getElementById('spec-details'));
  const open = el('button', { type: 'button', class: 'small', id: 'open-fit' }, 'Open the full fit');
  open.addEventListener('click', () => openFit(s.position));
  append(box,
    el('p', { class: 'pair' }, el('strong', {}, `Specification ${s.spec}`),
      ` (position ${count(s.position + 1)} of ${count(state.view.curve.count)}) `, open),
    el('dl', {}, s.choices.map((c) => el('div', {}, el('dt', {}, `${c.decision}:`), el('dd', {}, c.label)))),
    el('p', { class: 'pair', id: 'spec-numbers' },
      `Estimate ${number(s.estimate, 4)}, ${confidenceLabel()} interval ${number(s.ciLow, 4)} to ${number(s.ciHigh, 4)}, `
      + `SE ${number(s.stdError, 3)}, p ${pValue(s.pValue)}, N ${count(s.nObs)}, `
      + `${s.model === 'ols' ? 'R\u00b2' : 'McFadden R\u00b2'} ${number(s.r2, 3)}`
      + (state.layout.modelFactor >= 0 ? `; model ${s.model}` : '')
      + (s.status !== 'ok' ? `; ${s.status}` : '')),
    el('p', { class: 'pair', id: 'spec-scales' },
      (state.layout.modelFactor >= 0 ? `Average marginal effect ${number(s.effect, 4)} (${number(s.effectLow, 4)} to `
        + `${number(s.effectHigh, 4)}), ` : '')
      + (s.model === 'ols'
        ? `standardized ${number(s.standardized, 4)} (${number(s.standardizedLow, 4)} to ${number(s.standardizedHigh, 4)}), `
        + `partial correlation ${number(s.partialCorrelation, 4)} (${number(s.partialLow, 4)} to ${number(s.partialHigh, 4)}), `
        + `t ${number(s.statistic, 4)} on ${number(s.df, 6)} df`
        : `standardized and partial correlation not defined for ${s.model}, z ${number(s.statistic, 4)} (standard normal)`)));
}

async function openFit(position) {
  await openFitOf(async () => (await specificationAt(position)).spec, null);
}

/** Opens the full fit of a specification; `specOf` finds its number, `note` is said above the table. */
async function openFitOf(specOf, note) {
  const dialog = document.getElementById('fit-dialog');
  const body = clear(document.getElementById('fit-body'));
  const title = document.getElementById('fit-title');
  title.textContent = 'Specification';
  append(body, el('p', {}, 'Fitting...'));
  if (!dialog.open) dialog.showModal();
  try {
    const view = await getJson(`${api}/specifications/${await specOf()}/fit`);
    title.textContent = `Specification ${view.spec}: every coefficient`;
    fitBody(clear(body), view);
    if (note) body.prepend(el('p', { class: 'notice', id: 'fit-note' }, note));
  } catch (e) {
    showProblem(clear(body), e);
  }
  document.getElementById('fit-close').focus();
}

/**
 * Selects a specification named on the page (the smallest p, an end of the extreme bounds): highlighted in
 * the curve and the grid with its details when the set shown holds it, and its full fit opened either way.
 */
async function selectSpecification(spec) {
  let position = -1;
  try {
    position = (await getJson(`${api}/specifications/${spec}/position?${query()}`)).position;
  } catch (e) {
    showProblem(clear(document.getElementById('spec-details')), e);
  }
  if (position >= 0) {
    state.highlight = position;
    redraw(curveChart, gridChart);
    details(position);
    await openFit(position);
  } else {
    await openFitOf(async () => spec, `Specification ${spec} is not among the specifications shown (the filter or `
      + 'the comparable group leaves it out), so it is not marked in the curve.');
  }
}

/** A link-like button that selects and opens a specification. */
function specLink(spec, id) {
  const b = el('button', { type: 'button', class: 'link spec-link', id, 'data-spec': spec }, `specification ${spec}`);
  b.addEventListener('click', () => selectSpecification(spec));
  return b;
}

function fitBody(body, view) {
  const f = view.fit;
  const glm = view.model !== 'ols';
  append(body, el('p', {}, view.choices.map((c) => `${c.decision} = ${c.label}`).join('; ')));
  if (f.status !== 'ok') {
    append(body, el('p', { class: 'problem' }, `No fit: ${f.status}`));
    return;
  }
  const level = `${Math.round(view.confidence * 100)}%`;
  const head = el('tr', {}, ['Term', 'Estimate', 'Std. error', glm ? 'z' : 't', 'p', `${level} low`, `${level} high`]
    .map((h) => el('th', { scope: 'col' }, h)));
  const rows = f.coefficients.map((c) => el('tr', { class: c.role === 'key' ? 'key-row' : null },
    el('th', { scope: 'row' }, c.role === 'key' ? `${c.term} (key predictor)` : c.term),
    ...[number(c.estimate, 5), number(c.stdError, 4), number(c.statistic, 3), pValue(c.pValue), number(c.ciLow, 4),
      number(c.ciHigh, 4)].map((v) => el('td', { class: 'num' }, v))));
  const against = f.absorbed ? 'the fixed effects alone' : 'the intercept alone';
  const facts = glm ? [
    el('p', { id: 'fit-model' }, `Model: ${view.modelTitle} (${view.model}), fitted by maximum likelihood; coefficients on `
      + `the ${view.model === 'logit' ? 'log-odds' : view.model === 'probit' ? 'probit (normal quantile)' : 'log'} scale, `
      + 'z statistics, p-values and intervals on the standard normal reference (no degrees of freedom)'),
    el('p', {}, `Standard errors: ${f.errors}`),
    el('p', {}, `N = ${count(f.nObs)}, K = ${count(f.nParams)}`),
    el('p', {}, `McFadden R\u00b2 = ${number(f.r2, 4)}`),
    el('p', {}, `Likelihood-ratio test against ${against}: p ${pValue(f.modelPValue)}`),
    el('p', {}, `Residual deviance = ${number(view.deviance, 6)}`),
  ] : [
    el('p', {}, `Standard errors: ${f.errors}`),
    el('p', {}, `N = ${count(f.nObs)}, K = ${count(f.nParams)}, df = ${number(f.df, 6)}`),
    el('p', {}, `R\u00b2 = ${number(f.r2, 4)}, adjusted R\u00b2 = ${number(f.adjustedR2, 4)}`),
    el('p', {}, `Model F = ${number(f.modelF, 4)}, p ${pValue(f.modelPValue)}`),
  ];
  if (glm || state.layout.modelFactor >= 0) {
    facts.push(el('p', { id: 'fit-effect' }, `Average marginal effect of the key predictor: ${number(view.effect, 5)} `
      + `(SE ${number(view.effectStdError, 4)}; ${level} interval ${number(view.effectLow, 4)} to `
      + `${number(view.effectHigh, 4)})${glm ? ', in units of the outcome itself' : ', the coefficient itself for least squares'}`));
  }
  append(body,
    el('div', { class: 'table-scroll' }, el('table', { class: 'fit-table', id: 'fit-table' },
      el('caption', { class: 'visually-hidden' }, 'Coefficients'), el('thead', {}, head), el('tbody', {}, rows))),
    el('div', { class: 'fit-facts', id: 'fit-facts' }, ...facts,
      f.absorbed ? el('p', {}, `Fixed effects of ${f.absorbed} ${glm ? 'entered as one coefficient per level'
        : 'absorbed'} (${count(f.absorbedLevels)} ${f.absorbedDimensions > 2
        ? 'in K: the exact rank of their dummies' : f.absorbedDimensions > 1
          ? 'in K: the levels less one per connected group of levels' : 'levels'})`) : null,
      f.clusters > 0 ? el('p', {}, `${count(f.clusters)} clusters`) : null,
      f.note ? el('p', {}, f.note) : null));
}

function showProblem(box, e) {
  append(box, el('p', { class: 'problem' }, e instanceof ApiError && e.where ? `${e.where}: ${e.message}` : e.message));
}

// ---- keyboard

function keyboard(event) {
  if (!state.view || state.view.curve.count === 0) return;
  const n = state.view.curve.count;
  const step = event.shiftKey ? 10 : 1;
  let p = state.highlight === null ? -1 : state.highlight;
  if (event.key === 'ArrowRight') p = Math.min(n - 1, p + step);
  else if (event.key === 'ArrowLeft') p = Math.max(0, (p < 0 ? n : p) - step);
  else if (event.key === 'Home') p = 0;
  else if (event.key === 'End') p = n - 1;
  else if (event.key === 'Enter' && p >= 0) {
    openFit(p);
    event.preventDefault();
    return;
  } else if (event.key === 'Escape') p = null;
  else return;
  event.preventDefault();
  state.highlight = p;
  redraw(curveChart, gridChart);
  if (p === null) {
    hideTip();
    return;
  }
  details(p);
  const area = curveChart.chartArea;
  placeTip(curveChart.canvas, curveChart.scales.x.getPixelForValue(p), area.top + 10);
  tipFor(p);
}

// ---- panels built once from the layout

function filterPanel(layout) {
  const list = clear(document.getElementById('filter-list'));
  const byDecision = new Map();
  for (const f of layout.factors) {
    if (!byDecision.has(f.decision)) byDecision.set(f.decision, []);
    byDecision.get(f.decision).push(f);
  }
  for (const [decision, factors] of byDecision) {
    const set = el('fieldset', {}, el('legend', {}, decision));
    const required = layout.required[decision];
    if (required) append(set, el('p', { class: 'required' }, `In every specification: ${required.join(', ')}`));
    for (const f of factors) {
      if (f.control) {
        const row = el('div', { class: 'control-row' }, el('span', { class: 'name' }, f.name));
        [1, 0].forEach((level) => row.append(checkbox(f, level, level === 1 ? 'with' : 'without')));
        set.append(row);
      } else {
        f.levels.forEach((label, level) => set.append(checkbox(f, level, label)));
      }
    }
    list.append(set);
  }
  document.getElementById('reset-filters').addEventListener('click', () => {
    dropped.clear();
    list.querySelectorAll('input[type=checkbox]').forEach((c) => { c.checked = true; });
    refresh();
  });
}

function checkbox(factor, level, label) {
  const id = `f${factor.id}-l${level}`;
  const key = `${factor.id}.${level}`;
  const box = el('input', { type: 'checkbox', id, 'data-level': key });
  box.checked = !dropped.has(key);
  box.addEventListener('change', () => {
    if (box.checked) dropped.delete(key);
    else dropped.add(key);
    refresh();
  });
  return el('label', { for: id }, box, el('span', {}, label),
    el('span', { class: 'count', 'data-count': key }, count(factor.counts[level])));
}

/** Each alternative's count: how many of the specifications shown use it (the run's own count beside). */
function filterCounts(view) {
  for (const f of state.layout.factors) {
    f.levels.forEach((_, level) => {
      const span = document.querySelector(`[data-count="${f.id}.${level}"]`);
      if (!span) return;
      span.textContent = count(view.counts[f.id][level]);
      span.title = `${count(view.counts[f.id][level])} of the ${count(view.summary.count)} specifications shown use it;`
        + ` ${count(f.counts[level])} of the run's ${count(state.layout.fitted)}`;
    });
  }
}

function sortSelect(layout) {
  const select = document.getElementById('sort');
  select.append(el('option', { value: 'estimate' }, 'by estimate'));
  for (const f of layout.factors) {
    select.append(el('option', { value: `factor:${f.id}` },
      f.control ? `grouped by ${f.name} (in or out)` : `grouped by ${f.name}`));
  }
  select.value = sort;
  select.addEventListener('change', () => {
    sort = select.value;
    refresh();
  });
}

function scaleSelect(layout) {
  const select = document.getElementById('scale');
  for (const s of layout.scales) {
    const words = s.unitFree ? s.title + (s.leftOut > 0 ? ' (least squares only)' : '')
      : s.unitsDiffer ? `${s.title}, one ${s.id === 'fitted' ? 'comparable ' : ''}group at a time` : s.title;
    select.append(el('option', { value: s.id }, words));
  }
  const groups = document.getElementById('group');
  select.value = scale;
  select.addEventListener('change', () => {
    scale = select.value;
    group = scaleInfo().unitFree ? null : scaleInfo().defaultGroup;
    scaleControls();
    refresh();
  });
  groups.addEventListener('change', () => {
    group = Number(groups.value);
    refresh();
  });
  scaleControls();
}

/**
 * On a scale with units and several groups: the group selector shows the scale's groups, and the group fixes
 * the outcome and coding filters (and, as fitted, the model's).
 */
function scaleControls() {
  const layout = state.layout;
  const info = scaleInfo();
  const oneGroup = !info.unitFree && info.unitsDiffer;
  const groups = clear(document.getElementById('group'));
  for (const g of info.groups) {
    groups.append(el('option', { value: String(g.id), disabled: g.fitted === 0 }, `${g.title} (${count(g.fitted)})`));
  }
  if (oneGroup) groups.value = String(group);
  groups.hidden = !oneGroup;
  document.getElementById('group-label').hidden = !oneGroup;
  const fixed = [layout.outcomeFactor, layout.predictorFactor];
  for (const f of layout.factors) {
    const byGroup = oneGroup && (fixed.includes(f.id) || (scale === 'fitted' && f.id === layout.modelFactor));
    document.querySelectorAll(`input[id^="f${f.id}-l"]`).forEach((box) => {
      if (!fixed.includes(f.id) && f.id !== layout.modelFactor) return;
      box.disabled = byGroup;
      box.title = byGroup ? 'fixed by the comparable group shown' : '';
    });
  }
}

/**
 * What the figure's marks mean, for the page's legend and the exported figure alike: fill and interval
 * weight for significance, then (when coloured by a decision) each alternative's colour and shape.
 */
function legendEntries() {
  const alpha = number(1 - state.layout.confidence, 2);
  const interval = scaleInfo().interval;
  const key = state.colourKey;
  const entries = SIGNIFICANCE.map((s) => ({
    kind: 'significance', shape: PLAIN_SHAPE, filled: s.filled, colour: PALETTE.curve, bar: interval ? s : null,
    text: `${s.label} (p ${s.filled ? '<' : '\u2265'} ${alpha})${interval ? (s.filled ? ', heavy interval' : ', light interval') : ''}`,
  }));
  if (state.nullBand) {
    entries.push({ kind: 'band', text: 'null band: middle 95% of the null draws at each position' });
  }
  if (key.factor !== null) {
    entries.push({ kind: 'title', text: `Colour: ${key.title}` });
    for (const e of key.entries) {
      entries.push({ kind: 'alternative', shape: e.shape, filled: true, colour: e.colour, bar: null, text: e.label });
    }
  }
  return entries;
}

/** Draws a legend entry's mark (and its interval bar) centred at x, y, of radius r. */
function legendMark(ctx, entry, x, y, r) {
  if (entry.kind === 'band') {
    ctx.fillStyle = PALETTE.nullBand;
    ctx.fillRect(x - r * 1.6, y - r, r * 3.2, r * 2);
    ctx.strokeStyle = PALETTE.nullLine;
    ctx.lineWidth = Math.max(1, r / 5);
    ctx.strokeRect(x - r * 1.6, y - r, r * 3.2, r * 2);
    return;
  }
  if (entry.bar) {
    ctx.strokeStyle = withAlpha(entry.colour, entry.bar.intervalAlpha);
    ctx.lineWidth = entry.bar.intervalWidth * r / 4;
    ctx.beginPath();
    ctx.moveTo(x, y - r * 1.9);
    ctx.lineTo(x, y + r * 1.9);
    ctx.stroke();
  }
  drawMark(ctx, entry.shape, entry.filled, entry.colour, x, y, r);
}

function legend() {
  const list = clear(document.getElementById('legend'));
  for (const entry of legendEntries()) {
    if (entry.kind === 'title') {
      list.append(el('li', { class: 'legend-title' }, entry.text));
      continue;
    }
    const canvas = el('canvas', { width: 28, height: 28, 'aria-hidden': 'true' });
    canvas.style.width = '14px';
    canvas.style.height = '14px';
    legendMark(canvas.getContext('2d'), entry, 14, 14, 7);
    list.append(el('li', { class: entry.kind === 'alternative' ? 'legend-alternative' : entry.kind === 'band' ? 'legend-band' : null },
      canvas, entry.text));
  }
}

function colourSelect(layout) {
  const select = document.getElementById('colour-by');
  select.append(el('option', { value: '' }, 'nothing (one ink)'));
  for (const f of layout.factors) {
    select.append(el('option', { value: String(f.id) }, f.control ? `${f.name} (in or out)` : f.name));
  }
  select.value = colourBy === null ? '' : String(colourBy);
  select.addEventListener('change', () => {
    colourBy = select.value === '' ? null : Number(select.value);
    recolour();
    history.replaceState(null, '', `?${query(colourBy === null ? {} : { colour: colourBy })}`);
  });
}

/** A new colour key: the same set drawn again, no request. */
function recolour() {
  state.colourKey = colourKey(state.layout, colourBy);
  legend();
  if (!state.view) return;
  showSet(curveChart, state, curveChart.options.scales.x.title.text, state.view.unit, scaleInfo().interval);
  gridChart.draw();
  caption(state.view);
}

function card(label, value, detail) {
  return el('div', { class: 'summary-card' }, el('p', { class: 'label' }, label), el('p', { class: 'value' }, value),
    el('p', { class: 'detail' }, detail));
}

/**
 * The cards of the run's inference for the curve shown: its joint tests and its smallest p beside the p adjusted
 * for choosing it (Westfall & Young 1993), per comparable group as fitted and per unit-free scale from
 * summary.json's by_scale; the whole run's when that has one set of units (or on the unit-free scales, for the
 * smallest p, since p-values have no unit). Runs stored before by_scale: the whole run's, when it has one group.
 */
function curveInference(view) {
  const summary = state.layout.summary;
  const box = clear(document.getElementById('curve-inference-cards'));
  const curve = shownCurve(view);
  const nul = summary.null;
  const whole = !state.layout.unitsDiffer;
  // runs stored before the tallies were written: each p is exceedances over the draws that were not empty
  const compared = nul && typeof nul === 'object' ? num(nul.draws) - (num(nul.empty_draws) || 0) : NaN;
  const tally = (t, p) => t ?? (Number.isFinite(num(p)) && compared > 0
    ? { exceedances: Math.round(num(p) * compared), draws: compared } : null);
  const own = curve && curve.null;
  const on = own ? ` (${curve.title})` : '';
  if (nul && typeof nul === 'object' && (own || whole)) {
    const unit = nul.resampled === 'clusters' ? `, clusters of ${nul.cluster}`
      : nul.resampled === 'rows' ? ', single rows' : '';
    const draws = `${count(nul.draws)} null draws (${nul.method}${unit})`;
    const tests = own ? own.tests : nul.tests && typeof nul.tests === 'object' ? nul.tests : {};
    for (const [key, label] of TESTS) {
      const t = own ? tests[key] : tally(tests[key], nul[`p_${key}`]);
      if (t) box.append(card(`Joint test: ${label}`, drawClaim(t.exceedances, t.draws),
        `${drawTally(t.exceedances, t.draws)}; ${draws}${on}`));
    }
  }
  const best = curve && curve.best ? curve.best : (whole || scaleInfo().unitFree) ? summary.best : null;
  if (best && typeof best === 'object') {
    const where = curve && curve.best ? ` in ${curve.title}` : ' in the run';
    box.append(card(`Smallest p${where}`, `p ${pValue(best.p_nominal)}`,
      [specLink(best.spec, 'best-spec-link'), ', as reported alone']));
    const t = tally(best.adjusted_test, best.p_adjusted);
    box.append(card('The same, adjusted for choosing it', t ? drawClaim(t.exceedances, t.draws) : '\u2013',
      // summary.json's own words name the plan key and the option; on the page, the field that sets it
      t ? `share of null draws whose smallest p${where} is as small: ${drawTally(t.exceedances, t.draws)}`
        : 'none: ask for null draws ("Null draws for joint inference" on the plan page) to adjust it'));
  }
  if (box.childElementCount > 0) document.getElementById('whole-run').hidden = false;
}

function wholeRun(summary) {
  const known = new Set(['specifications', 'fitted', 'failed', 'median_estimate', 'share_positive',
    'share_significant_positive', 'share_significant_negative', 'confidence', 'specifications_in_plan', 'sampled',
    'sample_seed', 'data_rows', 'refit_by_qr', 'seconds', 'median_mixes_units', 'scales']);
  const box = clear(document.getElementById('whole-run-cards'));
  const nul = summary.null;
  const warning = document.getElementById('null-draw-warning');
  warning.textContent = nul && typeof nul.warning === 'string' ? nul.warning : '';
  warning.hidden = warning.textContent === '';
  const bounds = summary.interval_bounds;
  // the run's bounds are over every estimate as fitted: shown only when those share their units
  if (bounds && typeof bounds === 'object' && !state.layout.unitsDiffer) {
    box.append(card('Extreme bounds', `${number(bounds.lower)} to ${number(bounds.upper)}`,
      [bounds.same_sign ? 'lowest and highest interval bounds share a sign' : 'the bounds differ in sign',
        ...(bounds.lower_spec ? ['; lowest in ', specLink(bounds.lower_spec, 'lower-bound-link')] : []),
        ...(bounds.upper_spec ? [', highest in ', specLink(bounds.upper_spec, 'upper-bound-link')] : [])]));
  }
  const shown = new Set(['null', 'best', 'interval_bounds', 'influence', 'influence_overall', 'by_scale']);
  const more = el('details', { class: 'more-sections', id: 'more-sections' },
    el('summary', {}, 'Further sections of summary.json'));
  if (nul && typeof nul === 'object') more.append(...nullTables(nul));
  if (summary.by_scale && typeof summary.by_scale === 'object') more.append(byScaleTable(summary.by_scale));
  for (const [key, value] of Object.entries(summary)) {
    if (known.has(key) || shown.has(key) || value === null || typeof value !== 'object' || Array.isArray(value)) continue;
    if (key === 'comparable_groups' && Array.isArray(value.groups)) {
      more.append(...groupTables(value));
      continue;
    }
    more.append(keyValueTable(SECTION_TITLES[key] || words(key), value));
  }
  if (more.childElementCount > 1) document.getElementById('whole-run-cards').after(more);
  document.getElementById('whole-run').hidden = box.childElementCount === 0 && more.childElementCount <= 1;
}

const SECTION_TITLES = { overfitting: 'Overfitting checks', provenance: 'How the run was made',
  comparable_groups: 'Comparable groups' };
const KEY_WORDS = {
  min_rows_per_coefficient: 'fewest rows per coefficient', rows_per_coefficient_floor: 'rows per coefficient asked for',
  few_rows: 'specifications with fewer rows per coefficient', r2_not_above_null_expectation:
    'specifications whose R\u00b2 is not above what noise gives', model_p_not_significant:
    'specifications whose model test is not significant', plan_sha256: 'plan (SHA-256)', data_sha256: 'data (SHA-256)',
  n_obs: 'rows used', file: 'file',
};

function words(key) {
  return KEY_WORDS[key] || key.replaceAll('_', ' ');
}

function cell(v) {
  if (typeof v === 'number') return number(v, 4);
  if (v === null || v === undefined) return '\u2013';
  if (typeof v === 'object') return Object.entries(v).map(([k, x]) => `${words(k)}: ${cell(x)}`).join('; ');
  return String(v);
}

/** A section of plain values as a two-column table (nested values written out in words). */
function keyValueTable(title, section) {
  const rows = Object.entries(section).map(([k, v]) => el('tr', {}, el('th', { scope: 'row' }, words(k)),
    el('td', {}, cell(v))));
  return el('table', { class: 'sections-table' }, el('caption', {}, title), el('tbody', {}, rows));
}

function table(id, title, headers, rows) {
  return el('div', { class: 'table-scroll' }, el('table', { class: 'sections-table', id }, el('caption', {}, title),
    el('thead', {}, el('tr', {}, headers.map((h) => el('th', { scope: 'col' }, h)))), el('tbody', {}, rows)));
}

/** The observed curve's statistics against the middle of the null draws'. */
function nullTables(nul) {
  const observed = nul.observed || {};
  const q = nul.null_quantiles || {};
  const stats = [['median_estimate', 'median estimate', observed.median_estimate],
    ['share_significant', `share significant in the dominant sign (${observed.dominant_sign || '\u2013'})`,
      observed.share_significant], ['mean_z', 'mean z (Stouffer)', observed.mean_z]];
  const rows = stats.map(([key, label, value]) => {
    const quantiles = q[key] || {};
    const format = key === 'share_significant' ? share : (v) => number(v, 4);
    return el('tr', {}, el('th', { scope: 'row' }, label), ...[value, quantiles['2.5'], quantiles['50'],
      quantiles['97.5']].map((v) => el('td', { class: 'num' }, Number.isFinite(num(v)) ? format(num(v)) : '\u2013')));
  });
  const facts = keyValueTable('The null draws', {
    draws: nul.draws, method: nul.method, resampled: nul.resampled === 'clusters' ? `clusters of ${nul.cluster}`
      : nul.resampled, seed: nul.seed, specifications: nul.specifications, failed_fits: nul.failed_fits,
    empty_draws: nul.empty_draws, seconds: nul.seconds, file: nul.file,
  });
  facts.id = 'null-facts';
  const pooled = nul.median_mixes_units ? ' (the median over every estimate as fitted, which pools different units: '
    + 'see the table per comparable group below)' : '';
  return [table('null-quantiles', `Observed curve against the null draws, whole run${pooled}`, ['Statistic', 'observed',
    'null 2.5%', 'null median', 'null 97.5%'], rows), facts];
}

/**
 * summary.json's by_scale as one table: per comparable group as fitted and per unit-free scale, the specifications,
 * the three joint tests on that curve alone, its smallest p with the adjusted p, and its decisions' main effects.
 */
function byScaleTable(by) {
  const rows = [];
  const tests = (n) => TESTS.map(([k]) => el('td', {}, n && n.tests && n.tests[k]
    ? drawClaim(n.tests[k].exceedances, n.tests[k].draws) : '\u2013'));
  const mainEffects = (e) => el('td', { class: 'num' }, share(num(e.influence_overall?.main_effects_share)));
  for (const g of by.groups || []) {
    const adjusted = g.best?.adjusted_test;
    rows.push(el('tr', {}, el('th', { scope: 'row' }, `${g.outcome} on ${g.predictor}${g.model ? `, ${g.model}` : ''}`),
      el('td', { class: 'num' }, count(g.specifications)), ...tests(g.null),
      el('td', {}, g.best ? [specLink(g.best.spec, `group-smallest-p-${g.group}`), ` (p ${pValue(g.best.p_nominal)}`
        + (adjusted ? `; adjusted ${drawClaim(adjusted.exceedances, adjusted.draws)})` : ')')] : '\u2013'),
      mainEffects(g)));
  }
  for (const [key, title] of [['standardized', 'standardized coefficient'], ['partial_correlation',
    'partial correlation'], ['t_statistic', 't statistic']]) {
    const e = by[key];
    if (!e) continue;
    rows.push(el('tr', {}, el('th', { scope: 'row' }, `${title}, every specification with one`),
      el('td', { class: 'num' }, count(e.specifications)), ...tests(e.null), el('td', {}, '\u2013'), mainEffects(e)));
  }
  return table('by-scale', 'Per comparable group and unit-free scale: the null draws\u2019 joint tests, the smallest p '
    + 'and the share of the variance the decisions explain', ['Curve', 'specifications', 'median test',
    'share-significant test', 'Stouffer test', 'smallest p', 'decisions\u2019 main effects'], rows);
}

/** Per comparable group: information-criterion weights, P(coefficient <= 0) and inclusion probabilities. */
function groupTables(section) {
  const groups = section.groups;
  const withModel = groups.some((g) => g.model && g.model !== 'ols');
  const name = (g) => `${g.outcome} on ${g.predictor}${withModel ? `, ${g.model}` : ''}`
    + (g.rows && Object.keys(g.rows).length ? ` (${Object.entries(g.rows).map(([d, l]) => `${d} ${l}`).join(', ')})` : '');
  const weights = groups.map((g, i) => el('tr', {}, el('th', { scope: 'row' }, name(g)),
    el('td', { class: 'num' }, count(g.specifications)), el('td', { class: 'num' }, count(g.n_obs)),
    el('td', { class: 'num' }, number(g.bic?.weighted_estimate, 4)),
    el('td', { class: 'num' }, number(g.bic?.weighted_std_error, 4)),
    el('td', {}, g.bic?.best_spec ? specLink(g.bic.best_spec, `group-best-${i}`) : '\u2013',
      g.bic?.best_spec ? ` (weight ${share(g.bic.best_weight)})` : ''),
    ...['normal', 'non_normal', 'normal_unweighted', 'non_normal_unweighted']
      .map((k) => el('td', { class: 'num' }, number(g.cdf_at_zero?.[k], 3)))));
  const out = [el('p', { class: 'hint' }, section.note || ''),
    table('group-weights', 'Comparable groups: weighted by the BIC, and P(coefficient \u2264 0)',
      ['Group', 'Specifications', 'Rows', 'BIC-weighted estimate', 'its std. error', 'Heaviest specification',
        'CDF(0), normal', 'CDF(0), non-normal', 'CDF(0), normal, unweighted', 'CDF(0), non-normal, unweighted'],
      weights)];
  const controls = [...new Set(groups.flatMap((g) => Object.keys(g.bic?.inclusion || {})))];
  if (controls.length > 0) {
    out.push(table('group-inclusion', 'Posterior inclusion probability of each control (BIC weights), by group',
      ['Control', ...groups.map(name)], controls.map((c) => el('tr', {}, el('th', { scope: 'row' }, c),
        ...groups.map((g) => el('td', { class: 'num' }, c in (g.bic?.inclusion || {})
          ? share(g.bic.inclusion[c]) : 'in all or none'))))));
  }
  return out;
}

function influenceTable(influence) {
  document.getElementById('influence-sentence').textContent = influence.sentence;
  const box = clear(document.getElementById('influence-table'));
  if (influence.factors.length === 0) return;
  const head = el('tr', {}, ['Decision or control', 'Share of the variance', 'Median estimate by alternative',
    `Significant in the dominant sign (${influence.dominantSign}) by alternative`]
    .map((h) => el('th', { scope: 'col' }, h)));
  const rows = influence.factors.map((f) => {
    const variance = num(f.varianceShare);
    const bar = el('span', { class: 'share-bar', 'aria-hidden': 'true' });
    bar.style.width = `${Math.max(0, Math.min(1, Number.isFinite(variance) ? variance : 0)) * 80}px`;
    return el('tr', {},
      el('th', { scope: 'row' }, f.name === f.decision ? f.name : `${f.name} (${f.decision})`),
      el('td', { class: 'num' }, bar, share(variance)),
      el('td', {}, f.levels.map((l) => el('div', {}, `${l.label}: ${number(l.median)} (${number(l.lowerQuartile)} to `
        + `${number(l.upperQuartile)}), ${count(l.count)}`))),
      el('td', {}, f.levels.map((l) => el('div', {}, `${l.label}: ${share(l.shareSignificant)}`))));
  });
  rows.push(el('tr', {}, el('th', { scope: 'row' }, 'Interactions (the rest)'),
    el('td', { class: 'num' }, share(influence.interactions)), el('td', {}), el('td', {})));
  box.append(el('table', { class: 'influence-table', id: 'influence-factors' },
    el('caption', { class: 'visually-hidden' }, 'Influence of each decision'), el('thead', {}, head),
    el('tbody', {}, rows)));
}

function unfitted(layout) {
  if (layout.unfitted === 0) return;
  const list = clear(document.getElementById('unfitted-list'));
  for (const r of layout.unfittedReasons) list.append(el('li', {}, `${count(r.count)}: ${r.reason}`));
  document.getElementById('unfitted').hidden = false;
}

function orderWords() {
  return sort === 'estimate' ? 'ordered by estimate'
    : `grouped by ${factorName(Number(sort.slice('factor:'.length)))}, by estimate within each group`;
}


// ---- Figure for print: the server draws the current view (filter, order, scale, group, colouring) as
// SVG, PDF or PNG with the same painter as the batch command's report; the link is set when followed.
function exportForPrint(event) {
  const extra = { format: document.getElementById('print-format').value,
    size: document.getElementById('print-size').value, ...(colourBy === null ? {} : { colour: colourBy }) };
  event.currentTarget.href = `${api}/figure?${query(extra)}`;
}

// ---- PNG export: both panels, stacked as on screen, on paper, under a caption that says what they show

function exportPng() {
  const top = curveChart.canvas;
  const bottom = gridChart.canvas;
  const ratio = top.width / top.clientWidth;
  const width = Math.max(top.width, bottom.width);
  const font = `${Math.round(12 * ratio)}px ${getComputedStyle(document.documentElement).fontFamily}`;
  const line = 20 * ratio;
  const margin = Math.round(16 * ratio);
  // the legend as on the page, laid out in lines across the figure's width, then the scale's line
  const measure = document.createElement('canvas').getContext('2d');
  measure.font = font;
  const placed = [];
  let x = margin;
  let row = 0;
  for (const entry of legendEntries()) {
    const w = measure.measureText(entry.text).width + (entry.kind === 'title' ? 18 : 34) * ratio;
    if (x > margin && x + w > width - margin) {
      x = margin;
      row++;
    }
    placed.push({ entry, x, row });
    x += w;
  }
  // the caption: what is shown (filter, order, scale) and where it comes from, each broken at spaces
  const caption = [
    `Showing ${count(state.view.summary.count)} of ${count(state.view.total)} specifications; filter: `
      + `${filterWords(state.layout, dropped)}`,
    `Order: ${orderWords()}`,
    `Scale: ${scaleName()}; vertical axis: ${state.view.unit}` + (scaleInfo().interval
      ? `; bars: ${confidenceLabel()} confidence intervals` : '; no interval on this scale'),
    `Run ${run} of the analysis "${root.dataset.title}"; Forkscape ${root.dataset.version}`,
  ];
  const captionLines = [];
  for (const text of caption) {
    const lines = [''];
    for (const word of text.split(' ')) {
      const last = lines[lines.length - 1];
      const longer = last ? `${last} ${word}` : word;
      if (last && measure.measureText(longer).width > width - 2 * margin) lines.push(word);
      else lines[lines.length - 1] = longer;
    }
    captionLines.push(...lines);
  }
  // the title on a line of its own above the legend
  row += 1;
  for (const p of placed) p.row += 1;
  const band = Math.round((row + 1 + captionLines.length) * line + 8 * ratio);
  const canvas = document.createElement('canvas');
  canvas.width = width;
  canvas.height = band + top.height + bottom.height;
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = PALETTE.paper;
  ctx.fillRect(0, 0, canvas.width, canvas.height);
  ctx.font = font;
  ctx.textBaseline = 'middle';
  for (const { entry, x: at, row: r } of placed) {
    const y = line * (r + 0.5) + 4 * ratio;
    if (entry.kind === 'title') {
      ctx.fillStyle = PALETTE.ink;
      ctx.fillText(entry.text, at, y);
      continue;
    }
    legendMark(ctx, entry, at + 5 * ratio, y, 4.5 * ratio);
    ctx.fillStyle = PALETTE.ink;
    ctx.fillText(entry.text, at + 14 * ratio, y);
  }
  ctx.fillStyle = PALETTE.ink;
  ctx.font = `bold ${font}`;
  ctx.fillText(root.dataset.title, margin, line * 0.5 + 4 * ratio);
  ctx.font = font;
  captionLines.forEach((text, k) => ctx.fillText(text, margin, line * (row + 1.5 + k) + 4 * ratio));
  ctx.drawImage(top, 0, band);
  ctx.drawImage(bottom, 0, band + top.height);
  canvas.toBlob(async (blob) => download(await withText(blob, {
    Title: root.dataset.title, Description: caption.join('\n'), Software: `Forkscape ${root.dataset.version}`,
  }), `${root.dataset.download}-curve.png`), 'image/png');
}

// ---- start

async function start() {
  const params = new URLSearchParams(location.search);
  if (params.get('sort')) sort = params.get('sort');
  if (params.get('scale')) scale = params.get('scale');
  if (params.get('group')) group = Number(params.get('group'));
  if (params.get('colour')) colourBy = Number(params.get('colour'));
  (params.get('drop') || '').split(',').filter(Boolean).forEach((d) => dropped.add(d));
  let layout;
  try {
    layout = await getJson(`${api}/layout`);
  } catch (e) {
    setCount.textContent = `The run could not be opened: ${e.message}`;
    return;
  }
  state.layout = layout;
  if (!params.get('scale') || !layout.scales.some((s) => s.id === scale)) scale = layout.defaultScale;
  if (group === null && !scaleInfo().unitFree) group = scaleInfo().defaultGroup;
  document.getElementById('run-meta').textContent = `${count(layout.fitted)} specifications fitted`
    + (layout.sampled ? ` (a seeded random sample of the plan's ${count(layout.inPlan)})` : '')
    + (layout.unfitted > 0 ? `, ${count(layout.unfitted)} without an estimate` : '') + '.';
  filterPanel(layout);
  scaleSelect(layout);
  sortSelect(layout);
  if (colourBy !== null && !layout.factors[colourBy]) colourBy = null;
  state.colourKey = colourKey(layout, colourBy);
  colourSelect(layout);
  wholeRun(layout.summary);
  unfitted(layout);
  makeCharts();
  noDetails();
  document.getElementById('curve-box').addEventListener('keydown', keyboard);
  document.getElementById('export-png').addEventListener('click', exportPng);
  document.getElementById('export-print').addEventListener('click', exportForPrint);
  await refresh();
  window.addEventListener('resize', debounce(() => refresh(), 250));
}

start();
