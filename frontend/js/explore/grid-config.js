// Presentation of the choice grid: one row per alternative under its decision's header, aligned with the
// curve above (same x scale, same left axis width).
import { LEFT_AXIS, RIGHT_PAD } from '../chart-setup.js';
import { PALETTE } from '../helpers.js';
import { highlightPlugin, xScale } from './highlight.js';
import { reportedPlugin } from './reported-mark.js';

const MAX_LABEL = 30;

/** The colour of a display row's marks: its alternative's when the figure is coloured by its factor. */
function rowColour(state, row) {
  const key = state.colourKey;
  if (!key || key.factor === null || row.header || row.factor !== key.factor) return PALETTE.mark;
  return key.entries[row.level].colour;
}

function marksPlugin(state) {
  return {
    id: 'choiceMarks',
    beforeDatasetsDraw(chart) {
      const marks = state.marks;
      if (!marks) return;
      const { ctx, chartArea, scales } = chart;
      const rowHeight = Math.abs(scales.y.getPixelForValue(1) - scales.y.getPixelForValue(0));
      const rows = state.grid.rows;
      ctx.save();
      // every other decision's rows on a faint shade, so that the eye keeps to one decision across
      let decision = -1;
      let top = null;
      const shadeTo = (end) => {
        if (top !== null && decision % 2 === 1) {
          ctx.fillStyle = PALETTE.decisionShade;
          ctx.fillRect(chartArea.left, top, chartArea.right - chartArea.left, end - top);
        }
      };
      rows.forEach((r, i) => {
        if (!r.header) return;
        const y = scales.y.getPixelForValue(i) - rowHeight / 2;
        shadeTo(y);
        decision++;
        top = y;
      });
      shadeTo(scales.y.getPixelForValue(rows.length - 1) + rowHeight / 2);
      if (marks.mode === 'points') {
        // a thin upright tick per specification and alternative, as tall as most of the row
        const column = scales.x.getPixelForValue(1) - scales.x.getPixelForValue(0);
        const w = Math.max(1, Math.min(3, column * 0.45));
        const h = rowHeight * 0.7;
        const m = marks.marks;
        for (let k = 0; k < m.length; k += 2) {
          const x = scales.x.getPixelForValue(m[k]);
          const y = scales.y.getPixelForValue(m[k + 1]);
          ctx.fillStyle = rowColour(state, rows[m[k + 1]]);
          ctx.fillRect(x - w / 2, y - h / 2, w, h);
        }
      } else {
        const h = rowHeight * 0.7;
        for (const c of marks.cells) {
          const x0 = scales.x.getPixelForValue(c.from - 0.5);
          const x1 = scales.x.getPixelForValue(c.to - 0.5);
          const y = scales.y.getPixelForValue(c.row);
          ctx.fillStyle = rowColour(state, rows[c.row]);
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
    plugins: [marksPlugin(state), reportedPlugin(state, false), highlightPlugin(state)],
  };
}
