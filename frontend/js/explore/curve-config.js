// Presentation of the curve: axes, reference lines, interval bars, group separators. No data here; the
// plugins read the shared state that curve-actions.js fills.
import { LEFT_AXIS, RIGHT_PAD } from '../chart-setup.js';
import { PALETTE, num, significanceOf, withAlpha } from '../helpers.js';
import { number } from '../numbers.js';
import { highlightPlugin, positionTicks, xScale } from './highlight.js';
import { reportedPlugin } from './reported-mark.js';

/**
 * Vertical interval bars under the points, in each mark's colour: heavy and darker where the specification
 * is significant, light and thin where it is not.
 */
function intervalsPlugin(state) {
  return {
    id: 'intervalBars',
    beforeDatasetsDraw(chart) {
      const shaped = state.shaped;
      if (!shaped || !shaped.intervals) return;
      const { ctx, scales } = chart;
      const { low, high, significance, entryOf } = shaped.intervals;
      const step = (scales.x.getPixelForValue(1) - scales.x.getPixelForValue(0));
      const groups = new Map();
      for (let i = 0; i < low.length; i++) {
        const s = significanceOf(significance[i]);
        const id = `${entryOf[i].colour}/${s.key}`;
        if (!groups.has(id)) groups.set(id, { colour: entryOf[i].colour, s, at: [] });
        groups.get(id).at.push(i);
      }
      ctx.save();
      for (const { colour, s, at } of groups.values()) {
        ctx.strokeStyle = withAlpha(colour, s.intervalAlpha);
        ctx.lineWidth = Math.max(0.5, Math.min(s.intervalWidth, step * (s.filled ? 0.6 : 0.3)));
        ctx.beginPath();
        for (const i of at) {
          const x = scales.x.getPixelForValue(i);
          ctx.moveTo(x, scales.y.getPixelForValue(num(low[i])));
          ctx.lineTo(x, scales.y.getPixelForValue(num(high[i])));
        }
        ctx.stroke();
      }
      ctx.restore();
    },
  };
}

/** The zero line (solid) and the set's median (dashed, labelled), drawn under the data. */
function referencePlugin(state) {
  return {
    id: 'referenceLines',
    beforeDatasetsDraw(chart) {
      const { ctx, chartArea, scales } = chart;
      const line = (y, dash, color, width) => {
        const py = scales.y.getPixelForValue(y);
        if (py < chartArea.top || py > chartArea.bottom) return null;
        ctx.save();
        ctx.setLineDash(dash);
        ctx.strokeStyle = color;
        ctx.lineWidth = width;
        ctx.beginPath();
        ctx.moveTo(chartArea.left, py);
        ctx.lineTo(chartArea.right, py);
        ctx.stroke();
        ctx.restore();
        return py;
      };
      line(0, [], PALETTE.ink, 1);
      const median = state.view ? num(state.view.summary.median) : NaN;
      if (Number.isFinite(median)) {
        const py = line(median, [6, 4], PALETTE.inkSoft, 1.2);
        if (py !== null) {
          ctx.save();
          ctx.fillStyle = PALETTE.inkSoft;
          ctx.font = `12px ${chart.options.font?.family || 'sans-serif'}`;
          ctx.textAlign = 'left';
          ctx.textBaseline = 'bottom';
          ctx.fillText(`median ${number(median)}`, chartArea.left + 6, py - 3);
          ctx.restore();
        }
      }
    },
  };
}

/**
 * The null band (state.nullBand), under everything else: at each kept rank position of the sorted curve, from
 * the 2.5% to the 97.5% quantile over the null draws of their sorted estimates at that rank, joined from rank to
 * rank into one shaded region with dotted edges. The canvas records whether it was drawn, at how many ranks, and the
 * values it joined.
 */
