/**
 * Count, mean and sum of squared deviations in one pass, numerically stable
 * (Welford 1962, Technometrics 4:419-420; Knuth, TAOCP vol. 2, §4.2.2).
 */
export class RunningMoments {
  n = 0;
  mean = 0;
  /** Sum of squared deviations from the running mean. */
  m2 = 0;

  add(x: number): void {
    this.n++;
    const d = x - this.mean;
    this.mean += d / this.n;
    this.m2 += d * (x - this.mean);
  }

  /** Sample variance with divisor n - 1; NaN when n < 2. */
  variance(): number {
    return this.n > 1 ? this.m2 / (this.n - 1) : NaN;
  }

  /** Standard error of the mean, sqrt(variance / n); NaN when n < 2. */
  standardErrorOfMean(): number {
    return Math.sqrt(this.variance() / this.n);
  }
}
