/**
 * Performance of each analysis variant in a simulation study, with Monte Carlo standard errors
 * (MCSE), following Morris, White and Crowther (2019), "Using simulation studies to evaluate
 * statistical methods", Statistics in Medicine 38:2074-2102, Table 6.
 *
 * Pure: rows in, metric rows out. One pass over the rows, grouped by nested Maps on
 * scenario -> variant -> parameter.
 */
import { type ReplicateKind, type ReplicateRow, checkReplicateRow } from './replicate-row';
import {
  FitStatusAccumulator,
  ParameterAccumulator,
  SEVERITY_FAILED,
  SEVERITY_NONCONVERGED,
  SEVERITY_SINGULAR,
} from './metric-accumulators';
import { medianOfSorted, medianStandardError, sortedCopy } from './quantile';

export type MetricName =
  | 'mean'
  | 'bias'
  | 'relativeBias'
  | 'empiricalSE'
  | 'modelSE'
  | 'relativeErrorModelSE'
  | 'rmse'
  | 'coverage'
  | 'width'
  | 'power'
  | 'typeIError'
  | 'sdMean'
  | 'sdMedian'
  | 'sdRMSE'
  | 'singularShare'
  | 'nonconvergedShare'
  | 'failureShare'
  | 'notEstimableShare'
  | 'noIntervalShare';

export interface MetricRow {
  scenario: string;
  variant: string;
  /** Parameter name, or '*' for the per-fit share metrics. */
  parameter: string;
  /** Kind of the parameter, or 'fit' for the share metrics. */
  kind: ReplicateKind | 'fit';
  metric: MetricName;
  value: number;
  /** Monte Carlo standard error of `value`; NaN only when `note` says why. */
  mcse: number;
  /** Replicates used for this metric. */
  n: number;
  /** Target value: `level` for coverage, `alpha` for typeIError. */
  nominal?: number;
  /** Degenerate cases and exclusions that affect this metric. */
  note?: string;
}

export interface SummariseOptions {
  /** Nominal level of the intervals in the rows (default 0.95), reported with coverage. */
  level?: number;
  /**
   * Nominal test size (default 1 - level), reported with typeIError. Rejection is read from the
   * intervals (interval excludes 0), so alpha must equal 1 - level when both are given.
   */
  alpha?: number;
  /**
   * Interval level of each variant by scenario key, then variant name (a variant's own `level`):
   * coverage is compared with it and type I error with 1 − level. Groups not listed use `level`.
   */
  levels?: Record<string, Record<string, number>>;
  /**
   * Variants on another scale than the truth, by scenario key then variant name, with the reason
   * (./variant-scales): their parameters get only power, type I error and noIntervalShare, and
   * every row of theirs carries the reason in its note.
   */
  otherScale?: Record<string, Record<string, string>>;
}

/**
 * Performance metrics per scenario x variant x parameter, plus fit-status shares per
 * scenario x variant (parameter '*', kind 'fit').
 *
 * Rows with status 'failed' or 'aliased' are left out of estimate-based metrics but counted in
 * the shares. A replicate's fit status is its most severe row status (failed > nonconverged >
 * singular > ok). Rows with a NaN/infinite se are left out of modelSE and relativeErrorModelSE;
 * rows with a NaN/infinite interval bound are left out of coverage, width, power and typeIError;
 * `n` is always the number of replicates actually used. A metric with no usable replicate is
 * omitted, never NaN.
 *
 * For kind 'fixed': mean, bias, relativeBias (omitted when truth is 0), empiricalSE, modelSE,
 * relativeErrorModelSE, rmse, coverage, width, and power (truth != 0) or typeIError (truth == 0);
 * noIntervalShare (share of usable replicates with no finite interval) when there are any.
 * For kind 'sd': sdMean, sdMedian, bias, relativeBias, empiricalSE, modelSE,
 * relativeErrorModelSE, sdRMSE, coverage, width. No power/typeIError for SDs: 0 is on the
 * boundary of the parameter space, where "interval excludes 0" is not a valid test.
 * For kind 'correlation': the metrics of kind 'fixed' that its rows allow (no se or interval:
 * mean, bias, empiricalSE, rmse).
 * A parameter with rows of status 'aliased' also gets notEstimableShare (out of the replicates
 * whose fit ran); fit-share rows name the most common reasons of failed fits in their note.
 *
 * Throws, naming the row and field, on malformed rows, on a parameter whose truth or kind
 * changes between rows, and on duplicated replicates.
 */
