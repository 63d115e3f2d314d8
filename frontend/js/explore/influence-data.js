// Shapes the influence part of a /curve answer: a header row per factor, a row per level with its
// quartiles, and the range that holds them all.
import { num } from '../helpers.js';
import { share } from '../numbers.js';

export function influenceRows(influence) {
  const rows = [];
  let lo = 0;
  let hi = 0;
  for (const f of influence.factors) {
    rows.push({ header: true, label: `${f.name}: ${share(f.varianceShare)} of the variance` });
    for (const l of f.levels) {
      const row = {
        header: false,
        label: f.name === f.decision ? l.label : `${l.label} ${f.name}`,
        count: l.count,
        q1: num(l.lowerQuartile),
        median: num(l.median),
        q3: num(l.upperQuartile),
        mean: num(l.mean),
      };
      if (Number.isFinite(row.q1)) {
        lo = Math.min(lo, row.q1);
        hi = Math.max(hi, row.q3);
      }
      rows.push(row);
    }
  }
  const span = hi - lo || 1;
  return { rows, range: { min: lo - span * 0.06, max: hi + span * 0.06 } };
}
