/**
 * One tidy row per (scenario, analysis variant, replicate, parameter) of a simulation study:
 * what the fit of one simulated data set says about one parameter, next to its true value.
 */

export type ReplicateKind = 'fixed' | 'sd' | 'correlation';

export type ReplicateStatus = 'ok' | 'singular' | 'nonconverged' | 'failed' | 'aliased';

export interface ReplicateRow {
  scenario: string;
  variant: string;
  replicate: number;
  parameter: string;
  /** Fixed effect, a standard deviation (random-effect SD or 'residual'), or a correlation of random effects. */
  kind: ReplicateKind;
  /** True value (0 when absent). */
  truth: number;
  /** For kinds 'sd' and 'correlation', se/lower/upper may be NaN when no interval method is available. */
  estimate: number;
  se: number;
  lower: number;
  upper: number;
  df: number;
  /** 'failed' and 'aliased' rows carry NaN estimates. */
  status: ReplicateStatus;
  /** '' unless failed/aliased/nonconverged, or the interval is not available (e.g. df below the floor). */
  reason: string;
}

const REPLICATE_KINDS: readonly ReplicateKind[] = ['fixed', 'sd', 'correlation'];

const REPLICATE_STATUSES: readonly ReplicateStatus[] = [
  'ok',
  'singular',
  'nonconverged',
  'failed',
  'aliased',
];

/** Statuses whose estimates are not used (the row still counts in the share metrics). */
export function isUnusableStatus(status: ReplicateStatus): boolean {
  return status === 'failed' || status === 'aliased';
}

const STRING_FIELDS = ['scenario', 'variant', 'parameter', 'reason'] as const;
const NUMBER_FIELDS = ['truth', 'estimate', 'se', 'lower', 'upper', 'df'] as const;

/**
 * Throws a clear error naming the row index and field when `row` is not a ReplicateRow.
 * NaN is allowed in the numeric fields (missing values); `truth` and `replicate` must be finite.
 */
export function checkReplicateRow(row: unknown, index: number): asserts row is ReplicateRow {
  if (row === null || typeof row !== 'object') {
    throw new Error(`replicate row ${index}: expected an object, got ${row === null ? 'null' : typeof row}`);
  }
  const r = row as Record<string, unknown>;
  for (const field of STRING_FIELDS) {
    if (typeof r[field] !== 'string') {
      throw new Error(`replicate row ${index}: field '${field}' must be a string, got ${describe(r[field])}`);
    }
  }
  for (const field of NUMBER_FIELDS) {
    if (typeof r[field] !== 'number') {
      throw new Error(
        `replicate row ${index}: field '${field}' must be a number (NaN when missing), got ${describe(r[field])}`,
      );
    }
  }
  if (typeof r.replicate !== 'number' || !Number.isFinite(r.replicate)) {
    throw new Error(`replicate row ${index}: field 'replicate' must be a finite number, got ${describe(r.replicate)}`);
  }
  if (!Number.isFinite(r.truth as number)) {
    throw new Error(`replicate row ${index}: field 'truth' must be finite (use 0 when absent), got ${describe(r.truth)}`);
  }
  if (!(REPLICATE_KINDS as readonly unknown[]).includes(r.kind)) {
    throw new Error(`replicate row ${index}: field 'kind' must be one of ${REPLICATE_KINDS.join(', ')}, got ${describe(r.kind)}`);
  }
  if (!(REPLICATE_STATUSES as readonly unknown[]).includes(r.status)) {
    throw new Error(
      `replicate row ${index}: field 'status' must be one of ${REPLICATE_STATUSES.join(', ')}, got ${describe(r.status)}`,
    );
  }
  if ((r.se as number) < 0) {
    throw new Error(`replicate row ${index}: field 'se' must be >= 0 or NaN, got ${r.se}`);
  }
  if ((r.lower as number) > (r.upper as number)) {
    throw new Error(`replicate row ${index}: field 'lower' (${r.lower}) exceeds 'upper' (${r.upper})`);
  }
}

function describe(value: unknown): string {
  if (typeof value === 'string') return `'${value}'`;
  if (typeof value === 'number') return String(value);
  if (value === undefined) return 'undefined (missing)';
  if (value === null) return 'null';
  return typeof value;
}
