// The compare page: compare.json as the batch command writes it, drawn as tables, and the two curves of one
// comparable group on one axis.

import { getJson } from '../api.js';
import { Chart } from '../chart-setup.js';
import { append, clear, el } from '../helpers.js';
import { count, drawClaim, number, pValue, share } from '../numbers.js';
import { COUNT_ROWS, HEADLINE_ROWS, JOINT_TEST_ROWS, curveData, planChanges } from './compare-data.js';
import { curvesConfig } from './compare-config.js';

const root = document.getElementById('comparison');
const FORMATS = { count, number, share };

/**
 * A p read off null draws: "p < 0.05" when no draw was as extreme (the bound 1/(R + 1), which compare.json's
 * `p_bounds` holds, written by numbers.js's drawClaim), otherwise "p = 0.012".
 */
function drawnP(p, bound) {
  if (p === 0 && bound !== null && bound !== undefined) return drawClaim(0, Math.round(1 / bound) - 1);
  const text = pValue(p);
  return text.startsWith('<') ? `p ${text}` : `p = ${text}`;
}

/** A cell holding a number of compare.json as `data-value`; `bound` only for a p of null draws. */
function valueCell(value, kind, bound) {
  const missing = value === null || value === undefined;
  const text = missing ? '\u2013' : kind === 'draws' ? drawnP(value, bound) : FORMATS[kind](value);
  return el('td', { 'data-value': missing ? '' : String(value) }, text);
}

const TEST_OF = { p_median: 'median', p_share_significant: 'share_significant', p_stouffer: 'stouffer' };

function boundOf(tests, key) {
  return tests && tests.p_bounds ? tests.p_bounds[TEST_OF[key]] : null;
}

function showPlan(plan) {
  const list = clear(document.getElementById('plan-changes'));
  const lines = planChanges(plan);
  if (!lines.length) lines.push('B\'s plan has the same decisions and alternatives as A\'s.');
  lines.forEach((line) => append(list, el('li', {}, line)));
}

function showSpecifications(specs) {
  const body = clear(document.querySelector('#specification-counts tbody'));
  for (const [label, key] of COUNT_ROWS) {
    append(body, el('tr', { 'data-key': key }, el('th', { scope: 'row' }, label), valueCell(specs[key], 'count')));
  }
  document.getElementById('shared-verdict').textContent = specs.shared === 0 ? 'The runs share no specification.'
    : specs.shared_identical ? `All ${count(specs.shared)} shared specifications have identical numbers.`
      : `${count(specs.shared_differing)} of the ${count(specs.shared)} shared specifications have numbers that differ.`;
  const table = document.getElementById('differences');
  table.hidden = specs.differences.length === 0;
  const rows = clear(table.querySelector('tbody'));
  for (const d of specs.differences) {
    append(rows, el('tr', {}, el('td', {}, Object.values(d.labels).join(', ')), el('td', {}, d.spec_a),
      el('td', {}, d.spec_b), el('td', {}, d.column), el('td', {}, d.value_a), el('td', {}, d.value_b)));
  }
}

function showHeadline(headline) {
  const body = clear(document.querySelector('#headline tbody'));
  for (const [label, key, kind] of HEADLINE_ROWS) {
    append(body, el('tr', { 'data-key': key }, el('th', { scope: 'row' }, label),
      valueCell(headline.a[key], kind), valueCell(headline.b[key], kind)));
  }
  const a = headline.a.joint_tests;
  const b = headline.b.joint_tests;
  for (const [label, key, kind] of JOINT_TEST_ROWS) {
    append(body, el('tr', { 'data-key': `joint_tests.${key}` }, el('th', { scope: 'row' }, label),
      valueCell(a ? a[key] : null, kind, boundOf(a, key)), valueCell(b ? b[key] : null, kind, boundOf(b, key))));
  }
  if (headline.a.median_mixes_units || headline.b.median_mixes_units) {
    append(body, el('tr', {}, el('td', { colspan: 3 }, 'A whole-run median pools several comparable groups; '
      + 'compare within a group below.')));
  }
}

function groupRow(group, side, numbers) {
  const title = [group.outcome, group.predictor, group.model].join(', ');
  if (!numbers) {
    return el('tr', { 'data-side': side }, el('td', {}, title), el('td', {}, side.toUpperCase()),
      el('td', { colspan: 8 }, `run ${side.toUpperCase()} has no such group`));
  }
  const tests = numbers.joint_tests || {};
  return el('tr', { 'data-side': side }, el('td', {}, title), el('td', {}, side.toUpperCase()),
    valueCell(numbers.specifications, 'count'), valueCell(numbers.median, 'number'),
    el('td', {}, `${number(numbers.lower_quartile)} to ${number(numbers.upper_quartile)}`),
    valueCell(numbers.share_significant_positive, 'share'), valueCell(numbers.share_significant_negative, 'share'),
    valueCell(tests.p_median, 'draws', boundOf(tests, 'p_median')),
    valueCell(tests.p_share_significant, 'draws', boundOf(tests, 'p_share_significant')),
    valueCell(tests.p_stouffer, 'draws', boundOf(tests, 'p_stouffer')));
}

function showGroups(groups) {
  const body = clear(document.querySelector('#groups tbody'));
  groups.forEach((g) => append(body, groupRow(g, 'a', g.a), groupRow(g, 'b', g.b)));
}

let chart = null;

function showCurves(groups) {
  const select = clear(document.getElementById('curve-group'));
  groups.forEach((g, i) => append(select, el('option', { value: i }, g.title || 'the whole run')));
  const canvas = document.getElementById('compare-curves');
  const draw = () => {
    const group = groups[Number(select.value)];
    const data = curveData(group);
    canvas.dataset.countA = group.a.count;
    canvas.dataset.countB = group.b.count;
    canvas.dataset.drawnA = data.a.length;
    canvas.dataset.drawnB = data.b.length;
    canvas.dataset.added = data.added.length;
    const thinned = data.a.length < group.a.count || data.b.length < group.b.count;
    document.getElementById('curve-counts').textContent = `A: ${count(group.a.count)} fitted specifications; `
      + `B: ${count(group.b.count)}, of which ${count(group.b.points.filter((p) => p.added).length)} drawn are added`
      + (thinned ? ' (each curve drawn from evenly spaced ranks).' : '.');
    if (chart) chart.destroy();
    chart = new Chart(canvas, curvesConfig(data, 'estimate as fitted'));
  };
  select.addEventListener('change', draw);
  if (groups.length) draw();
}

async function load() {
  const url = `/api/analyses/${root.dataset.analysis}/comparisons/${root.dataset.comparison}`;
  const view = await getJson(url);
  const c = view.compare;
  document.getElementById('compare-sentence').textContent = c.sentence;
  showPlan(c.plan);
  showSpecifications(c.specifications);
  showCurves(view.curves.groups);
  showHeadline(c.headline);
  showGroups(c.groups);
  root.dataset.loaded = 'yes';
}

load().catch((e) => {
  document.getElementById('compare-sentence').textContent = `The comparison could not be loaded: ${e.message}`;
});
