/** Residuals against fitted values of one fit: a check for non-linearity and unequal spread. */
import type { FitResult } from '../fit/result';
import { MARK_COLOUR, REFERENCE_COLOUR } from './theme';
import type { InlineRow, LayerPart, VegaLiteSpec } from './types';
import { ONE_PER_CELL, layeredSpec } from './layout';
import { checkOptionsObject, fail, plural, positiveOption, stringOption } from './plot-input';
import { readResidualInput } from './residual-input';

const BUILDER = 'residualsVsFitted';

export interface ResidualsVsFittedOptions {
  /** Chart title. Default: "Residuals against fitted values". */
  title?: string;
  /** Width in pixels. Default 320. */
  width?: number;
  /** Height in pixels. Default 240. */
  height?: number;
}

/**
 * One point per observation, residual against fitted value, with a dashed line at 0. Pass the
 * fit (or any object with `fitted` and `residuals` of equal length; `rowIds`, when present, are
 * shown in the tooltips). Non-finite pairs are left out and counted under the title.
 *
 * Throws when `fitted` or `residuals` is missing or their lengths differ.
 */
export function residualsVsFitted(
  fit: Pick<FitResult, 'fitted' | 'residuals'> & Partial<Pick<FitResult, 'rowIds'>>,
  options: ResidualsVsFittedOptions = {},
): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  const titleOption = stringOption(options.title, 'title', BUILDER);
  const width = positiveOption(options.width, 'width', BUILDER, 320);
  const height = positiveOption(options.height, 'height', BUILDER, 240);
  const { fitted, residuals, rowIds } = readResidualInput(fit, BUILDER, true);

  const values: InlineRow[] = [];
  let dropped = 0;
  for (let i = 0; i < residuals.length; i++) {
    const f = fitted![i];
    const r = residuals[i];
    if (!Number.isFinite(f) || !Number.isFinite(r)) {
      dropped++;
      continue;
    }
    values.push({ fitted: f, residual: r, row: rowIds === undefined ? i : rowIds[i] });
  }
  if (values.length === 0) fail(BUILDER, 'no observation has a finite fitted value and residual');

  const layers: LayerPart[] = [
    {
      name: 'zero_rule',
      transform: ONE_PER_CELL,
      mark: { type: 'rule', color: REFERENCE_COLOUR, strokeDash: [4, 3] },
      encoding: { y: { datum: 0, type: 'quantitative' } },
    },
    {
      name: 'residual_points',
      mark: { type: 'point', filled: true, size: 20, opacity: 0.6, color: MARK_COLOUR },
      encoding: {
        x: { field: 'fitted', type: 'quantitative', title: 'Fitted value', scale: { zero: false } },
        y: { field: 'residual', type: 'quantitative', title: 'Residual (observed − fitted)' },
        tooltip: [
          { field: 'row', type: 'quantitative', title: rowIds === undefined ? 'Observation' : 'Input row' },
          { field: 'fitted', type: 'quantitative', title: 'Fitted', format: '.4~g' },
          { field: 'residual', type: 'quantitative', title: 'Residual', format: '.4~g' },
        ],
      },
    },
  ];
  const subtitle = ['Points should scatter evenly around the dashed line at 0, with no trend or funnel.'];
  if (dropped > 0) subtitle.push(`${plural(dropped, 'observation', 'observations')} with a non-finite value left out.`);
  return layeredSpec({
    title: titleOption ?? 'Residuals against fitted values',
    subtitle,
    values,
    width,
    height,
    layers,
  });
}
