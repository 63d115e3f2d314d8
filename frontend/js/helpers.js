// Shared helpers for every page: the palette, DOM building (text only, never HTML); number formats are in numbers.js.

// Okabe & Ito (2008), "Color Universal Design": hues that stay distinct under the common colour-vision
// deficiencies. Significance is also carried by shape and fill, so the figure reads in greyscale.
export const PALETTE = Object.freeze({
  positive: '#0072B2',        // significant, positive: filled circle
  positiveSoft: 'rgba(0, 114, 178, 0.35)',
  negative: '#D55E00',        // significant, negative: filled triangle
  negativeSoft: 'rgba(213, 94, 0, 0.35)',
  neutral: '#6E6E6E',         // not significant: hollow circle
  neutralSoft: 'rgba(110, 110, 110, 0.32)',
  ink: '#1F1F1F',
  inkSoft: '#4A4A4A',
  rule: '#C8C8C2',
  paper: '#FFFFFF',
  band: 'rgba(31, 31, 31, 0.20)',
  envelope: 'rgba(0, 114, 178, 0.13)',
  highlight: 'rgba(230, 159, 0, 0.30)',
  highlightLine: '#B27A00',
  mark: '#2B2B2B',
});

export const SIGNIFICANCE = Object.freeze([
  { key: 'positive', value: 1, label: 'significant, positive', color: PALETTE.positive, soft: PALETTE.positiveSoft,
    shape: 'circle', filled: true },
  { key: 'negative', value: -1, label: 'significant, negative', color: PALETTE.negative, soft: PALETTE.negativeSoft,
    shape: 'triangle', filled: true },
  { key: 'neutral', value: 0, label: 'not significant', color: PALETTE.neutral, soft: PALETTE.neutralSoft,
    shape: 'circle', filled: false },
]);

export function significanceOf(value) {
  return SIGNIFICANCE.find((s) => s.value === value);
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

export function debounce(fn, ms) {
  let timer = null;
  return (...args) => {
    clearTimeout(timer);
    timer = setTimeout(() => fn(...args), ms);
  };
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
