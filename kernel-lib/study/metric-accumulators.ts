/**
 * One-pass accumulators behind the study metrics: one per (scenario, variant, parameter) and
 * one per (scenario, variant) for fit statuses. Adding a row allocates nothing except when the
 * SD-estimate buffer (kept for the median) doubles.
 */
import { RunningMoments } from './running-moments';
import { type ReplicateKind, type ReplicateRow, type ReplicateStatus, isUnusableStatus } from './replicate-row';

export class ParameterAccumulator {
  /** All rows of the group, usable or not. */
  rows = 0;
  /** Rows dropped from estimate-based metrics because of status 'failed' or 'aliased'. */
  unusable = 0;
  /** Of those, rows whose coefficient was not estimable (status 'aliased'). */
  aliased = 0;
  /** Rows with a usable status but a non-finite estimate (also dropped, and reported). */
  nonFiniteEstimates = 0;
  /** Usable estimates whose se is NaN or infinite (dropped from modelSE only). */
  missingSe = 0;
  /** Usable estimates whose interval has a NaN or infinite bound (dropped from interval metrics). */
  missingInterval = 0;

  readonly estimate = new RunningMoments();
  /** estimate − truth per row (the truth may vary per replicate). */
  readonly error = new RunningMoments();
  /** Truth per usable row. */
  readonly truths = new RunningMoments();
  /** Whether rows of this group carry different truths (realised-effect targets). */
  truthVaries = false;
  /** Squared error (estimate - truth)^2, whose mean is the MSE. */
  readonly squaredError = new RunningMoments();
  /** se^2 over rows with finite estimate and se. */
  readonly seSquared = new RunningMoments();
  /** estimate − truth over the same rows as seSquared, so ModSE and EmpSE share their replicates. */
  readonly errorWithSe = new RunningMoments();
  readonly width = new RunningMoments();
  covered = 0;
  excludesZero = 0;

  /** Usable estimates, kept only for kind 'sd' (median). */
  values: Float64Array;
  valueCount = 0;

  constructor(
    readonly scenario: string,
    readonly variant: string,
    readonly parameter: string,
    readonly kind: ReplicateKind,
    readonly truth: number,
    /** Index of the first input row of the group, for error messages. */
    readonly firstRow: number,
  ) {
    this.values = new Float64Array(kind === 'sd' ? 64 : 0);
  }

  add(row: ReplicateRow, index: number): void {
    if (row.kind !== this.kind) {
      throw new Error(
        `replicate row ${index}: field 'kind' is '${row.kind}' but row ${this.firstRow} of ` +
          `${this.describe()} has '${this.kind}'; expected one kind per parameter`,
      );
    }
    if (!Number.isFinite(row.truth)) {
      throw new Error(`replicate row ${index}: field 'truth' must be a finite number, got ${row.truth} (${this.describe()})`);
    }
    // A coefficient of a random factor entered as fixed estimates this replicate's realised effects,
    // so its target moves from replicate to replicate: errors are then taken against each row's truth.
    if (row.truth !== this.truth) this.truthVaries = true;
    this.rows++;
    if (isUnusableStatus(row.status)) {
      this.unusable++;
      if (row.status === 'aliased') this.aliased++;
      return;
    }
    const est = row.estimate;
    if (!Number.isFinite(est)) {
      this.nonFiniteEstimates++;
      return;
    }
    this.estimate.add(est);
    const truth = row.truth;
    this.truths.add(truth);
    const err = est - truth;
    this.error.add(err);
    this.squaredError.add(err * err);
    if (this.kind === 'sd') this.pushValue(est);

    const se = row.se;
    if (Number.isFinite(se)) {
      this.seSquared.add(se * se);
      this.errorWithSe.add(err);
    } else {
      this.missingSe++;
    }

    const lo = row.lower;
    const hi = row.upper;
    if (Number.isFinite(lo) && Number.isFinite(hi)) {
      this.width.add(hi - lo);
      if (lo <= truth && truth <= hi) this.covered++;
      if (lo > 0 || hi < 0) this.excludesZero++;
    } else {
      this.missingInterval++;
    }
  }

  describe(): string {
    return `scenario '${this.scenario}', variant '${this.variant}', parameter '${this.parameter}'`;
  }

  private pushValue(x: number): void {
    if (this.valueCount === this.values.length) {
      const grown = new Float64Array(Math.max(64, this.values.length * 2));
      grown.set(this.values);
      this.values = grown;
    }
    this.values[this.valueCount++] = x;
  }
}

/** Severity order used to give each replicate one fit status; 'aliased' concerns one parameter, not the fit. */
const SEVERITY: Record<ReplicateStatus, number> = {
  ok: 0,
  aliased: 0,
  singular: 1,
  nonconverged: 2,
  failed: 3,
};

export const SEVERITY_SINGULAR = SEVERITY.singular;
export const SEVERITY_NONCONVERGED = SEVERITY.nonconverged;
export const SEVERITY_FAILED = SEVERITY.failed;

/**
 * Fit status per replicate of one (scenario, variant): the most severe status among the
 * replicate's rows (failed > nonconverged > singular > ok).
 */
export class FitStatusAccumulator {
  readonly parameters = new Map<string, ParameterAccumulator>();
  /** Parameters in first-seen order. */
  readonly parameterOrder: ParameterAccumulator[] = [];
  private readonly severity = new Map<number, number>();
  /** Reason of the first failed row of each failed replicate. */
  private readonly failReason = new Map<number, string>();
  // Rows of one replicate usually arrive together: skip the map while nothing changes.
  private lastReplicate = NaN;
  private lastSeverity = -1;

  constructor(readonly scenario: string, readonly variant: string) {}

  add(replicate: number, status: ReplicateStatus, reason = ''): void {
    const s = SEVERITY[status];
    if (s === SEVERITY.failed && !this.failReason.has(replicate)) this.failReason.set(replicate, reason || 'no reason given');
    if (replicate === this.lastReplicate && s <= this.lastSeverity) return;
    const previous = this.severity.get(replicate);
    const next = previous === undefined || s > previous ? s : previous;
    if (next !== previous) this.severity.set(replicate, next);
    this.lastReplicate = replicate;
    this.lastSeverity = next;
  }

  get replicates(): number {
    return this.severity.size;
  }

  /** Reasons of failed replicates with their counts, most common first (ties in first-seen order). */
  failureReasons(): [string, number][] {
    const counts = new Map<string, number>();
    for (const reason of this.failReason.values()) counts.set(reason, (counts.get(reason) ?? 0) + 1);
    return [...counts].sort((a, b) => b[1] - a[1]);
  }

  /** Number of replicates whose fit status is exactly `severity`. */
  countAt(severity: number): number {
    let count = 0;
    for (const s of this.severity.values()) if (s === severity) count++;
    return count;
  }
}
