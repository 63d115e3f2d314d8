// Presentation of the two curves on one axis: A and B in two inks that differ in lightness as well as hue,
// B's added specifications as triangles, so that the figure reads in greyscale.

import { ALTERNATIVE_COLOURS, withAlpha } from '../helpers.js';

const INK_A = ALTERNATIVE_COLOURS[0];
const INK_B = ALTERNATIVE_COLOURS[1];

export function curvesConfig(data, yTitle) {
  return {
    type: 'scatter',
    data: {
      datasets: [
        { label: 'A', data: data.a, showLine: true, borderColor: INK_A, backgroundColor: INK_A, borderWidth: 1.5,
          pointRadius: 2, pointStyle: 'circle' },
        { label: 'B', data: data.b, showLine: true, borderColor: INK_B, backgroundColor: withAlpha(INK_B, 0.6),
          borderWidth: 1.5, pointRadius: 2, pointStyle: 'rect' },
        { label: 'B, added (not in A)', data: data.added, showLine: false, borderColor: INK_A,
          backgroundColor: INK_B, borderWidth: 1, pointRadius: 5, pointStyle: 'triangle' },
      ],
    },
    options: {
      parsing: false,
      normalized: true,
      plugins: { legend: { display: true, labels: { usePointStyle: true } } },
      scales: {
        x: { type: 'linear', min: 0, max: 100, title: { display: true, text: 'percentile rank in its own run' } },
        y: { type: 'linear', title: { display: true, text: yTitle } },
      },
    },
  };
}
