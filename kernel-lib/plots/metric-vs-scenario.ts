/**
 * One performance metric of a simulation study against a scenario field, one colour per
 * analysis variant, with Monte Carlo error bars.
 */
import type { MetricName, MetricRow } from '../study/metrics';
import { BAND_COLOUR, REFERENCE_COLOUR } from './theme';
import type { FieldTitles, InlineRow, LayerPart, VegaLiteSpec } from './types';
import { type FacetField, ONE_PER_CELL, layeredSpec } from './layout';
import {
  type KeyOrder,
  checkArray,
  checkFieldOption,
  checkFieldTitles,
  checkOptionsObject,
  checkRowObject,
  describeValue,
  distinctInOrder,
  fail,
  fieldRef,
  fieldTitle,
  jsonNumber,
  keyColumn,
  plural,
  positiveOption,
  quoteList,
  readKey,
  readNumber,
  readString,
  stringOption,
  variantColour,
  variantOrder,
  variantShape,
} from './plot-input';

const BUILDER = 'metricVsScenario';

/** Error bars span value ± MC_MULTIPLIER × MCSE (common practice, no source). */
const MC_MULTIPLIER = 2;

type Reference = 'nominal band' | 'nominal' | 'zero' | 'none';

interface MetricInfo {
  /** Short name for titles and the axis. */
  name: string;
  /** One plain sentence saying what the metric is, shown under the title. */
  meaning: string;
  reference: Reference;
}

// Record<MetricName, …> makes the compiler flag a metric added to the study module but not here.
const METRICS: Record<MetricName, MetricInfo> = {
  mean: { name: 'Mean estimate', meaning: 'Mean estimate: average of the estimates over replicates.', reference: 'none' },
  bias: { name: 'Bias', meaning: 'Bias: mean estimate minus the true value.', reference: 'zero' },
  relativeBias: { name: 'Relative bias', meaning: 'Relative bias: bias divided by the true value.', reference: 'zero' },
  empiricalSE: { name: 'Empirical SE', meaning: 'Empirical SE: standard deviation of estimate minus true value over replicates.', reference: 'none' },
  modelSE: { name: 'Model SE', meaning: 'Model SE: root mean square of the standard errors the fits report.', reference: 'none' },
  relativeErrorModelSE: {
    name: 'Relative error of model SE (%)',
    meaning: 'Relative error of model SE: 100 × (model SE ÷ empirical SE − 1).',
    reference: 'zero',
  },
  rmse: { name: 'RMSE', meaning: 'RMSE: root mean squared difference between estimate and true value.', reference: 'none' },
  coverage: { name: 'Coverage', meaning: 'Coverage: share of intervals that contain the true value.', reference: 'nominal band' },
  width: { name: 'Interval width', meaning: 'Interval width: mean width of the intervals.', reference: 'none' },
  power: { name: 'Power', meaning: 'Power: share of intervals that exclude 0 when the true value is not 0.', reference: 'nominal' },
  typeIError: {
    name: 'Type I error rate',
    meaning: 'Type I error rate: share of intervals that exclude 0 when the true value is 0.',
    reference: 'nominal band',
  },
  sdMean: { name: 'Mean SD estimate', meaning: 'Mean SD estimate: average of the estimated standard deviations.', reference: 'none' },
  sdMedian: { name: 'Median SD estimate', meaning: 'Median SD estimate: median of the estimated standard deviations.', reference: 'none' },
  sdRMSE: { name: 'RMSE of the SD', meaning: 'RMSE of the SD: root mean squared error of the estimated standard deviation.', reference: 'none' },
  singularShare: { name: 'Share of singular fits', meaning: 'Share of singular fits: fits with a variance estimated as 0.', reference: 'none' },
  nonconvergedShare: {
    name: 'Share of non-converged fits',
    meaning: 'Share of non-converged fits: fits whose optimiser stopped before converging.',
    reference: 'none',
  },
  failureShare: { name: 'Share of failed fits', meaning: 'Share of failed fits: fits that produced no estimates.', reference: 'none' },
  notEstimableShare: {
    name: 'Share not estimable',
    meaning: 'Share not estimable: replicates where the coefficient was aliased with other columns.',
    reference: 'none',
  },
  noIntervalShare: {
    name: 'Share without an interval',
    meaning: 'Share without an interval: fits that gave an estimate but no finite interval (e.g. df below the floor); never counted as covered.',
    reference: 'none',
  },
};

