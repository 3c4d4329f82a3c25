/**
 * Formats a metric with its Monte Carlo standard error, e.g. formatMetric(0.9432, 0.0071) -> "0.943 (0.007)".
 *
 * Rule: the MCSE is rounded to one significant digit (0.0096 -> 0.01), and the value is rounded
 * to the same decimal place, so no digit is shown that the simulation cannot support
 * (common practice, no source). When that place is left of the decimal point, the value is
 * rounded to it as well: formatMetric(1234.5, 23) -> "1230 (20)".
 * Degenerate inputs: a non-finite value prints as "NA" (or "Inf"/"-Inf"); an MCSE of 0 prints as
 * "(0)" and a non-finite MCSE as "(NA)", with the value then given to 4 significant digits.
 */
export function formatMetric(value: number, mcse: number): string {
  if (!Number.isFinite(value)) return Number.isNaN(value) ? 'NA' : value > 0 ? 'Inf' : '-Inf';
  if (!Number.isFinite(mcse) || mcse < 0) return `${clean(value.toPrecision(4))} (NA)`;
  if (mcse === 0) return `${clean(value.toPrecision(4))} (0)`;
  let exponent = Math.floor(Math.log10(mcse));
  let digit = Math.round(mcse / 10 ** exponent);
  if (digit === 10) {
    digit = 1;
    exponent += 1;
  }
  if (exponent >= 0) {
    const unit = 10 ** exponent;
    return `${clean((Math.round(value / unit) * unit).toFixed(0))} (${(digit * unit).toFixed(0)})`;
  }
  const decimals = -exponent;
  return `${clean(value.toFixed(decimals))} (${(digit * 10 ** exponent).toFixed(decimals)})`;
}

/** Drops the sign of a value that rounds to zero ("-0.000" -> "0.000"). */
function clean(text: string): string {
  return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
}
