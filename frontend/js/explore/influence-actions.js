// What happens to the influence chart: a new set arrives.
import { influenceRows } from './influence-data.js';

const ROW_HEIGHT = 19;

export function showInfluence(chart, box, state, influence, xTitle) {
  state.influence = influenceRows(influence);
  chart.options.scales.x.title.text = xTitle;
  box.style.height = `${state.influence.rows.length * ROW_HEIGHT + 56}px`;
  chart.options.scales.x.min = state.influence.range.min;
  chart.options.scales.x.max = state.influence.range.max;
  chart.options.scales.y.min = -0.5;
  chart.options.scales.y.max = state.influence.rows.length - 0.5;
  chart.resize();
  chart.update('none');
}
