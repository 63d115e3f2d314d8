// The specification under the pointer, drawn as the same vertical band in the curve and the grid.
import { PALETTE } from '../helpers.js';

/** A plugin that marks `state.highlight` (a curve position, or null) across the chart area. */
export function highlightPlugin(state) {
  return {
    id: 'positionHighlight',
    afterDatasetsDraw(chart) {
      if (state.highlight === null || state.highlight === undefined) return;
      const { ctx, chartArea, scales } = chart;
      const x0 = scales.x.getPixelForValue(state.highlight - 0.5);
      const x1 = scales.x.getPixelForValue(state.highlight + 0.5);
      const width = Math.max(3, x1 - x0);
      const middle = (x0 + x1) / 2;
      ctx.save();
      ctx.fillStyle = PALETTE.highlight;
      ctx.fillRect(middle - width / 2, chartArea.top, width, chartArea.bottom - chartArea.top);
      ctx.strokeStyle = PALETTE.highlightLine;
      ctx.lineWidth = 1;
      ctx.beginPath();
      ctx.moveTo(middle, chartArea.top);
      ctx.lineTo(middle, chartArea.bottom);
      ctx.stroke();
      ctx.restore();
    },
  };
}

/** The curve position under a pointer event, or null outside the plot. */
export function positionAt(chart, event, size) {
  const { chartArea, scales } = chart;
  if (event.x < chartArea.left || event.x > chartArea.right || event.y < chartArea.top || event.y > chartArea.bottom) {
    return null;
  }
  const p = Math.round(scales.x.getValueForPixel(event.x));
  return Math.min(size - 1, Math.max(0, p));
}

/** Both panels span positions -0.5 .. n - 0.5, with the same left axis width and right padding. */
export function xScale(size) {
  return { type: 'linear', min: -0.5, max: Math.max(0.5, size - 0.5), offset: false };
}

/**
 * Tick values for positions 0..n-1, labelled 1..n: the first and the last specification and round
 * numbers between (steps of 1, 2 or 5 times a power of ten).
 */
export function positionTicks(n) {
  if (n <= 1) return [{ value: 0 }];
  const rough = n / 6;
  const power = 10 ** Math.floor(Math.log10(rough));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= rough);
  const values = [0];
  for (let k = step; k < n; k += step) {
    if (k - 1 > values[values.length - 1]) values.push(k - 1);
  }
  const last = values[values.length - 1];
  if (n - 1 - last < step / 2 && last !== 0) values.pop();
  values.push(n - 1);
  return values.map((value) => ({ value }));
}
