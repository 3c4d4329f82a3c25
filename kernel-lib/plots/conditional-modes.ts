/** Caterpillar plot of the predicted random effects (conditional modes) of one grouping factor. */
import type { ConditionalModeRow } from '../fit/result';
import { MARK_COLOUR, REFERENCE_COLOUR } from './theme';
import type { InlineRow, LayerPart, VegaLiteSpec } from './types';
import { ONE_PER_CELL, layeredSpec } from './layout';
import {
  checkArray,
  checkFieldOption,
  checkOptionsObject,
  checkRowObject,
  distinctInOrder,
  fail,
  jsonNumber,
  plural,
  positiveOption,
  quoteList,
  readNumber,
  readString,
  stringOption,
} from './plot-input';

const BUILDER = 'conditionalModes';

/** Normal 97.5% quantile: mode ± 1.96 conditional SD is an approximate 95% interval (common practice, no source). */
const MODE_INTERVAL_MULTIPLIER = 1.96;

/** More levels than this and the level labels are hidden (they would overlap). */
const MAX_LABELLED_LEVELS = 60;

export interface ConditionalModesOptions {
  /** Grouping factor to plot (required), e.g. 'site'. */
  factor: string;
  /** Random-effect term: 'intercept' or a slope column. Default: the factor's only term, or 'intercept' when it has several. */
  term?: string;
  /** Chart title. Default: "Predicted <factor> effects (<term>)". */
  title?: string;
  /** Width in pixels. Default 320. */
  width?: number;
  /** Height per level in pixels. Default: 14 with up to 40 levels, 6 up to 150, else 3. */
  step?: number;
}

/**
 * Each level's conditional mode (the predicted random effect) with mode ± 1.96 × its conditional
 * SD, levels sorted by mode (largest at the top), and a dashed line at 0.
 *
 * Pass `fit.modes`. Levels whose mode is not finite are left out; levels without a finite
 * conditional SD are drawn without an interval; both are counted under the title.
 *
 * Throws when the factor or term is not among the rows (the message lists those present) or a row
 * lacks a field.
 */
export function conditionalModes(modes: readonly ConditionalModeRow[], options: ConditionalModesOptions): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  checkFieldOption(options.factor, 'factor', BUILDER, true);
  checkFieldOption(options.term, 'term', BUILDER, false);
  const titleOption = stringOption(options.title, 'title', BUILDER);
  const width = positiveOption(options.width, 'width', BUILDER, 320);
  checkArray(modes, 'modes', BUILDER);

  const factors: string[] = [];
  const terms: string[] = [];
  modes.forEach((row, index) => {
    checkRowObject(row, index, BUILDER);
    const f = readString(row, 'factor', index, BUILDER);
    factors.push(f);
    if (f === options.factor) terms.push(readString(row, 'term', index, BUILDER));
  });
  if (terms.length === 0) {
    fail(BUILDER, `options.factor '${options.factor}' has no rows; factors present: ${quoteList(distinctInOrder(factors)) || 'none'}`);
  }
  const termsPresent = distinctInOrder(terms);
  if (options.term === undefined && termsPresent.length > 1 && !termsPresent.includes('intercept')) {
    fail(BUILDER, `factor '${options.factor}' has several terms (${quoteList(termsPresent)}); pass options.term`);
  }
  const term = options.term ?? (termsPresent.length === 1 ? termsPresent[0] : 'intercept');
  if (!termsPresent.includes(term)) {
    fail(BUILDER, `options.term '${term}' is not a term of factor '${options.factor}'; terms present: ${quoteList(termsPresent)}`);
  }

  const values: InlineRow[] = [];
  const seen = new Set<string>();
  let noMode = 0;
  let noSd = 0;
  modes.forEach((row, index) => {
    if (row.factor !== options.factor || row.term !== term) return;
    const r = row as unknown as Record<string, unknown>;
    const level = readString(r, 'level', index, BUILDER);
    if (seen.has(level)) fail(BUILDER, `row ${index}: level '${level}' of '${options.factor}' (${term}) appears twice`);
    seen.add(level);
    const mode = readNumber(r, 'mode', index, BUILDER);
    const sd = readNumber(r, 'sd', index, BUILDER);
    if (!Number.isFinite(mode)) {
      noMode++;
      return;
    }
    const hasSd = Number.isFinite(sd) && sd >= 0;
    if (!hasSd) noSd++;
    values.push({
      level,
      mode,
      sd: jsonNumber(sd),
      lower: hasSd ? mode - MODE_INTERVAL_MULTIPLIER * sd : null,
      upper: hasSd ? mode + MODE_INTERVAL_MULTIPLIER * sd : null,
    });
  });
  if (values.length === 0) fail(BUILDER, `no level of '${options.factor}' (${term}) has a finite mode`);

  // Largest mode first: the first category of an ordinal y axis is drawn at the top.
  const order = [...values].sort((a, b) => (b.mode as number) - (a.mode as number)).map((v) => v.level as string);
  const count = order.length;
  const step = positiveOption(options.step, 'step', BUILDER, count <= 40 ? 14 : count <= 150 ? 6 : 3);
  const y = {
    field: 'level',
    type: 'ordinal' as const,
    title: `Level of ${options.factor}`,
    sort: order,
    axis: count <= MAX_LABELLED_LEVELS ? {} : { labels: false, ticks: false },
  };
  const xTitle = term === 'intercept' ? `Predicted ${options.factor} effect` : `Predicted ${options.factor} effect on ${term}`;
  const layers: LayerPart[] = [
    {
      name: 'zero_rule',
      transform: ONE_PER_CELL,
      mark: { type: 'rule', color: REFERENCE_COLOUR, strokeDash: [4, 3] },
      encoding: { x: { datum: 0, type: 'quantitative' } },
    },
    {
      name: 'mode_intervals',
      transform: [{ filter: 'isValid(datum.lower) && isValid(datum.upper)' }],
      mark: { type: 'rule', color: MARK_COLOUR, strokeWidth: 1.5 },
      encoding: { y, x: { field: 'lower', type: 'quantitative', title: xTitle }, x2: { field: 'upper' } },
    },
    {
      name: 'modes',
      mark: { type: 'point', filled: true, size: count <= 40 ? 36 : 12, color: MARK_COLOUR, opacity: 1 },
      encoding: {
        y,
        x: { field: 'mode', type: 'quantitative', title: xTitle },
        tooltip: [
          { field: 'level', type: 'nominal', title: 'Level' },
          { field: 'mode', type: 'quantitative', title: 'Conditional mode', format: '.4~g' },
          { field: 'sd', type: 'quantitative', title: 'Conditional SD', format: '.3~g' },
        ],
      },
    },
  ];
  const subtitle = [
    `Points: conditional modes; bars: ± ${MODE_INTERVAL_MULTIPLIER} × conditional SD (about 95%, given the estimated variances).`,
  ];
  if (noMode > 0) subtitle.push(`${plural(noMode, 'level', 'levels')} without a finite mode left out.`);
  if (noSd > 0) subtitle.push(`${plural(noSd, 'level has', 'levels have')} no finite conditional SD: drawn without a bar.`);
  if (count > MAX_LABELLED_LEVELS) subtitle.push(`${count} levels: labels hidden, see the tooltips.`);

  return layeredSpec({
    title: titleOption ?? `Predicted ${options.factor} effects (${term})`,
    subtitle,
    values,
    width,
    height: step * count,
    layers,
  });
}