export function summarise(rows: readonly ReplicateRow[], options: SummariseOptions = {}): MetricRow[] {
  resolveLevels(options);
  if (!Array.isArray(rows)) throw new Error('summarise: rows must be an array of replicate rows');
  const builder = new MetricsBuilder();
  builder.add(rows);
  return builder.result(options);
}

/**
 * The metrics of summarise, built from rows given in pieces (a study streams its batches in, in
 * study order): one pass, nothing kept per row, and the same result as summarise over all rows.
 */
export class MetricsBuilder {
  private readonly byScenario = new Map<string, Map<string, FitStatusAccumulator>>();
  private readonly order: FitStatusAccumulator[] = [];
  private lastGroup: FitStatusAccumulator | undefined;
  private lastParam: ParameterAccumulator | undefined;
  /** Rows added so far (row numbers in messages count from the first row of the first piece). */
  private count = 0;

  add(rows: readonly ReplicateRow[]): void {
    for (let k = 0; k < rows.length; k++) {
      const row = rows[k];
      const i = this.count++;
      checkReplicateRow(row, i);
      let group = this.lastGroup;
      if (group === undefined || group.scenario !== row.scenario || group.variant !== row.variant) {
        let byVariant = this.byScenario.get(row.scenario);
        if (byVariant === undefined) {
          byVariant = new Map();
          this.byScenario.set(row.scenario, byVariant);
        }
        group = byVariant.get(row.variant);
        if (group === undefined) {
          group = new FitStatusAccumulator(row.scenario, row.variant);
          byVariant.set(row.variant, group);
          this.order.push(group);
        }
        this.lastGroup = group;
        this.lastParam = undefined;
      }
      let param = this.lastParam;
      if (param === undefined || param.parameter !== row.parameter) {
        param = group.parameters.get(row.parameter);
        if (param === undefined) {
          param = new ParameterAccumulator(row.scenario, row.variant, row.parameter, row.kind, row.truth, i);
          group.parameters.set(row.parameter, param);
          group.parameterOrder.push(param);
        }
        this.lastParam = param;
      }
      group.add(row.replicate, row.status, row.reason);
      param.add(row, i);
    }
  }

  /** The metric rows of everything added (see summarise). */
  result(options: SummariseOptions = {}): MetricRow[] {
    const { level, alpha } = resolveLevels(options);
    for (const group of this.order) {
      for (const p of group.parameterOrder) {
        if (p.rows > group.replicates) {
          throw new Error(
            `summarise: ${p.describe()} has ${p.rows} rows but the scenario and variant have only ` +
              `${group.replicates} distinct replicates; expected at most one row per replicate and parameter`,
          );
        }
      }
    }
    const out: MetricRow[] = [];
    for (const group of this.order) {
      const start = out.length;
      appendShareMetrics(out, group);
      const own = options.levels?.[group.scenario]?.[group.variant];
      if (own !== undefined && !(own > 0 && own < 1)) {
        throw new Error(`summarise: options.levels for scenario '${group.scenario}', variant '${group.variant}' must lie strictly between 0 and 1, got ${own}`);
      }
      const scaleNote = options.otherScale?.[group.scenario]?.[group.variant];
      if (scaleNote !== undefined) for (let i = start; i < out.length; i++) out[i].note = joinNotes(scaleNote, out[i].note);
      for (const p of group.parameterOrder) {
        appendParameterMetrics(out, p, own ?? level, own === undefined ? alpha : 1 - own, scaleNote);
      }
    }
    return out;
  }
}

