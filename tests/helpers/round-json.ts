/**
 * Stable text form of a JSON value for snapshots: numbers rounded to `digits` decimals (so
 * last-bit floating-point differences do not fail a snapshot), -0 written as 0, two-space indent,
 * trailing newline.
 */
export function roundJson(value: unknown, digits = 3): string {
  const scale = 10 ** digits;
  const text = JSON.stringify(
    value,
    (_key, v) => {
      if (typeof v !== 'number' || !Number.isFinite(v)) return v;
      const r = Math.round(v * scale) / scale;
      return Object.is(r, -0) ? 0 : r;
    },
    2,
  );
  return `${text}\n`;
}