function nullBandPlugin(state) {
  return {
    id: 'nullBand',
    beforeDatasetsDraw(chart) {
      const band = state.nullBand;
      chart.canvas.dataset.nullBand = band ? 'drawn' : 'none';
      chart.canvas.dataset.nullBandRanks = band ? String(band.ranks.length) : '0';
      chart.canvas.dataset.nullBandValues = band ? JSON.stringify({ ranks: band.ranks, low: band.low, high: band.high })
        : '';
      if (!band) return;
      const { ctx, chartArea, scales } = chart;
      const n = band.ranks.length;
      // one rank alone is drawn as wide as its position
      const xs = n === 1 ? [band.ranks[0] - 0.5, band.ranks[0] + 0.5] : band.ranks;
      const at = (k) => (n === 1 ? 0 : k);
      const x = (k) => scales.x.getPixelForValue(xs[k]);
      const y = (v) => Math.min(chartArea.bottom, Math.max(chartArea.top, scales.y.getPixelForValue(v)));
      ctx.save();
      ctx.beginPath();
      ctx.rect(chartArea.left, chartArea.top, chartArea.right - chartArea.left, chartArea.bottom - chartArea.top);
      ctx.clip();
      ctx.beginPath();
      for (let k = 0; k < xs.length; k++) ctx[k === 0 ? 'moveTo' : 'lineTo'](x(k), y(band.high[at(k)]));
      for (let k = xs.length - 1; k >= 0; k--) ctx.lineTo(x(k), y(band.low[at(k)]));
      ctx.closePath();
      ctx.fillStyle = PALETTE.nullBand;
      ctx.fill();
      ctx.strokeStyle = PALETTE.nullLine;
      ctx.setLineDash([1, 3]);
      for (const edge of [band.high, band.low]) {
        ctx.beginPath();
        for (let k = 0; k < xs.length; k++) ctx[k === 0 ? 'moveTo' : 'lineTo'](x(k), y(edge[at(k)]));
        ctx.stroke();
      }
      ctx.restore();
    },
  };
}

/** In a grouped order, a rule between groups and each group's label at the top. */
function groupsPlugin(state) {
  return {
    id: 'groupSeparators',
    afterDatasetsDraw(chart) {
      const groups = state.view ? state.view.groups : [];
      if (!groups || groups.length === 0) return;
      const { ctx, chartArea, scales } = chart;
      ctx.save();
      ctx.font = `600 12px ${chart.options.font?.family || 'sans-serif'}`;
      ctx.textBaseline = 'top';
      ctx.textAlign = 'center';
      groups.forEach((g, i) => {
        const left = scales.x.getPixelForValue(g.from - 0.5);
        const right = scales.x.getPixelForValue(g.to - 0.5);
        if (i > 0) {
          ctx.strokeStyle = PALETTE.inkSoft;
          ctx.setLineDash([2, 3]);
          ctx.beginPath();
          ctx.moveTo(left, chartArea.top);
          ctx.lineTo(left, chartArea.bottom);
          ctx.stroke();
          ctx.setLineDash([]);
        }
        ctx.fillStyle = PALETTE.ink;
        const text = shorten(ctx, g.label, right - left - 6);
        if (text) ctx.fillText(text, (left + right) / 2, chartArea.top + 4);
      });
      ctx.restore();
    },
  };
}

function shorten(ctx, text, width) {
  if (width < 20) return '';
  if (ctx.measureText(text).width <= width) return text;
  let t = text;
  while (t.length > 1 && ctx.measureText(`${t}\u2026`).width > width) t = t.slice(0, -1);
  return `${t}\u2026`;
}

export function curveConfig(state, yTitle, onHover, onClick) {
  return {
    type: 'scatter',
    data: { datasets: [] },
    options: {
      layout: { padding: { right: RIGHT_PAD, top: 8 } },
      interaction: { mode: 'x', intersect: false },
      events: ['mousemove', 'mouseout', 'click'],
      onHover,
      onClick,
      scales: {
        x: {
          ...xScale(1),
          title: { display: true, text: 'Specifications, ordered by estimate' },
          grid: { display: false },
          border: { color: PALETTE.ink },
          afterBuildTicks(scale) {
            scale.ticks = positionTicks(state.view ? state.view.curve.count : 1);
          },
          ticks: { autoSkip: false, callback: (v) => (Number.isInteger(v) ? (v + 1).toLocaleString('en') : '') },
        },
        y: {
          type: 'linear',
          title: { display: true, text: yTitle },
          grid: { color: 'rgba(0, 0, 0, 0.06)' },
          border: { color: PALETTE.ink },
          afterFit(scale) {
            scale.width = LEFT_AXIS;
          },
        },
      },
    },
    plugins: [nullBandPlugin(state), referencePlugin(state), intervalsPlugin(state), groupsPlugin(state), reportedPlugin(state, true),
      highlightPlugin(state)],
  };
}
