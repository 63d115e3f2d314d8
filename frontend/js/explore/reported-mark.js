// The specification the plan reports: a dashed line at its position in the curve and the grid (labelled in the
// curve), and the sentence that says where it sits, from summary.json's `reported` section.
import { PALETTE } from '../helpers.js';
import { count, number, share } from '../numbers.js';

/** The keys of summary.json's reported.scales for each scale of the explorer. */
const SCALE_KEYS = Object.freeze({ fitted: 'as_fitted', effect: 'average_marginal_effect', standardized: 'standardized',
  partial: 'partial_correlation', t: 't_statistic' });

const LABEL = 'reported';

/** A plugin that draws `state.reported` (a curve position, or null) as a dashed line; labelled when `labelled`. */
export function reportedPlugin(state, labelled) {
  return {
    id: 'reportedSpecification',
    afterDatasetsDraw(chart) {
      // where the line was drawn, on the canvas, for whoever reads the page's markup (and its browser test)
      const marked = chart.canvas.dataset;
      if (state.reported === null || state.reported === undefined) {
        delete marked.reportedPosition;
        delete marked.reportedX;
        return;
      }
      const { ctx, chartArea, scales } = chart;
      const x = scales.x.getPixelForValue(state.reported);
      marked.reportedPosition = String(state.reported);
      marked.reportedX = String(Math.round(x));
      ctx.save();
      ctx.strokeStyle = PALETTE.ink;
      ctx.lineWidth = 1.5;
      ctx.setLineDash([5, 3]);
      ctx.beginPath();
      ctx.moveTo(x, chartArea.top);
      ctx.lineTo(x, chartArea.bottom);
      ctx.stroke();
      if (labelled) {
        ctx.setLineDash([]);
        ctx.fillStyle = PALETTE.ink;
        ctx.font = '11px sans-serif';
        const width = ctx.measureText(LABEL).width;
        // inside the plot, on the side with room
        const left = x + 4 + width > chartArea.right ? x - 4 - width : x + 4;
        ctx.fillText(LABEL, left, chartArea.top + 11);
      }
      ctx.restore();
    },
  };
}

/**
 * Where the reported specification sits on the scale shown, in a sentence: its value, the share of the run's
 * specifications below it in its comparable group (or on the unit-free scale), its rank and the share
 * significant in its sign; then whether the set shown holds it. `reported` is summary.json's section,
 * `position` its place in the set shown (-1 when the set lacks it), `scaleTitle` the scale in words.
 */
export function reportedSentence(reported, scale, position, scaleTitle) {
  const spec = `The reported specification (number ${reported.spec})`;
  if (!reported.in_run) {
    return `${spec} is not in this run: the run fitted a random sample of the plan's specifications that does not `
      + 'hold it. Run the plan without a sample to see where it sits.';
  }
  if (!reported.scales) return `${spec} did not fit: ${reported.status}.`;
  const place = reported.scales[SCALE_KEYS[scale]];
  if (!place || place.value === null) {
    return `${spec} has no value on the ${scaleTitle} (it is not defined for its model).`;
  }
  const among = place.group === undefined ? `with a value on the ${scaleTitle}`
    : `in its comparable group (${place.title})`;
  const what = scale === 'fitted' ? 'estimate' : `value on the ${scaleTitle}`;
  const sign = place.value > 0 ? 'positive' : 'negative';
  return `${spec}: the reported ${what}, ${number(place.value)}, is larger than ${share(place.share_smaller)} of the `
    + `${count(place.specifications)} specifications of the run ${among}; its rank is ${count(place.rank)} from the `
    + `smallest, its percentile ${number(place.percentile, 3)}; `
    + (place.share_significant_same_sign === null ? ''
      : `${share(place.share_significant_same_sign)} of them are significant and ${sign}. `)
    + (position >= 0 ? 'It is the dashed line in the curve and the grid.'
      : 'The set shown does not hold it (the filter or the comparable group leaves it out), so it is not marked.');
}
