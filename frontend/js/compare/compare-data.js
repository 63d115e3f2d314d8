// The comparison's JSON shaped for the page: the rows of its tables and the datasets of its chart.

import { num } from '../helpers.js';

/** compare.json's whole-run headline numbers, as rows of [label, key, kind] (kind picks the number format). */
export const HEADLINE_ROWS = Object.freeze([
  ['Specifications in the plan', 'specifications', 'count'],
  ['Fitted', 'fitted', 'count'],
  ['Median estimate as fitted', 'median_estimate', 'number'],
  ['Share positive', 'share_positive', 'share'],
  ['Share significant and positive', 'share_significant_positive', 'share'],
  ['Share significant and negative', 'share_significant_negative', 'share'],
]);

/**
 * The joint tests of compare.json's headline, by the key that holds each p. A p read off null draws is a
 * share of the draws (kind `draws`): none as extreme means only p < 1/(R + 1), and is written so.
 */
export const JOINT_TEST_ROWS = Object.freeze([
  ['Null draws', 'draws', 'count'],
  ['Joint test of the median', 'p_median', 'draws'],
  ['Joint test of the share significant', 'p_share_significant', 'draws'],
  ['Stouffer\'s joint test', 'p_stouffer', 'draws'],
]);

/** compare.json's specification counts, as [label, key]. */
export const COUNT_ROWS = Object.freeze([
  ['Fitted in A', 'a'],
  ['Fitted in B', 'b'],
  ['Shared (the same label for every decision)', 'shared'],
  ['Only in A (B dropped them)', 'only_a'],
  ['Only in B (B added them)', 'only_b'],
  ['Shared, with numbers that differ', 'shared_differing'],
]);

/** One line per change of B's plan, from compare.json's `plan`. */
export function planChanges(plan) {
  const lines = [];
  for (const d of plan.decisions_added) {
    lines.push(`B adds the decision "${d.name}" (${d.kind}): ${choices(d).join(', ')}`);
  }
  for (const d of plan.decisions_removed) {
    lines.push(`B drops the decision "${d.name}" (${d.kind}): ${choices(d).join(', ')}`);
  }
  for (const c of plan.decisions_changed) {
    const of = `"${c.name}"`;
    if (c.kind_a !== c.kind_b || c.choices_a !== c.choices_b) {
      lines.push(`B makes ${of} a decision of another form (${c.kind_b}, by ${c.choices_b})`);
    }
    if (c.added.length) lines.push(`B adds to ${of}: ${c.added.join(', ')}`);
    if (c.removed.length) lines.push(`B drops from ${of}: ${c.removed.join(', ')}`);
    if (c.redefined.length) lines.push(`B redefines in ${of}: ${c.redefined.join(', ')}`);
    if (c.required_added.length) lines.push(`B adds required controls to ${of}: ${c.required_added.join(', ')}`);
    if (c.required_removed.length) lines.push(`B drops required controls from ${of}: ${c.required_removed.join(', ')}`);
  }
  return lines;
}

function choices(decision) {
  return decision.alternatives || decision.controls || decision.sets || [];
}

/** The chart's three datasets for one group: A's curve, B's curve, and B's added specifications. */
export function curveData(group) {
  const xy = (p) => ({ x: num(p.percentile), y: num(p.estimate) });
  return {
    a: group.a.points.map(xy),
    b: group.b.points.map(xy),
    added: group.b.points.filter((p) => p.added).map(xy),
  };
}
