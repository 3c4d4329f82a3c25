/** Normal quantile-quantile plot of the residuals of one fit. */
import type { FitResult } from '../fit/result';
import { normalQuantile as standardNormalQuantile } from '../numeric/distributions';
import { MARK_COLOUR, REFERENCE_COLOUR } from './theme';
import type { InlineRow, LayerPart, VegaLiteSpec } from './types';
import { layeredSpec } from './layout';
import { checkOptionsObject, fail, plural, positiveOption, stringOption } from './plot-input';
import { readResidualInput } from './residual-input';

const BUILDER = 'normalQuantilePlot';

export interface NormalQuantileOptions {
  /** Chart title. Default: "Normal quantile plot of the residuals". */
  title?: string;
  /** Width in pixels. Default 280. */
  width?: number;
  /** Height in pixels. Default 280. */
  height?: number;
}

/** Sample quantile by linear interpolation between order statistics (Hyndman and Fan 1996, The American Statistician 50:361, definition 7). */
function sortedQuantile(sorted: ArrayLike<number>, p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export interface QuantilePairs {
  /** Standard normal quantiles at the plotting positions (i − 0.5)/n. */
  theoretical: Float64Array;
  /** Residuals in ascending order. */
  sample: Float64Array;
  /** Observation index (or row id) of each sorted residual. */
  source: Int32Array;
  /** Reference line through the quartiles: sample ≈ intercept + slope × theoretical. */
  intercept: number;
  slope: number;
}

/**
 * Sorted residuals paired with normal quantiles at Hazen's plotting positions (i − 0.5)/n
 * (Hazen 1914, Trans. Am. Soc. Civil Engineers 77:1547), and the line through the first and third
 * quartiles of both (Chambers, Cleveland, Kleiner and Tukey 1983, Graphical Methods for Data
 * Analysis), which is robust to the tails it is meant to reveal. With tied quartiles the slope is 0.
 */
export function normalQuantilePairs(values: ArrayLike<number>, ids?: ArrayLike<number>): QuantilePairs {
  const n = values.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => values[a] - values[b] || a - b);
  const sample = new Float64Array(n);
  const theoretical = new Float64Array(n);
  const source = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    sample[i] = values[order[i]];
    source[i] = ids === undefined ? order[i] : ids[order[i]];
    theoretical[i] = standardNormalQuantile((i + 0.5) / n);
  }
  const z1 = standardNormalQuantile(0.25);
  const z3 = standardNormalQuantile(0.75);
  const q1 = sortedQuantile(sample, 0.25);
  const q3 = sortedQuantile(sample, 0.75);
  const slope = (q3 - q1) / (z3 - z1);
  return { theoretical, sample, source, slope, intercept: q1 - slope * z1 };
}

/**
 * Normal quantile plot: sorted residuals against standard normal quantiles, with a dashed
 * reference line through the quartiles. Points near the line mean roughly normal residuals;
 * curvature at the ends means heavy or light tails, an S-shape skew. Pass the fit (or any object
 * with `residuals`; `rowIds` are shown in tooltips). Non-finite residuals are left out and counted.
 *
 * Throws when `residuals` is missing or holds no finite value.
 */
export function normalQuantilePlot(
  fit: Pick<FitResult, 'residuals'> & Partial<Pick<FitResult, 'rowIds'>>,
  options: NormalQuantileOptions = {},
): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  const titleOption = stringOption(options.title, 'title', BUILDER);
  const width = positiveOption(options.width, 'width', BUILDER, 280);
  const height = positiveOption(options.height, 'height', BUILDER, 280);
  const { residuals, rowIds } = readResidualInput(fit, BUILDER, false);

  const finite: number[] = [];
  const ids: number[] = [];
  for (let i = 0; i < residuals.length; i++) {
    if (!Number.isFinite(residuals[i])) continue;
    finite.push(residuals[i]);
    ids.push(rowIds === undefined ? i : rowIds[i]);
  }
  const dropped = residuals.length - finite.length;
  if (finite.length === 0) fail(BUILDER, `'residuals' holds no finite value (length ${residuals.length})`);
  const pairs = normalQuantilePairs(finite, ids);
  const values: InlineRow[] = [];
  for (let i = 0; i < finite.length; i++) {
    values.push({ theoretical: pairs.theoretical[i], residual: pairs.sample[i], row: pairs.source[i] });
  }
  const ends = [pairs.theoretical[0], pairs.theoretical[finite.length - 1]];
  const x = { field: 'theoretical', type: 'quantitative' as const, title: 'Standard normal quantile' };
  const y = { field: 'residual', type: 'quantitative' as const, title: 'Residual', scale: { zero: false } };
  const layers: LayerPart[] = [
    {
      name: 'quartile_line',
      data: { values: ends.map((t) => ({ theoretical: t, residual: pairs.intercept + pairs.slope * t })) },
      mark: { type: 'line', color: REFERENCE_COLOUR, strokeDash: [4, 3], strokeWidth: 1 },
      encoding: { x, y },
    },
    {
      name: 'quantile_points',
      mark: { type: 'point', filled: true, size: 20, opacity: 0.7, color: MARK_COLOUR },
      encoding: {
        x,
        y,
        tooltip: [
          { field: 'row', type: 'quantitative', title: rowIds === undefined ? 'Observation' : 'Input row' },
          { field: 'residual', type: 'quantitative', title: 'Residual', format: '.4~g' },
          { field: 'theoretical', type: 'quantitative', title: 'Normal quantile', format: '.3~f' },
        ],
      },
    },
  ];
  const subtitle = [
    'Sorted residuals against normal quantiles at (i − 0.5)/n; dashed line through the quartiles.',
    'Points near the line: roughly normal residuals; bends at the ends: heavy or light tails.',
  ];
  if (dropped > 0) subtitle.push(`${plural(dropped, 'residual is', 'residuals are')} not finite: left out.`);
  return layeredSpec({
    title: titleOption ?? 'Normal quantile plot of the residuals',
    subtitle,
    values,
    width,
    height,
    layers,
  });
}
