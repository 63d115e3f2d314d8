// Numbers for people, by the same rules as the server's HumanNumbers: counts with thousands separators;
// shares as percentages with one decimal, never 0% or 100% unless exact; other numbers with four
// significant digits, written out between 1e-4 and 1e6 and as a power of ten beyond; p-values with two
// significant digits, "< 0.001" below that, and those read off null draws with the draws behind them.
// Undefined numbers are a dash.

import { num } from './helpers.js';

const DASH = '\u2013';
const SUPERSCRIPTS = '\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076\u2077\u2078\u2079';

function superscript(exponent) {
  return (exponent < 0 ? '\u207b' : '') + [...String(Math.abs(exponent))].map((d) => SUPERSCRIPTS[d]).join('');
}

/** A number with `digits` significant digits, trailing zeros dropped: -0.000203, 4,608, 1, -1.301×10⁻⁵. */
export function number(x, digits = 4) {
  const v = num(x);
  if (!Number.isFinite(v)) return DASH;
  if (v === 0) return '0';
  const rounded = Number(v.toPrecision(digits));
  const size = Math.abs(rounded);
  if (size >= 1e-4 && size < 1e6) return rounded.toLocaleString('en', { maximumSignificantDigits: digits });
  const [mantissa, exponent] = v.toExponential(digits - 1).split('e');
  return `${Number(mantissa)}\u00d710${superscript(Number(exponent))}`;
}

/** A share as a percentage with one decimal, ".0" dropped; 0% and 100% only when exact, else < 0.1% and > 99.9%. */
export function share(x) {
  const v = num(x);
  if (!Number.isFinite(v)) return DASH;
  if (v === 0 || v === 1) return v === 0 ? '0%' : '100%';
  const text = (100 * v).toFixed(1);
  if (text === '0.0' || text === '-0.0') return '< 0.1%';
  if (text === '100.0') return '> 99.9%';
  return `${text.endsWith('.0') ? text.slice(0, -2) : text}%`;
}

/** A nominal p-value: two significant digits, or "< 0.001", a bound that is true as written. */
export function pValue(x) {
  const v = num(x);
  if (!Number.isFinite(v)) return DASH;
  return v < 0.001 ? '< 0.001' : twoDigits(v);
}

/** A whole number with thousands separators: 4,608. */
export function count(n) {
  return Number(n).toLocaleString('en');
}

// Two significant digits, rounded up: a bound that is rounded down would claim more than the draws show.
function roundedUp(v) {
  const step = 10 ** (Math.floor(Math.log10(v)) - 1);
  // the small slack keeps an exact 0.01 at 0.01 despite binary fractions
  return Math.ceil((v / step) * (1 - 1e-12)) * step;
}

function twoDigits(v) {
  return v.toLocaleString('en', { maximumSignificantDigits: 2, useGrouping: false });
}

/** "p < 0.0034" when no draw was as extreme (the bound 1/(R+1)), otherwise "p = 0.012". */
export function drawClaim(exceedances, draws) {
  if (!(draws > 0)) return 'p undefined';
  return exceedances === 0 ? `p < ${twoDigits(roundedUp(1 / (draws + 1)))}` : `p = ${twoDigits(exceedances / draws)}`;
}

/** "1/301; none of 300 draws as extreme" or "3 of 300 draws". */
export function drawTally(exceedances, draws) {
  if (!(draws > 0)) return 'no draw could be compared';
  return exceedances === 0 ? `1/${count(draws + 1)}; none of ${count(draws)} draws as extreme`
    : `${count(exceedances)} of ${count(draws)} draws`;
}

/** "p < 0.0034 (1/301; none of 300 draws as extreme)" or "p = 0.012 (3 of 300 draws)". */
export function drawP(exceedances, draws) {
  return `${drawClaim(exceedances, draws)} (${drawTally(exceedances, draws)})`;
}
