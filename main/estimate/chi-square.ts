// Upper tail of the χ² distribution with an integer number of degrees of freedom, for joint Wald
// tests. Closed forms (Abramowitz & Stegun, "Handbook of Mathematical Functions", 1964,
// 26.4.4–26.4.5), with Q(x) = 1 − Φ(x) the standard normal upper tail and Z(x) its density:
//   ν even:  Q(χ²|ν) = e^{−χ²/2} · Σ_{r=0}^{ν/2−1} (χ²/2)^r / r!
//   ν odd:   Q(χ²|ν) = 2·Q(χ) + 2·Z(χ) · Σ_{r=1}^{(ν−1)/2} χ^{2r−1} / (1·3·5···(2r−1))
// Every term is positive, so the sums lose no digits to cancellation. The terms are summed in
// logarithms (largest first factored out) so that neither e^{−χ²/2} underflows nor the powers
// overflow for large χ² or many degrees of freedom.

import normalCdf from '@stdlib/stats-base-dists-normal-cdf';

/** log Σ exp(l_r), factoring out the largest term. */
function logSumExp(logs: readonly number[]): number {
  let top = -Infinity;
  for (const l of logs) if (l > top) top = l;
  if (top === -Infinity) return -Infinity;
  let s = 0;
  for (const l of logs) s += Math.exp(l - top);
  return top + Math.log(s);
}

/** P(X > x) for X ~ χ²(df), df a positive integer. */
export function chiSquareSurvival(x: number, df: number): number {
  if (!Number.isInteger(df) || df < 1) return NaN;
  if (Number.isNaN(x)) return NaN;
  if (x <= 0) return 1;
  if (x === Infinity) return 0;
  const half = x / 2;
  const logs: number[] = [];
  if (df % 2 === 0) {
    // log of e^{−x/2} (x/2)^r / r!
    let logTerm = -half;
    logs.push(logTerm);
    for (let r = 1; r < df / 2; r++) {
      logTerm += Math.log(half) - Math.log(r);
      logs.push(logTerm);
    }
    return Math.min(1, Math.exp(logSumExp(logs)));
  }
  const chi = Math.sqrt(x);
  const tail = 2 * normalCdf(-chi, 0, 1);
  if (df === 1) return tail;
  // log of 2·Z(χ)·χ^{2r−1}/(1·3···(2r−1)), r = 1 … (df−1)/2
  let logTerm = Math.log(2) - half - 0.5 * Math.log(2 * Math.PI) + Math.log(chi);
  logs.push(logTerm);
  for (let r = 2; r <= (df - 1) / 2; r++) {
    logTerm += Math.log(x) - Math.log(2 * r - 1);
    logs.push(logTerm);
  }
  return Math.min(1, tail + Math.exp(logSumExp(logs)));
}
