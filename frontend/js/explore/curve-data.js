// Shapes the curve part of a /curve answer into Chart.js datasets (points or bins) and the numbers the
// plugins draw (intervals, reference lines, groups). On a scale without intervals (the t statistic) the
// answer's interval ends are null and nothing is drawn for them.
import { PALETTE, SIGNIFICANCE, num } from '../helpers.js';

export function curveData(view, withIntervals) {
  const curve = view.curve;
  const size = curve.count;
  if (curve.mode === 'points') return pointsData(view, size, withIntervals);
  return binsData(view, size, withIntervals);
}

/** Widens [lo, hi] to a value, ignoring undefined ones. */
function widen(range, value) {
  const v = num(value);
  if (Number.isFinite(v)) {
    range.lo = Math.min(range.lo, v);
    range.hi = Math.max(range.hi, v);
  }
}

function pointsData(view, size, withIntervals) {
  const p = view.curve.points;
  const byClass = new Map(SIGNIFICANCE.map((s) => [s.value, []]));
  const range = { lo: 0, hi: 0 };
  for (let i = 0; i < size; i++) {
    byClass.get(p.significance[i]).push({ x: i, y: num(p.estimate[i]) });
    widen(range, p.estimate[i]);
    if (withIntervals) {
      widen(range, p.low[i]);
      widen(range, p.high[i]);
    }
  }
  const radius = size <= 150 ? 3.6 : size <= 600 ? 2.8 : size <= 1500 ? 2.1 : 1.6;
  const datasets = SIGNIFICANCE.map((s) => ({
    label: s.label,
    data: byClass.get(s.value),
    pointStyle: s.shape,
    pointRadius: s.shape === 'triangle' ? radius * 1.2 : radius,
    pointHoverRadius: radius,
    pointBorderWidth: s.filled ? 0 : Math.max(1, radius * 0.4),
    pointBackgroundColor: s.filled ? s.color : PALETTE.paper,
    pointBorderColor: s.color,
    showLine: false,
    parsing: false,
    normalized: true,
    order: 1,
  }));
  return {
    mode: 'points',
    size,
    datasets,
    intervals: withIntervals ? { low: p.low, high: p.high, significance: p.significance } : null,
    yRange: padded(range.lo, range.hi),
  };
}

function binsData(view, size, withIntervals) {
  const b = view.curve.bins;
  const n = b.from.length;
  const centre = (i) => (b.from[i] + b.to[i] - 1) / 2;
  const series = (values) => Array.from({ length: n }, (_, i) => ({ x: centre(i), y: num(values[i]) }));
  const range = { lo: 0, hi: 0 };
  for (let i = 0; i < n; i++) {
    widen(range, b.min[i]);
    widen(range, b.max[i]);
    if (withIntervals) {
      widen(range, b.low[i]);
      widen(range, b.high[i]);
    }
  }
  // the bin's dominant class colours its stretch of the median line
  const dominant = Array.from({ length: n }, (_, i) => {
    const size = b.to[i] - b.from[i];
    const positive = b.significantPositive[i];
    const negative = b.significantNegative[i];
    const neutral = size - positive - negative;
    if (positive >= negative && positive >= neutral) return 1;
    if (negative >= neutral) return -1;
    return 0;
  });
  const line = { showLine: true, pointRadius: 0, parsing: false, normalized: true, borderWidth: 0, tension: 0 };
  const envelope = withIntervals ? [
    { ...line, label: 'interval envelope, low', data: series(b.low), fill: false, order: 5 },
    { ...line, label: 'interval envelope', data: series(b.high), fill: '-1', backgroundColor: PALETTE.envelope, order: 5 },
  ] : [];
  const datasets = [
    ...envelope,
    { ...line, label: 'lowest estimate', data: series(b.min), fill: false, order: 4 },
    { ...line, label: 'range of estimates', data: series(b.max), fill: '-1', backgroundColor: PALETTE.band, order: 4 },
    {
      ...line,
      label: 'median estimate',
      data: series(b.median),
      fill: false,
      borderWidth: 2,
      borderColor: PALETTE.ink,
      segment: {
        borderColor: (ctx) => colourOf(dominant[ctx.p0DataIndex]),
        borderDash: (ctx) => (dominant[ctx.p0DataIndex] === 0 ? [4, 3] : undefined),
      },
      order: 1,
    },
  ];
  return { mode: 'bins', size, datasets, intervals: null, yRange: padded(range.lo, range.hi), binWidth: size / n };
}

function colourOf(value) {
  return SIGNIFICANCE.find((s) => s.value === value).color;
}

/** The visible range: every interval and zero, with a margin. */
function padded(lo, hi) {
  const span = hi - lo || Math.abs(hi) || 1;
  return { min: lo - span * 0.05, max: hi + span * 0.05 };
}
