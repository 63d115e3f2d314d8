// What happens to the curve: a new set arrives (filter or order changed), or a position is highlighted.
import { curveData } from './curve-data.js';
import { xScale } from './highlight.js';

export function showSet(chart, state, xTitle) {
  const shaped = curveData(state.view);
  state.shaped = shaped;
  chart.data.datasets = shaped.datasets;
  Object.assign(chart.options.scales.x, xScale(shaped.size));
  chart.options.scales.x.title.text = xTitle;
  // suggested, not fixed: Chart.js then rounds the range out to tidy ticks
  chart.options.scales.y.suggestedMin = shaped.yRange.min;
  chart.options.scales.y.suggestedMax = shaped.yRange.max;
  chart.update('none');
}

/** Redraws both panels after the highlighted position changed (no data change, so no update). */
export function redraw(...charts) {
  for (const c of charts) c.draw();
}
