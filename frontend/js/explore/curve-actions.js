// What happens to the curve: a new set arrives (filter or order changed), or a position is highlighted.
import { curveData } from './curve-data.js';
import { xScale } from './highlight.js';
import { wrap } from '../helpers.js';

// a rotated axis title runs along the plot's height; longer units take a second or third line
const Y_TITLE_CHARACTERS = 40;

export function showSet(chart, state, xTitle, yTitle, withIntervals) {
  const shaped = curveData(state.view, withIntervals, state.colourKey, state.layout);
  state.shaped = shaped;
  chart.data.datasets = shaped.datasets;
  Object.assign(chart.options.scales.x, xScale(shaped.size));
  chart.options.scales.x.title.text = xTitle;
  chart.options.scales.y.title.text = wrap(yTitle, Y_TITLE_CHARACTERS);
  chart.canvas.setAttribute('aria-label', `Each specification's key estimate, ordered; vertical axis: ${yTitle}`);
  // suggested, not fixed: Chart.js then rounds the range out to tidy ticks
  const band = state.nullBand;
  chart.options.scales.y.suggestedMin = band ? Math.min(shaped.yRange.min, band.min) : shaped.yRange.min;
  chart.options.scales.y.suggestedMax = band ? Math.max(shaped.yRange.max, band.max) : shaped.yRange.max;
  chart.update('none');
}

/** Redraws both panels after the highlighted position changed (no data change, so no update). */
export function redraw(...charts) {
  for (const c of charts) c.draw();
}
