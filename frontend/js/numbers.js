// Numbers for people, by the same rules as the server's HumanNumbers: counts with thousands separators,
// p-values read off null draws with two significant digits and the draws behind them.

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