/** Metric names the builder accepts (every metric the study summary produces). */
const PLOTTABLE_METRICS = Object.keys(METRICS) as MetricName[];

/** Proportions drawn on a fixed 0–1 axis (coverage and type I error zoom in on their nominal level instead). */
const WHOLE_RANGE_METRICS: readonly MetricName[] = ['power', 'singularShare', 'nonconvergedShare', 'failureShare', 'notEstimableShare', 'noIntervalShare'];

/** Fields the builder adds to each data row; scenario fields must not use these names. */
const COMPUTED_FIELDS = ['value', 'mcse', 'n', 'mcLower', 'mcUpper', 'bandLower', 'bandUpper', 'note'];

export interface MetricVsScenarioOptions {
  /** Metric to plot (required): one of PLOTTABLE_METRICS, e.g. 'coverage', 'bias', 'rmse', 'power'. */
  metric: MetricName;
  /** Scenario field on the x axis (required), e.g. 'levels'. Numbers are placed in ascending order, strings as they first appear. */
  x: string;
  /** Scenario field whose values become columns of panels. Default: no column facet. */
  facet?: string;
  /** Scenario field whose values become rows of panels. Default: no row facet. */
  facetRow?: string;
  /** Keep only these parameters. Default: every parameter in the rows (which must then be one, or a facet field). */
  parameter?: string | readonly string[];
  /**
   * Target value: the interval level for coverage, alpha for type I error, a target power.
   * Default: the rows' `nominal` field (coverage and type I error rows carry it).
   */
  nominal?: number;
  /** Variant order, which fixes colours across plots. Default: variant names sorted. */
  variants?: readonly string[];
  /** Connect a variant's points across x. Default: true when every x value is a number. */
  lines?: boolean;
  /** Display names for fields on axes and headers. Default: the field names. */
  fieldTitles?: FieldTitles;
  /** Chart title. Default: "<metric> of '<parameter>' by <x title>". */
  title?: string;
  /** Width of one panel in pixels. Default 260. */
  width?: number;
  /** Height of one panel in pixels. Default 200. */
  height?: number;
}

/**
 * One metric against a scenario field: points (and lines) per variant, error bars
 * value ± 2 × MCSE; for coverage and type I error a band nominal ± 2·sqrt(p(1−p)/n) with p the
 * nominal level and n each row's replicate count, drawn at each x as the widest band among the
 * variants there, and a dashed rule at the nominal level; for bias-type metrics a rule at 0.
 *
 * `metrics` are MetricRow objects that also carry their scenario fields (e.g. `levels`, `perCell`),
 * typically the study summary joined with the scenario grid.
 *
 * Throws, naming the option, row and field, on an unknown metric, a missing scenario field, no
 * rows left after filtering, or two rows that would draw the same point (they differ in a field
 * not on the plot: filter them or facet by it).
 *
 * @example metricVsScenario(rows, { metric: 'coverage', x: 'levels', facet: 'perCell' })
 */
