// Chart.js, loaded from its WebJar by the page as a classic script, configured and extended in one place.
import { PALETTE } from './helpers.js';

export const Chart = window.Chart;

// A white ground under every chart, so an exported PNG has paper behind it instead of transparency.
const paperGround = {
  id: 'paperGround',
  beforeDraw(chart) {
    const { ctx } = chart;
    ctx.save();
    ctx.globalCompositeOperation = 'destination-over';
    ctx.fillStyle = PALETTE.paper;
    ctx.fillRect(0, 0, chart.width, chart.height);
    ctx.restore();
  },
};

Chart.register(paperGround);
Chart.defaults.font.family = getComputedStyle(document.documentElement).fontFamily;
Chart.defaults.font.size = 12;
Chart.defaults.color = PALETTE.ink;
Chart.defaults.animation = false;
Chart.defaults.responsive = true;
Chart.defaults.maintainAspectRatio = false;
Chart.defaults.plugins.legend.display = false;
Chart.defaults.plugins.tooltip.enabled = false;
// crisp lines in exported figures, whatever the screen
Chart.defaults.devicePixelRatio = Math.max(2, window.devicePixelRatio || 1);

/** Width of the left axis of the curve and the grid, identical so that their x positions line up. */
export const LEFT_AXIS = 210;
/** Right padding of both panels, for the same reason. */
export const RIGHT_PAD = 16;

/** Draws a mark shape (the same on the curve, in the legend and in exports): filled, or hollow on paper. */
export function drawMark(ctx, shape, filled, color, x, y, r) {
  ctx.beginPath();
  if (shape === 'triangle') {
    ctx.moveTo(x, y - r * 1.15);
    ctx.lineTo(x + r * 1.05, y + r * 0.75);
    ctx.lineTo(x - r * 1.05, y + r * 0.75);
    ctx.closePath();
  } else if (shape === 'rect') {
    ctx.rect(x - r * 0.85, y - r * 0.85, r * 1.7, r * 1.7);
  } else if (shape === 'rectRot') {
    ctx.moveTo(x, y - r * 1.2);
    ctx.lineTo(x + r * 1.2, y);
    ctx.lineTo(x, y + r * 1.2);
    ctx.lineTo(x - r * 1.2, y);
    ctx.closePath();
  } else {
    ctx.arc(x, y, r, 0, Math.PI * 2);
  }
  if (filled) {
    ctx.fillStyle = color;
    ctx.fill();
  } else {
    ctx.fillStyle = PALETTE.paper;
    ctx.fill();
    ctx.lineWidth = Math.max(1, r * 0.45);
    ctx.strokeStyle = color;
    ctx.stroke();
  }
}