function resolveLevels(options: SummariseOptions): { level: number; alpha: number } {
  const { level, alpha } = options;
  for (const [name, v] of [
    ['level', level],
    ['alpha', alpha],
  ] as const) {
    if (v !== undefined && !(typeof v === 'number' && v > 0 && v < 1)) {
      throw new Error(`summarise: options.${name} must be a number strictly between 0 and 1, got ${String(v)}`);
    }
  }
  if (level !== undefined && alpha !== undefined && Math.abs(alpha - (1 - level)) > 1e-12) {
    throw new Error(
      `summarise: options.alpha (${alpha}) must equal 1 - options.level (${level}): ` +
        'power and type I error are read from the intervals',
    );
  }
  if (level !== undefined) return { level, alpha: 1 - level };
  if (alpha !== undefined) return { level: 1 - alpha, alpha };
  return { level: 0.95, alpha: 0.05 };
}

/** Binomial MCSE of a proportion, sqrt(p(1-p)/n) (Morris et al. 2019, Table 6, coverage and power). */
function proportionMcse(p: number, n: number): number {
  return Math.sqrt((p * (1 - p)) / n);
}

const BOUNDARY_NOTE = 'proportion is 0 or 1: binomial MCSE is 0';

function proportionRow(base: RowBase, metric: MetricName, count: number, n: number, nominal?: number): MetricRow {
  const value = count / n;
  const row: MetricRow = { ...base, metric, value, mcse: proportionMcse(value, n), n };
  if (nominal !== undefined) row.nominal = nominal;
  if (count === 0 || count === n) row.note = BOUNDARY_NOTE;
  return row;
}

/** Failure reasons named in the note of a failureShare row. */
const MAX_REASONS = 3;
const FAILURE_REASONS_PREFIX = 'most common reasons: ';

type RowBase = Pick<MetricRow, 'scenario' | 'variant' | 'parameter' | 'kind'>;

function appendShareMetrics(out: MetricRow[], group: FitStatusAccumulator): void {
  const n = group.replicates;
  if (n === 0) return;
  const base: RowBase = { scenario: group.scenario, variant: group.variant, parameter: '*', kind: 'fit' };
  out.push(proportionRow(base, 'singularShare', group.countAt(SEVERITY_SINGULAR), n));
  out.push(proportionRow(base, 'nonconvergedShare', group.countAt(SEVERITY_NONCONVERGED), n));
  const failed = proportionRow(base, 'failureShare', group.countAt(SEVERITY_FAILED), n);
  if (failed.value > 0) {
    const reasons = group.failureReasons();
    const shown = reasons.slice(0, MAX_REASONS).map(([reason, count]) => `${reason} (${count})`).join('; ');
    const more = reasons.length > MAX_REASONS ? `; ${reasons.length - MAX_REASONS} other reason(s)` : '';
    failed.note = joinNotes(failed.note, `${FAILURE_REASONS_PREFIX}${shown}${more}`);
  }
  out.push(failed);
}

function formatShare(x: number): string {
  return `${(100 * x).toFixed(x < 0.01 ? 2 : 1)}%`;
}

function joinNotes(...notes: (string | undefined)[]): string | undefined {
  const kept = notes.filter((s): s is string => s !== undefined && s !== '');
  return kept.length === 0 ? undefined : kept.join('; ');
}

function push(
  out: MetricRow[],
  base: RowBase,
  metric: MetricName,
  value: number,
  mcse: number,
  n: number,
  note?: string,
): void {
  const row: MetricRow = { ...base, metric, value, mcse, n };
  if (note !== undefined) row.note = note;
  out.push(row);
}