export function metricVsScenario<R extends MetricRow>(
  metrics: readonly R[],
  options: MetricVsScenarioOptions,
): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  const metric = options.metric;
  if (typeof metric !== 'string' || !Object.prototype.hasOwnProperty.call(METRICS, metric)) {
    fail(BUILDER, `options.metric must be one of ${quoteList(PLOTTABLE_METRICS)}, got ${describeValue(metric)}`);
  }
  const info = METRICS[metric];
  const positional = checkPositionalFields(options);
  const titles = checkFieldTitles(options.fieldTitles, BUILDER);
  const width = positiveOption(options.width, 'width', BUILDER, 260);
  const height = positiveOption(options.height, 'height', BUILDER, 200);
  const titleOption = stringOption(options.title, 'title', BUILDER);
  if (options.lines !== undefined && typeof options.lines !== 'boolean') {
    fail(BUILDER, `options.lines must be true or false, got ${describeValue(options.lines)}`);
  }

  checkArray(metrics, 'metrics', BUILDER);
  const kept = selectRows(metrics, metric, options.parameter);
  const nominal = resolveNominal(kept, info, metric, options.nominal);
  const band = info.reference === 'nominal band' && nominal !== undefined;

  const columns = new Map<string, { keys: (string | number)[]; order: KeyOrder }>();
  for (const field of positional) {
    columns.set(field, keyColumn(kept.map(({ row, index }) => readKey(row, field, index, BUILDER))));
  }
  checkOnePointPerCell(kept, positional, columns);

  const variants = variantOrder(
    kept.map((k) => k.row.variant as string),
    options.variants,
    BUILDER,
  );
  // colours follow the full variant order; the legend and the offsets list the variants drawn here
  const drawn = new Set(kept.map((k) => k.row.variant));
  const present = variants.filter((v) => drawn.has(v));
  let missingMcse = 0;
  const values: InlineRow[] = kept.map(({ row, index }, i) => {
    const value = readNumber(row, 'value', index, BUILDER);
    const mcse = readNumber(row, 'mcse', index, BUILDER);
    const n = readNumber(row, 'n', index, BUILDER);
    const out: InlineRow = {
      scenario: typeof row.scenario === 'string' ? row.scenario : null,
      variant: row.variant as string,
      parameter: row.parameter as string,
    };
    for (const field of positional) out[field] = columns.get(field)!.keys[i];
    const hasBar = Number.isFinite(value) && Number.isFinite(mcse);
    if (!hasBar) missingMcse++;
    out.value = jsonNumber(value);
    out.mcse = jsonNumber(mcse);
    out.n = jsonNumber(n);
    out.mcLower = hasBar ? value - MC_MULTIPLIER * mcse : null;
    out.mcUpper = hasBar ? value + MC_MULTIPLIER * mcse : null;
    if (band) {
      if (!(Number.isInteger(n) && n > 0)) {
        fail(BUILDER, `row ${index}: field 'n' must be a positive whole number of replicates, got ${describeValue(n)}`);
      }
      const halfWidth = MC_MULTIPLIER * binomialMcse(nominal, n);
      out.bandLower = nominal - halfWidth;
      out.bandUpper = nominal + halfWidth;
    }
    out.note = typeof row.note === 'string' ? row.note : null;
    return out;
  });

  const [x, facet, facetRow] = [options.x, options.facet, options.facetRow];
  const xOrder = columns.get(x)!.order;
  const lines = options.lines ?? (xOrder as (string | number)[]).every((v) => typeof v === 'number');
  const xTitle = fieldTitle(x, titles);
  const parameters = distinctInOrder(kept.map((k) => k.row.parameter as string));

  const xEncoding = {
    field: fieldRef(x),
    type: 'ordinal' as const,
    title: xTitle,
    sort: xOrder,
    scale: { type: 'band' as const, paddingInner: 0.25, paddingOuter: 0.15 },
    axis: { labelAngle: 0 },
  };
  const xOffset = { field: 'variant', type: 'nominal' as const, scale: { domain: present } };
  // Shares read against their whole range, so power of 1 everywhere looks like 1, not like a flat line at an arbitrary height.
  const y = {
    field: 'value',
    type: 'quantitative' as const,
    title: info.name,
    scale: WHOLE_RANGE_METRICS.includes(metric) ? { domain: [0, 1], clamp: true } : { zero: false },
  };
  const colour = variantColour(variants, 'Analysis variant', present);
  const tooltip = [
    { field: 'variant', type: 'nominal' as const, title: 'Variant' },
    ...positional.map((f) => ({ field: fieldRef(f), type: 'ordinal' as const, title: fieldTitle(f, titles) })),
    { field: 'parameter', type: 'nominal' as const, title: 'Parameter' },
    { field: 'value', type: 'quantitative' as const, title: info.name, format: '.4~g' },
    { field: 'mcse', type: 'quantitative' as const, title: 'Monte Carlo SE', format: '.2~g' },
    { field: 'n', type: 'quantitative' as const, title: 'Replicates' },
    { field: 'note', type: 'nominal' as const, title: 'Note' },
  ];

  const layers: LayerPart[] = [];
  if (band) {
    const groupby = positional.map(fieldRef);
    layers.push({
      name: 'nominal_band',
      transform: [
        {
          aggregate: [
            { op: 'min', field: 'bandLower', as: 'bandLower' },
            { op: 'max', field: 'bandUpper', as: 'bandUpper' },
          ],
          groupby,
        },
      ],
      mark: { type: 'rect', color: BAND_COLOUR, opacity: 0.6 },
      encoding: {
        x: xEncoding,
        y: { field: 'bandLower', type: 'quantitative', title: info.name },
        y2: { field: 'bandUpper' },
      },
    });
  }
  const referenceValue = info.reference === 'zero' ? 0 : nominal;
  if (referenceValue !== undefined) {
    layers.push({
      name: 'reference_rule',
      transform: ONE_PER_CELL,
      mark: { type: 'rule', color: REFERENCE_COLOUR, strokeDash: [4, 3], strokeWidth: 1 },
      encoding: { y: { datum: referenceValue, type: 'quantitative' } },
    });
  }
  // A layer with no drawable row would leave its fields with an empty (infinite) extent.
  if (missingMcse < values.length) {
    layers.push({
      name: 'mc_error_bars',
      transform: [{ filter: 'isValid(datum.mcLower) && isValid(datum.mcUpper)' }],
      mark: { type: 'rule', strokeWidth: 1.5 },
      encoding: {
        x: xEncoding,
        xOffset,
        y: { field: 'mcLower', type: 'quantitative', title: info.name },
        y2: { field: 'mcUpper' },
        color: colour,
      },
    });
  }
  if (lines) {
    layers.push({
      name: 'variant_lines',
      mark: { type: 'line', strokeWidth: 1.2, opacity: 0.7 },
      encoding: { x: xEncoding, xOffset, y, color: colour },
    });
  }
  layers.push({
    name: 'metric_points',
    mark: { type: 'point', filled: true, size: 45, opacity: 1 },
    encoding: { x: xEncoding, xOffset, y, color: colour, shape: variantShape(variants, 'Analysis variant', present), tooltip },
  });

  const subtitle = [info.meaning, `Points: one per analysis variant; bars: ± ${MC_MULTIPLIER} × Monte Carlo SE.`];
  if (band) {
    subtitle.push(
      `Grey band: nominal ${nominal} ± ${MC_MULTIPLIER} × sqrt(p(1 − p)/n), p = ${nominal}, n = replicates; ` +
        `dashed line: nominal ${nominal}.`,
    );
  } else if (info.reference === 'zero') {
    subtitle.push('Dashed line: 0.');
  } else if (referenceValue !== undefined) {
    subtitle.push(`Dashed line: target ${referenceValue}.`);
  }
  const constant = constantValue(values);
  if (constant !== undefined) subtitle.push(constantNote(metric, info, constant));
  if (missingMcse > 0) {
    subtitle.push(`${plural(missingMcse, 'point has', 'points have')} no Monte Carlo SE (see the note in its tooltip).`);
  }
  const about = parameters.length === 1 && parameters[0] !== '*' ? ` of '${parameters[0]}'` : '';
  const facetField = (field: string | undefined): FacetField | undefined =>
    field === undefined ? undefined : { field, title: fieldTitle(field, titles), order: columns.get(field)!.order };

  return layeredSpec({
    title: titleOption ?? `${info.name}${about} by ${xTitle}`,
    subtitle,
    values,
    width,
    height,
    layers,
    column: facetField(facet),
    row: facetField(facetRow),
  });
}

