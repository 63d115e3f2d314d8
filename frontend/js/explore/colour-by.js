// What hue means in the figure: nothing (every mark in the curve's ink), or the alternative of one chosen
// decision (or optional control) that each specification uses. The key lists the alternatives in the
// layout's order; the legend, the curve, the grid and the exported figure all read it from here.
import { ALTERNATIVE_COLOURS, ALTERNATIVE_SHAPES, PALETTE } from '../helpers.js';

/** The mark of every specification when nothing is coloured by. */
export const PLAIN_SHAPE = 'rectRot';

/**
 * @param factorId a factor id of the layout, or null for none
 * @return {factor, title, entries: [{level, label, colour, shape}]}, one entry per level of the factor
 */
export function colourKey(layout, factorId) {
  if (factorId === null || factorId === undefined || !layout.factors[factorId]) {
    return { factor: null, title: null, entries: [{ level: 0, label: null, colour: PALETTE.curve, shape: PLAIN_SHAPE }] };
  }
  const f = layout.factors[factorId];
  return {
    factor: f.id,
    title: f.control ? `${f.name} in or out` : f.name,
    entries: f.levels.map((label, level) => ({
      level,
      label: f.control ? `${label} ${f.name}` : label,
      colour: ALTERNATIVE_COLOURS[level % ALTERNATIVE_COLOURS.length],
      shape: ALTERNATIVE_SHAPES[level % ALTERNATIVE_SHAPES.length],
    })),
  };
}

/** The key entry of the curve position i in points mode. */
export function entryAt(key, levels, i) {
  return key.factor === null ? key.entries[0] : key.entries[levels[key.factor][i]];
}

/**
 * Bins mode: per bin, the key entry of the alternative most of the bin's specifications use (the grid's
 * shares of the factor's rows; an optional control has one row, "with", and "without" is the rest).
 */
export function dominantEntries(key, layout, bins) {
  const n = bins.from.length;
  if (key.factor === null) return Array.from({ length: n }, () => key.entries[0]);
  const rows = new Map();
  layout.gridRows.forEach((g, index) => {
    if (g.factor === key.factor) rows.set(g.level, index);
  });
  return Array.from({ length: n }, (_, b) => {
    let best = 0;
    let bestShare = -1;
    let rest = 1;
    for (const [level, row] of rows) {
      const share = bins.share[row][b];
      rest -= share;
      if (share > bestShare) {
        best = level;
        bestShare = share;
      }
    }
    if (rows.size < key.entries.length && rest > bestShare) {
      best = key.entries.findIndex((e) => !rows.has(e.level));
    }
    return key.entries[best];
  });
}