function appendParameterMetrics(out: MetricRow[], p: ParameterAccumulator, level: number, alpha: number, scaleNote?: string): void {
  const base: RowBase = { scenario: p.scenario, variant: p.variant, parameter: p.parameter, kind: p.kind };
  // A coefficient the variant cannot estimate (aliased) keeps a row saying so, whatever else is missing.
  let aliasedNote: string | undefined;
  if (p.aliased > 0) {
    // out of the replicates whose fit ran (a failed fit says nothing about estimability)
    const fitted = p.rows - (p.unusable - p.aliased);
    const share = proportionRow(base, 'notEstimableShare', p.aliased, fitted);
    share.note = p.aliased === fitted
      ? 'not estimable: aliased with other columns in every replicate'
      : `not estimable (aliased) in ${p.aliased} of ${fitted} replicates`;
    out.push(share);
    if (p.aliased < fitted) {
      aliasedNote = `not estimable in ${p.aliased} of ${fitted} replicates (${formatShare(p.aliased / fitted)}): metrics use the others`;
    }
  }
  const n = p.estimate.n;
  const nonFinite =
    p.nonFiniteEstimates > 0
      ? `${p.nonFiniteEstimates} row(s) with status ok/singular/nonconverged but a non-finite estimate excluded`
      : undefined;
  const excluded = joinNotes(aliasedNote, nonFinite);
  if (n === 0) return;
  const fewNote = n < 2 ? 'n < 2: MCSE needs at least 2 replicates' : undefined;
  const estNote = joinNotes(excluded, fewNote);
  const isSd = p.kind === 'sd';
  if (scaleNote !== undefined) {
    appendTestMetrics(out, base, p, alpha, joinNotes(scaleNote, excluded));
    return;
  }

  // One empirical SE for every metric that uses it: the spread of estimate − truth, which is
  // Morris et al.'s EmpSE when the truth is fixed and, when the target varies by replicate
  // (realised effects), the spread of the estimates around their own targets.
  const empSE = Math.sqrt(p.error.variance());
  // Mean of the estimates: MCSE from their own spread. Bias: MCSE EmpSE/sqrt(n) (Morris et al. 2019, Table 6).
  const meanMcse = p.estimate.standardErrorOfMean();
  const biasMcse = p.error.standardErrorOfMean();
  const bias = p.error.mean;
  const truth = p.truthVaries ? p.truths.mean : p.truth;
  const variesNote = p.truthVaries ? 'target varies by replicate (realised effects): bias, EmpSE and coverage use each replicate\'s truth' : undefined;
  push(out, base, isSd ? 'sdMean' : 'mean', p.estimate.mean, meanMcse, n, estNote);

  if (isSd) {
    const sorted = sortedCopy(p.values, p.valueCount);
    const median = medianStandardError(sorted);
    const tiedNote = median.tied
      ? `order statistics ${median.lowerRank} and ${median.upperRank} are tied: MCSE 0 is a lower bound`
      : undefined;
    push(out, base, 'sdMedian', medianOfSorted(sorted), median.se, n, joinNotes(excluded, fewNote, tiedNote));
  }

  const truthZeroNote = truth === 0 ? 'truth is 0: relativeBias omitted' : undefined;
  push(out, base, 'bias', bias, biasMcse, n, joinNotes(estNote, truthZeroNote, variesNote));
  if (truth !== 0 && !p.truthVaries) {
    // Relative bias (Morris et al. 2019, §5.2): bias and its MCSE both divided by |truth|.
    push(out, base, 'relativeBias', bias / truth, biasMcse / Math.abs(truth), n, estNote);
  }

  // EmpSE and its MCSE EmpSE/sqrt(2(n-1)): Morris et al. 2019, Table 6.
  if (n >= 2) push(out, base, 'empiricalSE', empSE, empSE / Math.sqrt(2 * (n - 1)), n, excluded);

  appendModelSEMetrics(out, base, p, excluded);

  // MSE with MCSE sqrt(sum ((est_i - truth)^2 - MSE)^2 / (n(n-1))) (Morris et al. 2019, Table 6);
  // RMSE = sqrt(MSE) with the delta method: MCSE(RMSE) = MCSE(MSE) / (2 RMSE).
  const mse = p.squaredError.mean;
  const rmse = Math.sqrt(mse);
  const mseMcse = p.squaredError.standardErrorOfMean();
  const rmseMcse = rmse > 0 ? mseMcse / (2 * rmse) : NaN;
  const rmseNote = rmse === 0 ? 'RMSE is 0: delta-method MCSE undefined' : undefined;
  push(out, base, isSd ? 'sdRMSE' : 'rmse', rmse, rmseMcse, n, joinNotes(estNote, rmseNote));

  const k = p.width.n;
  if (p.missingInterval > 0 && (p.kind === 'fixed' || k > 0)) {
    // usable estimates without an interval (e.g. df below the floor): their own share, never counted as covered
    const share = proportionRow(base, 'noIntervalShare', p.missingInterval, n);
    share.note = joinNotes('replicates whose fit gave no finite interval; left out of coverage, width and power', share.note);
    out.push(share);
  }
  if (k > 0) {
    const intervalNote =
      p.missingInterval > 0 ? `${p.missingInterval} row(s) without a finite interval excluded` : undefined;
    const cov = proportionRow(base, 'coverage', p.covered, k, level);
    cov.note = joinNotes(excluded, intervalNote, cov.note);
    out.push(cov);
    // Mean interval width; MCSE of a mean, as for bias in Morris et al. 2019, Table 6.
    push(
      out,
      base,
      'width',
      p.width.mean,
      p.width.standardErrorOfMean(),
      k,
      joinNotes(excluded, intervalNote, k < 2 ? 'n < 2: MCSE needs at least 2 replicates' : undefined),
    );
    if (!isSd) {
      // Rejection rate (interval excludes 0), binomial MCSE: Morris et al. 2019, Table 6, power.
      const rej =
        truth === 0 && !p.truthVaries
          ? proportionRow(base, 'typeIError', p.excludesZero, k, alpha)
          : proportionRow(base, 'power', p.excludesZero, k);
      rej.note = joinNotes(excluded, intervalNote, rej.note);
      out.push(rej);
    }
  }
}

