// The choice grid's rows (a header per decision, then its alternatives or optional controls) and the
// marks of a /curve answer placed on them.

/** Display rows from the layout's grid rows; `rowOf[factor][level]` is a display row or -1. */
export function gridRows(layout) {
  const rows = [];
  const rowOf = layout.factors.map((f) => f.levels.map(() => -1));
  let group = null;
  layout.gridRows.forEach((g, index) => {
    if (g.group !== group) {
      group = g.group;
      rows.push({ header: true, label: g.group });
    }
    rowOf[g.factor][g.level] = rows.length;
    rows.push({ header: false, label: g.label, gridRow: index, factor: g.factor, level: g.level });
  });
  return { rows, rowOf };
}

/**
 * Points mode: one mark per specification and factor, at the display row of its level. Bins mode: per
 * bin and grid row, the share of the bin's specifications using it.
 */
export function gridMarks(view, grid) {
  const curve = view.curve;
  if (curve.mode === 'points') {
    const levels = curve.points.levels;
    const marks = [];
    for (let f = 0; f < levels.length; f++) {
      const column = levels[f];
      for (let i = 0; i < column.length; i++) {
        const row = grid.rowOf[f][column[i]];
        if (row >= 0) marks.push(i, row);
      }
    }
    return { mode: 'points', size: curve.count, marks: Int32Array.from(marks) };
  }
  const b = curve.bins;
  const cells = [];
  grid.rows.forEach((r, display) => {
    if (r.header) return;
    const share = b.share[r.gridRow];
    for (let i = 0; i < share.length; i++) {
      if (share[i] > 0) cells.push({ from: b.from[i], to: b.to[i], row: display, share: share[i] });
    }
  });
  return { mode: 'bins', size: curve.count, cells };
}