/** Every finite value of the chart when they are all the same (e.g. power 1 everywhere), else undefined. */
function constantValue(values: readonly InlineRow[]): number | undefined {
  const finite = values.map((v) => v.value).filter((v): v is number => typeof v === 'number');
  return finite.length > 1 && finite.every((v) => v === finite[0]) ? finite[0] : undefined;
}

/** A chart of identical points says so in words: a flat row of dots is easy to misread. */
function constantNote(metric: MetricName, info: MetricInfo, value: number): string {
  if (metric === 'power' && value === 1) return 'Every point is 1: all replicates significant in every scenario and variant (Monte Carlo SE 0).';
  if (metric === 'power' && value === 0) return 'Every point is 0: no replicate significant in any scenario or variant.';
  if (metric === 'coverage' && value === 1) return 'Every point is 1: every interval contained the true value.';
  return `Every point is ${value}: ${info.name.toLowerCase()} is the same in every scenario and variant.`;
}

/** Binomial Monte Carlo SE of a proportion p over n replicates (Morris, White and Crowther 2019, Table 6). */
function binomialMcse(p: number, n: number): number {
  return Math.sqrt((p * (1 - p)) / n);
}

function checkPositionalFields(options: MetricVsScenarioOptions): string[] {
  checkFieldOption(options.x, 'x', BUILDER, true);
  checkFieldOption(options.facet, 'facet', BUILDER, false);
  checkFieldOption(options.facetRow, 'facetRow', BUILDER, false);
  const named: [string, string | undefined][] = [
    ['x', options.x],
    ['facet', options.facet],
    ['facetRow', options.facetRow],
  ];
  const fields: string[] = [];
  for (const [option, field] of named) {
    if (field === undefined) continue;
    if (COMPUTED_FIELDS.includes(field)) {
      fail(BUILDER, `options.${option} '${field}' is a metric field, not a scenario field; expected e.g. 'levels'`);
    }
    if (fields.includes(field)) fail(BUILDER, `options.${option} '${field}' is already used by another position option`);
    fields.push(field);
  }
  return fields;
}

