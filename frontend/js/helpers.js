// Shared helpers for every page: the palette, DOM building (text only, never HTML); number formats are in numbers.js.

// The figure's palette. The curve is drawn in one ink; significance is carried by fill (filled or hollow
// mark) and by the weight of the interval, never by hue, since the side of the zero line already shows the
// sign. Hue is kept for what the user asks to see: the alternatives of one decision ("colour by").
export const PALETTE = Object.freeze({
  curve: '#2A3440',           // every mark and interval when nothing is coloured by
  ink: '#1F1F1F',
  inkSoft: '#4A4A4A',
  rule: '#C8C8C2',
  paper: '#FFFFFF',
  band: 'rgba(42, 52, 64, 0.22)',
  envelope: 'rgba(42, 52, 64, 0.10)',
  decisionShade: 'rgba(120, 104, 72, 0.07)',
  highlight: 'rgba(47, 127, 143, 0.20)',
  highlightLine: '#2F7F8F',
  mark: '#2A3440',
  nullBand: 'rgba(140, 59, 18, 0.16)',
  nullLine: '#8C3B12',
});

/**
 * Colours for the alternatives of the decision the figure is coloured by, in order. Any two differ by at
 * least 6 in CIE lightness L* (17.6, 75.1, 49.2, 35.5, 66.7, 28.8; AlternativePaletteTest), so they stay
 * apart in greyscale; the hues are blues and oranges (the violet reads as a blue), the contrast the common
 * red-green deficiencies keep (common practice). The mark shapes (ALTERNATIVE_SHAPES) cycle beside
 * them, so a seventh alternative, which reuses a colour, still differs in shape (both repeat from the 13th).
 */
export const ALTERNATIVE_COLOURS = Object.freeze(['#1A2A4F', '#E3B23C', '#2F7F8F', '#8C3B12', '#6FA8D6', '#4E3A6E']);
export const ALTERNATIVE_SHAPES = Object.freeze(['circle', 'rect', 'triangle', 'rectRot']);

/** Two classes of significance, told apart by fill and by the interval's weight. */
export const SIGNIFICANCE = Object.freeze([
  { key: 'significant', label: 'significant', filled: true, intervalWidth: 1.7, intervalAlpha: 0.75 },
  { key: 'not', label: 'not significant', filled: false, intervalWidth: 0.8, intervalAlpha: 0.35 },
]);

/** The class of a significance code from the server (+1 or -1 significant, 0 not). */
export function significanceOf(value) {
  return value === 0 ? SIGNIFICANCE[1] : SIGNIFICANCE[0];
}

/** A colour given as #RRGGBB with an opacity. */
export function withAlpha(hex, alpha) {
  const v = parseInt(hex.slice(1), 16);
  return `rgba(${(v >> 16) & 255}, ${(v >> 8) & 255}, ${v & 255}, ${alpha})`;
}

/** Creates an element; attributes are set as attributes, children as text nodes or elements. */
export function el(tag, attributes = {}, ...children) {
  const node = document.createElement(tag);
  for (const [name, value] of Object.entries(attributes)) {
    if (value === false || value === null || value === undefined) continue;
    node.setAttribute(name, value === true ? '' : String(value));
  }
  append(node, ...children);
  return node;
}

export function append(node, ...children) {
  for (const child of children.flat()) {
    if (child === null || child === undefined || child === false) continue;
    node.append(child instanceof Node ? child : document.createTextNode(String(child)));
  }
  return node;
}

export function clear(node) {
  while (node.firstChild) node.removeChild(node.firstChild);
  return node;
}

/** Text broken at spaces into lines of at most about `width` characters (for long axis titles). */
export function wrap(text, width) {
  const lines = [];
  let line = '';
  for (const word of text.split(' ')) {
    if (line && line.length + 1 + word.length > width) {
      lines.push(line);
      line = word;
    } else {
      line = line ? `${line} ${word}` : word;
    }
  }
  if (line) lines.push(line);
  return lines;
}

/** JSON numbers may arrive as null or as the strings "NaN"/"Infinity" for undefined values. */
export function num(x) {
  if (x === null || x === undefined) return NaN;
  return typeof x === 'number' ? x : Number(x);
}

/** `fn` called once calls have paused for `ms`; `.cancel()` drops a call still waiting. */
export function debounce(fn, ms) {
  let timer = null;
  const debounced = (...args) => {
    clearTimeout(timer);
    timer = setTimeout(() => fn(...args), ms);
  };
  debounced.cancel = () => clearTimeout(timer);
  return debounced;
}

/** Starts a download of a Blob under a file name. */
export function download(blob, name) {
  const url = URL.createObjectURL(blob);
  const a = el('a', { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
