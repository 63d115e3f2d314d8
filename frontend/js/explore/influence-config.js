// Presentation of the influence chart: for each alternative, the middle half of its specifications'
// estimates (bar) and their median (dot), beside the other alternatives of the same decision.
import { PALETTE } from '../helpers.js';

function levelsPlugin(state) {
  return {
    id: 'levelEstimates',
    beforeDatasetsDraw(chart) {
      const shaped = state.influence;
      if (!shaped) return;
      const { ctx, chartArea, scales } = chart;
      const rowHeight = Math.abs(scales.y.getPixelForValue(1) - scales.y.getPixelForValue(0));
      ctx.save();
      const zero = scales.x.getPixelForValue(0);
      ctx.strokeStyle = PALETTE.ink;
      ctx.beginPath();
      ctx.moveTo(zero, chartArea.top);
      ctx.lineTo(zero, chartArea.bottom);
      ctx.stroke();
      shaped.rows.forEach((r, i) => {
        const y = scales.y.getPixelForValue(i);
        if (r.header) {
          ctx.strokeStyle = PALETTE.rule;
          ctx.beginPath();
          ctx.moveTo(chartArea.left, y + rowHeight / 2);
          ctx.lineTo(chartArea.right, y + rowHeight / 2);
          ctx.stroke();
          return;
        }
        if (!Number.isFinite(r.median)) return;
        ctx.fillStyle = PALETTE.band;
        const x0 = scales.x.getPixelForValue(r.q1);
        const x1 = scales.x.getPixelForValue(r.q3);
        ctx.fillRect(x0, y - rowHeight * 0.3, Math.max(2, x1 - x0), rowHeight * 0.6);
        ctx.fillStyle = PALETTE.ink;
        ctx.beginPath();
        ctx.arc(scales.x.getPixelForValue(r.median), y, Math.min(4.5, rowHeight * 0.3), 0, Math.PI * 2);
        ctx.fill();
      });
      ctx.restore();
    },
  };
}

export function influenceConfig(state, xTitle) {
  return {
    type: 'scatter',
    data: { datasets: [{ data: [], parsing: false }] },
    options: {
      layout: { padding: { right: 16, top: 4 } },
      events: [],
      scales: {
        x: { type: 'linear', title: { display: true, text: xTitle }, grid: { color: 'rgba(0, 0, 0, 0.06)' } },
        y: {
          type: 'linear',
          reverse: true,
          grid: { display: false },
          border: { display: false },
          afterBuildTicks(scale) {
            scale.ticks = state.influence ? state.influence.rows.map((_, i) => ({ value: i })) : [];
          },
          ticks: {
            autoSkip: false,
            callback(value) {
              const row = state.influence && state.influence.rows[value];
              if (!row) return '';
              return row.header ? row.label : `${row.label} (${row.count})`;
            },
            font(ctx) {
              const row = state.influence && state.influence.rows[ctx.tick && ctx.tick.value];
              return row && row.header ? { weight: '700', size: 12 } : { size: 12 };
            },
          },
        },
      },
    },
    plugins: [levelsPlugin(state)],
  };
}
