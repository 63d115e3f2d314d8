// What happens to the grid: a new set, or (through highlight.js) a highlighted position.
import { gridMarks } from './grid-data.js';
import { xScale } from './highlight.js';

/** Pixel height of one grid row. */
export const ROW_HEIGHT = 17;

export function showGrid(chart, state) {
  state.marks = gridMarks(state.view, state.grid);
  Object.assign(chart.options.scales.x, xScale(state.view.curve.count));
  chart.options.scales.y.min = -0.5;
  chart.options.scales.y.max = state.grid.rows.length - 0.5;
  chart.update('none');
}

/** Sizes the grid's box to its rows (called once the rows are known). */
export function sizeGrid(box, rows) {
  box.style.height = `${rows.length * ROW_HEIGHT + 12}px`;
}