/** Only the test-based metrics (power or type I error, and the share without an interval) of a variant on another scale. */
function appendTestMetrics(out: MetricRow[], base: RowBase, p: ParameterAccumulator, alpha: number, note: string | undefined): void {
  if (p.kind !== 'fixed') return;
  const n = p.estimate.n;
  if (p.missingInterval > 0) {
    const share = proportionRow(base, 'noIntervalShare', p.missingInterval, n);
    share.note = joinNotes(note, 'replicates whose fit gave no finite interval; left out of power', share.note);
    out.push(share);
  }
  const k = p.width.n;
  if (k === 0) return;
  const truth = p.truthVaries ? p.truths.mean : p.truth;
  const rej = truth === 0 && !p.truthVaries
    ? proportionRow(base, 'typeIError', p.excludesZero, k, alpha)
    : proportionRow(base, 'power', p.excludesZero, k);
  rej.note = joinNotes(note, rej.note);
  out.push(rej);
}

function appendModelSEMetrics(out: MetricRow[], base: RowBase, p: ParameterAccumulator, excluded?: string): void {
  const m = p.seSquared.n;
  if (m === 0) return;
  const seNote = p.missingSe > 0 ? `${p.missingSe} row(s) without a finite se excluded` : undefined;
  // Average ModSE = sqrt(mean se^2); MCSE sqrt(Var(se^2) / (4 m ModSE^2)): Morris et al. 2019, Table 6.
  const modSE = Math.sqrt(p.seSquared.mean);
  const varSeSq = p.seSquared.variance();
  let modNote: string | undefined;
  let modMcse = NaN;
  if (m < 2) modNote = 'n < 2: MCSE needs at least 2 replicates';
  else if (modSE === 0) modNote = 'ModSE is 0: delta-method MCSE undefined';
  else modMcse = Math.sqrt(varSeSq / (4 * m * modSE * modSE));
  push(out, base, 'modelSE', modSE, modMcse, m, joinNotes(excluded, seNote, modNote));

  // Relative % error in ModSE = 100 (ModSE/EmpSE - 1), with MCSE
  // 100 (ModSE/EmpSE) sqrt(Var(se^2) / (4 m ModSE^4) + 1/(2(m-1))): Morris et al. 2019, Table 6.
  // EmpSE is taken over the same m replicates as ModSE, as the spread of estimate − truth.
  if (m < 2) return;
  const empSE = Math.sqrt(p.errorWithSe.variance());
  if (!(empSE > 0)) {
    const last = out[out.length - 1];
    last.note = joinNotes(last.note, 'EmpSE is 0: relativeErrorModelSE omitted');
    return;
  }
  const ratio = modSE / empSE;
  const relMcse =
    modSE > 0 ? 100 * ratio * Math.sqrt(varSeSq / (4 * m * modSE ** 4) + 1 / (2 * (m - 1))) : NaN;
  push(out, base, 'relativeErrorModelSE', 100 * (ratio - 1), relMcse, m, joinNotes(excluded, seNote, modNote));
}

export { formatMetric } from './format-metric';
