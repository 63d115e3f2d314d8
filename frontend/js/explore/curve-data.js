// Shapes the curve part of a /curve answer into Chart.js datasets (points or bins) and the numbers the
// plugins draw (intervals, reference lines, groups). On a scale without intervals (the t statistic) the
// answer's interval ends are null and nothing is drawn for them. Marks are filled when significant and
// hollow when not; their colour and shape are the colour key's (one ink, or the chosen decision's).
import { PALETTE, num, significanceOf } from '../helpers.js';
import { dominantEntries, entryAt } from './colour-by.js';

export function curveData(view, withIntervals, key, layout) {
  const curve = view.curve;
  const size = curve.count;
  if (curve.mode === 'points') return pointsData(view, size, withIntervals, key);
  return binsData(view, size, withIntervals, key, layout);
}

/** Widens [lo, hi] to a value, ignoring undefined ones. */
function widen(range, value) {
  const v = num(value);
  if (Number.isFinite(v)) {
    range.lo = Math.min(range.lo, v);
    range.hi = Math.max(range.hi, v);
  }
}

function pointsData(view, size, withIntervals, key) {
  const p = view.curve.points;
  // one dataset per key entry and significance class
  const groups = new Map();
  const entryOf = new Array(size);
  const range = { lo: 0, hi: 0 };
  for (let i = 0; i < size; i++) {
    const entry = entryAt(key, p.levels, i);
    const s = significanceOf(p.significance[i]);
    entryOf[i] = entry;
    const id = `${entry.level}/${s.key}`;
    if (!groups.has(id)) groups.set(id, { entry, s, data: [] });
    groups.get(id).data.push({ x: i, y: num(p.estimate[i]) });
    widen(range, p.estimate[i]);
    if (withIntervals) {
      widen(range, p.low[i]);
      widen(range, p.high[i]);
    }
  }
  const radius = size <= 150 ? 3.6 : size <= 600 ? 2.8 : size <= 1500 ? 2.1 : 1.6;
  const datasets = [...groups.values()].map(({ entry, s, data }) => ({
    label: entry.label === null ? s.label : `${entry.label}, ${s.label}`,
    data,
    pointStyle: entry.shape,
    pointRadius: entry.shape === 'rectRot' || entry.shape === 'triangle' ? radius * 1.2 : radius,
    pointHoverRadius: radius,
    pointBorderWidth: s.filled ? 0 : Math.max(1, radius * 0.45),
    pointBackgroundColor: s.filled ? entry.colour : PALETTE.paper,
    pointBorderColor: entry.colour,
    showLine: false,
    parsing: false,
    normalized: true,
    order: 1,
  }));
  return {
    mode: 'points',
    size,
    datasets,
    intervals: withIntervals ? { low: p.low, high: p.high, significance: p.significance, entryOf } : null,
    yRange: padded(range.lo, range.hi),
  };
}

function binsData(view, size, withIntervals, key, layout) {
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
  // solid where most of the bin's specifications are significant, dashed where most are not
  const mostlySignificant = Array.from({ length: n }, (_, i) => {
    const significant = b.significantPositive[i] + b.significantNegative[i];
    return significant * 2 >= b.to[i] - b.from[i];
  });
  const entries = dominantEntries(key, layout, b);
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
      borderWidth: 2.4,
      borderColor: PALETTE.curve,
      segment: {
        borderColor: (ctx) => entries[ctx.p0DataIndex].colour,
        borderDash: (ctx) => (mostlySignificant[ctx.p0DataIndex] ? undefined : [4, 3]),
      },
      order: 1,
    },
  ];
  return { mode: 'bins', size, datasets, intervals: null, yRange: padded(range.lo, range.hi), binWidth: size / n };
}

/** The visible range: every interval and zero, with a margin. */
function padded(lo, hi) {
  const span = hi - lo || Math.abs(hi) || 1;
  return { min: lo - span * 0.05, max: hi + span * 0.05 };
}
