import { chiSquareQuantile } from '../../kernel-lib/numeric/distributions';

/**
 * Pearson's chi-square goodness-of-fit of integer draws against a probability table: cells with
 * expected count below 5 are pooled from each tail inward (common practice, no source), and the
 * statistic is compared with the chi-square quantile at `level` on (cells − 1) df.
 */
export function chiSquareFit(draws: number[], pmf: number[], level = 0.999): { statistic: number; critical: number; cells: number } {
  const n = draws.length;
  const counts = new Float64Array(pmf.length);
  for (const d of draws) counts[Math.min(d, pmf.length - 1)]++;
  const cells: { observed: number; expected: number }[] = [];
  let obs = 0;
  let exp = 0;
  for (let i = 0; i < pmf.length; i++) {
    obs += counts[i];
    exp += n * pmf[i];
    if (exp >= 5) { cells.push({ observed: obs, expected: exp }); obs = 0; exp = 0; }
  }
  if (cells.length && exp > 0) {
    cells[cells.length - 1].observed += obs;
    cells[cells.length - 1].expected += exp;
  }
  let statistic = 0;
  for (const c of cells) statistic += ((c.observed - c.expected) ** 2) / c.expected;
  return { statistic, critical: chiSquareQuantile(level, cells.length - 1), cells: cells.length };
}

/** Sample mean and variance, and the Monte Carlo SEs of each (variance SE from the fourth central moment). */
export function moments(draws: number[]) {
  const n = draws.length;
  const mean = draws.reduce((a, b) => a + b, 0) / n;
  let m2 = 0;
  let m4 = 0;
  for (const d of draws) { const e = d - mean; m2 += e * e; m4 += e ** 4; }
  const variance = m2 / (n - 1);
  m4 /= n;
  return { mean, variance, meanSe: Math.sqrt(variance / n), varianceSe: Math.sqrt(Math.max(0, m4 - variance * variance) / n) };
}