interface KeptRow {
  row: Record<string, unknown>;
  /** Index in the input, for error messages. */
  index: number;
}

function selectRows(metrics: readonly unknown[], metric: MetricName, parameter: unknown): KeptRow[] {
  let wanted: string[] | undefined;
  if (parameter !== undefined) {
    wanted = typeof parameter === 'string' ? [parameter] : (parameter as string[]);
    if (!Array.isArray(wanted) || wanted.length === 0 || !wanted.every((p) => typeof p === 'string')) {
      fail(BUILDER, `options.parameter must be a parameter name or a non-empty array of names, got ${describeValue(parameter)}`);
    }
  }
  const kept: KeptRow[] = [];
  const metricsSeen = new Set<string>();
  const parametersSeen = new Set<string>();
  metrics.forEach((row, index) => {
    checkRowObject(row, index, BUILDER);
    const m = readString(row, 'metric', index, BUILDER);
    readString(row, 'variant', index, BUILDER);
    const p = readString(row, 'parameter', index, BUILDER);
    metricsSeen.add(m);
    if (m !== metric) return;
    parametersSeen.add(p);
    if (wanted !== undefined && !wanted.includes(p)) return;
    kept.push({ row, index });
  });
  if (wanted !== undefined) {
    const absent = wanted.filter((p) => !parametersSeen.has(p));
    if (absent.length > 0) {
      fail(
        BUILDER,
        `options.parameter: no '${metric}' rows for ${quoteList(absent)}; parameters present: ${quoteList([...parametersSeen])}`,
      );
    }
  }
  if (kept.length === 0) {
    fail(BUILDER, `no rows with metric '${metric}'; metrics present: ${quoteList([...metricsSeen]) || 'none'}`);
  }
  return kept;
}

function resolveNominal(
  kept: readonly KeptRow[],
  info: MetricInfo,
  metric: MetricName,
  option: unknown,
): number | undefined {
  const fromRows = distinctInOrder(
    kept.map((k) => k.row.nominal).filter((v): v is number => typeof v === 'number' && Number.isFinite(v)),
  );
  if (fromRows.length > 1) {
    fail(BUILDER, `rows carry different nominal levels (${fromRows.join(', ')}); plot them separately`);
  }
  const isProportion = info.reference === 'nominal band';
  if (option !== undefined) {
    const ok = typeof option === 'number' && (isProportion ? option > 0 && option < 1 : Number.isFinite(option));
    if (!ok) {
      fail(
        BUILDER,
        `options.nominal must be ${isProportion ? 'strictly between 0 and 1' : 'a finite number'}, got ${describeValue(option)}`,
      );
    }
    if (fromRows.length === 1 && Math.abs(fromRows[0] - (option as number)) > 1e-12) {
      fail(BUILDER, `options.nominal (${option}) differs from the rows' nominal level ${fromRows[0]}`);
    }
    return option as number;
  }
  if (fromRows.length === 1) return fromRows[0];
  if (isProportion) {
    fail(BUILDER, `'${metric}' rows carry no 'nominal' field; pass options.nominal (e.g. 0.95 for coverage)`);
  }
  return undefined;
}

function checkOnePointPerCell(
  kept: readonly KeptRow[],
  positional: readonly string[],
  columns: Map<string, { keys: (string | number)[] }>,
): void {
  const seen = new Map<string, number>();
  kept.forEach(({ row, index }, i) => {
    const key = JSON.stringify([row.variant, ...positional.map((f) => columns.get(f)!.keys[i])]);
    const previous = seen.get(key);
    if (previous === undefined) {
      seen.set(key, i);
      return;
    }
    const other = kept[previous];
    const at = positional.map((f) => `${f}=${describeValue(columns.get(f)!.keys[i])}`).join(', ');
    const differ = ['parameter', 'scenario'].find((f) => other.row[f] !== row[f]);
    const hint = differ === undefined ? '' : ` (their '${differ}' differs: ${describeValue(other.row[differ])} vs ${describeValue(row[differ])})`;
    fail(
      BUILDER,
      `rows ${other.index} and ${index} both place variant '${String(row.variant)}' at ${at}${hint}; ` +
        'they differ in a field not on the plot: filter them (options.parameter) or facet by that field',
    );
  });
}
