// Presentation of the choice grid: one row per alternative under its decision's header, aligned with the
// curve above (same x scale, same left axis width).
import { LEFT_AXIS, RIGHT_PAD } from '../chart-setup.js';
import { PALETTE } from '../helpers.js';
import { highlightPlugin, xScale } from './highlight.js';

const MAX_LABEL = 30;

function marksPlugin(state) {
  return {
    id: 'choiceMarks',
    beforeDatasetsDraw(chart) {
      const marks = state.marks;
      if (!marks) return;
      const { ctx, chartArea, scales } = chart;
      const rowHeight = Math.abs(scales.y.getPixelForValue(1) - scales.y.getPixelForValue(0));
      ctx.save();
      // a pale band behind each decision's rows helps the eye follow a row across
      state.grid.rows.forEach((r, i) => {
        if (r.header) {
          const y = scales.y.getPixelForValue(i);
          ctx.strokeStyle = PALETTE.rule;
          ctx.beginPath();
          ctx.moveTo(chartArea.left, y + rowHeight / 2);
          ctx.lineTo(chartArea.right, y + rowHeight / 2);
          ctx.stroke();
        }
      });
      ctx.fillStyle = PALETTE.mark;
      if (marks.mode === 'points') {
        const column = scales.x.getPixelForValue(1) - scales.x.getPixelForValue(0);
        const w = Math.max(1.5, Math.min(7, column * 0.72));
        const h = Math.max(2, Math.min(rowHeight * 0.62, w < 3 ? rowHeight * 0.62 : w));
        const m = marks.marks;
        for (let k = 0; k < m.length; k += 2) {
          const x = scales.x.getPixelForValue(m[k]);
          const y = scales.y.getPixelForValue(m[k + 1]);
          ctx.fillRect(x - w / 2, y - h / 2, w, h);
        }
      } else {
        const h = rowHeight * 0.7;
        for (const c of marks.cells) {
          const x0 = scales.x.getPixelForValue(c.from - 0.5);
          const x1 = scales.x.getPixelForValue(c.to - 0.5);
          const y = scales.y.getPixelForValue(c.row);
          ctx.globalAlpha = c.share;
          ctx.fillRect(x0, y - h / 2, Math.max(1, x1 - x0), h);
        }
        ctx.globalAlpha = 1;
      }
      ctx.restore();
    },
  };
}

function shortLabel(text) {
  return text.length > MAX_LABEL ? `${text.slice(0, MAX_LABEL - 1)}\u2026` : text;
}

export function gridConfig(state, onHover, onClick) {
  return {
    type: 'scatter',
    data: { datasets: [{ data: [], parsing: false }] },
    options: {
      layout: { padding: { right: RIGHT_PAD, bottom: 4 } },
      interaction: { mode: 'x', intersect: false },
      events: ['mousemove', 'mouseout', 'click'],
      onHover,
      onClick,
      scales: {
        x: { ...xScale(1), display: false },
        y: {
          type: 'linear',
          reverse: true,
          min: -0.5,
          max: 0.5,
          grid: { display: false },
          border: { display: false },
          afterBuildTicks(scale) {
            scale.ticks = state.grid ? state.grid.rows.map((_, i) => ({ value: i })) : [];
          },
          ticks: {
            autoSkip: false,
            callback(value) {
              const row = state.grid && state.grid.rows[value];
              if (!row) return '';
              return row.header ? row.label : shortLabel(row.label);
            },
            font(ctx) {
              const row = state.grid && state.grid.rows[ctx.tick && ctx.tick.value];
              return row && row.header ? { weight: '700', size: 12 } : { size: 12 };
            },
            color(ctx) {
              const row = state.grid && state.grid.rows[ctx.tick && ctx.tick.value];
              return row && row.header ? PALETTE.ink : PALETTE.inkSoft;
            },
          },
          afterFit(scale) {
            scale.width = LEFT_AXIS;
          },
        },
      },
    },
    plugins: [marksPlugin(state), highlightPlugin(state)],
  };
}
