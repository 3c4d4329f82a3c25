/** Median of a sample and its distribution-free standard error from order statistics. */

/** 0.975 quantile of the standard normal. */
const Z_975 = 1.959963984540054;

/** Ascending copy of the first `n` values (NaN must have been filtered out by the caller). */
export function sortedCopy(values: Float64Array, n: number = values.length): Float64Array {
  const sorted = values.slice(0, n);
  sorted.sort();
  return sorted;
}

/** Median of an ascending array: middle value, or mean of the two middle values. NaN when empty. */
export function medianOfSorted(sorted: Float64Array): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const mid = n >> 1;
  return n % 2 === 1 ? sorted[mid] : 0.5 * (sorted[mid - 1] + sorted[mid]);
}

export interface MedianStandardError {
  /** Estimated standard error of the sample median; NaN when n < 2. */
  se: number;
  /** 1-based ranks of the order statistics used. */
  lowerRank: number;
  upperRank: number;
  /** True when the two order statistics are equal (ties), so the estimate 0 is only a lower bound. */
  tied: boolean;
}

/**
 * Standard error of the median from the distribution-free order-statistic confidence interval
 * (Conover 1999, Practical Nonparametric Statistics, §3.2): with c = round((n+1)/2 - z sqrt(n/4)),
 * SE = (x_(n-c+1) - x_(c)) / (2 z), z = 1.96 (McKean and Schrader 1984, Commun. Statist.
 * Simul. Comput. 13:751-773). No normality assumed, which matters for SD estimates: they are
 * skewed and pile up at 0 when fits are singular.
 */
export function medianStandardError(sorted: Float64Array): MedianStandardError {
  const n = sorted.length;
  if (n < 2) return { se: NaN, lowerRank: 1, upperRank: n, tied: false };
  const half = Math.floor((n + 1) / 2);
  const c = Math.min(half, Math.max(1, Math.round((n + 1) / 2 - Z_975 * Math.sqrt(n / 4))));
  const lowerRank = c;
  const upperRank = n - c + 1;
  const spread = sorted[upperRank - 1] - sorted[lowerRank - 1];
  return { se: spread / (2 * Z_975), lowerRank, upperRank, tied: spread === 0 };
}
