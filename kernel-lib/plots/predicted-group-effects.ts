/**
 * What the mixed model did to each level of a grouping factor: the level's raw mean deviation
 * (open circle) beside its predicted effect with its interval (filled dot and bar), joined by a
 * thin line, so a reader sees how far levels with few observations are pulled towards 0.
 */
import { naturalOrder } from '../numeric/natural-order';
import { MARK_COLOUR, REFERENCE_COLOUR } from './theme';
import type { InlineRow, LayerPart, VegaLiteSpec } from './types';
import { ONE_PER_CELL, layeredSpec } from './layout';
import { checkArray, checkFieldOption, checkOptionsObject, distinctInOrder, fail, jsonNumber, plural, positiveOption, quoteList, stringOption } from './plot-input';

const BUILDER = 'predictedGroupEffects';

/** One level of a random grouping factor: its raw mean deviation beside its predicted (shrunken) effect. */
export interface GroupEffectRow {
  factor: string;
  level: string;
  term: string;
  /** Predicted effect (conditional mode). */
  predicted: number;
  lower: number;
  upper: number;
  /** The level's raw mean deviation: its observations' mean minus the fixed part and the other factors' effects (NaN for slope terms). */
  raw: number;
  /** Observations of the level used in the fit. */
  n: number;
}

export interface PredictedGroupEffectsOptions {
  /** Grouping factor to plot (required), e.g. 'site'. */
  factor: string;
  /** 'intercept' (default) or a slope column. */
  term?: string;
  title?: string;
  /** Width in pixels; default 'container' (the page width). */
  width?: number;
  /** Height per level in pixels. Default 18 with up to 40 levels, else 6. */
  step?: number;
}

/**
 * Predicted group effects of one factor: per level (in natural order), the raw mean deviation and
 * the predicted effect with its interval. Pass `groupEffectRows(fit, data, model)`.
 */
export function predictedGroupEffects(rows: readonly GroupEffectRow[], options: PredictedGroupEffectsOptions): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  checkFieldOption(options.factor, 'factor', BUILDER, true);
  checkFieldOption(options.term, 'term', BUILDER, false);
  const title = stringOption(options.title, 'title', BUILDER);
  checkArray(rows, 'rows', BUILDER);
  const term = options.term ?? 'intercept';
  const mine = rows.filter((r) => r.factor === options.factor && r.term === term);
  if (mine.length === 0) {
    fail(BUILDER, `no rows for factor '${options.factor}' (${term}); factors present: ${quoteList(distinctInOrder(rows.map((r) => r.factor))) || 'none'}`);
  }
  const finite = mine.filter((r) => Number.isFinite(r.predicted));
  const dropped = mine.length - finite.length;
  const values: InlineRow[] = finite.map((r) => ({
    level: r.level,
    label: `${r.level} (${r.n})`,
    predicted: r.predicted,
    lower: jsonNumber(r.lower),
    upper: jsonNumber(r.upper),
    raw: jsonNumber(r.raw),
    n: r.n,
  }));
  const order = naturalOrder(finite.map((r) => r.level)).map((l) => values.find((v) => v.level === l)!.label as string);
  const count = order.length;
  const step = positiveOption(options.step, 'step', BUILDER, count <= 40 ? 18 : 6);
  const y = { field: 'label', type: 'ordinal' as const, title: `${options.factor} (observations)`, sort: order };
  const xTitle = term === 'intercept' ? `Deviation of each ${options.factor} from the overall level` : `Deviation of each ${options.factor}'s slope of ${term}`;
  const tooltip = [
    { field: 'level', type: 'nominal' as const, title: options.factor },
    { field: 'n', type: 'quantitative' as const, title: 'Observations' },
    { field: 'raw', type: 'quantitative' as const, title: 'Raw mean deviation', format: '.3~g' },
    { field: 'predicted', type: 'quantitative' as const, title: 'Predicted effect', format: '.3~g' },
  ];
  const layers: LayerPart[] = [
    { name: 'zero_rule', transform: ONE_PER_CELL, mark: { type: 'rule', color: REFERENCE_COLOUR, strokeDash: [4, 3] }, encoding: { x: { datum: 0, type: 'quantitative' } } },
    {
      name: 'pull',
      transform: [{ filter: 'isValid(datum.raw)' }],
      mark: { type: 'rule', color: '#999999', strokeWidth: 1 },
      encoding: { y, x: { field: 'raw', type: 'quantitative', title: xTitle }, x2: { field: 'predicted' } },
    },
    {
      name: 'intervals',
      transform: [{ filter: 'isValid(datum.lower) && isValid(datum.upper)' }],
      mark: { type: 'rule', color: MARK_COLOUR, strokeWidth: 3, opacity: 0.45 },
      encoding: { y, x: { field: 'lower', type: 'quantitative', title: xTitle }, x2: { field: 'upper' } },
    },
    {
      name: 'raw',
      transform: [{ filter: 'isValid(datum.raw)' }],
      mark: { type: 'point', shape: 'circle', filled: false, size: 60, color: REFERENCE_COLOUR, opacity: 1 },
      encoding: { y, x: { field: 'raw', type: 'quantitative', title: xTitle }, tooltip },
    },
    {
      name: 'predicted',
      mark: { type: 'point', shape: 'circle', filled: true, size: 50, color: MARK_COLOUR, opacity: 1 },
      encoding: { y, x: { field: 'predicted', type: 'quantitative', title: xTitle }, tooltip },
    },
  ];
  const subtitle = [
    'Open circle: what the level\'s own observations say (raw mean deviation); dot and bar: the model\'s predicted effect',
    'with its 95% interval. Levels with few observations are pulled further towards 0.',
  ];
  if (dropped > 0) subtitle.push(`${plural(dropped, 'level', 'levels')} without a predicted effect left out.`);
  return layeredSpec({
    title: title ?? `Predicted ${options.factor} effects beside the raw deviations`,
    subtitle,
    values,
    width: positiveOption(options.width, 'width', BUILDER, 480),
    height: step * count,
    layers,
  });
}
