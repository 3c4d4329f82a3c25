/** The raw data of one survey: the response by group, with each group's mean marked. */
import { naturalOrder } from '../numeric/natural-order';
import { MARK_COLOUR, REFERENCE_COLOUR } from './theme';
import type { FieldTitles, InlineRow, LayerPart, VegaLiteSpec } from './types';
import { layeredSpec } from './layout';
import {
  capitalise,
  checkArray,
  checkFieldOption,
  checkFieldTitles,
  checkOptionsObject,
  checkRowObject,
  describeValue,
  fail,
  fieldRef,
  fieldTitle,
  plural,
  positiveOption,
  readKey,
  stringOption,
} from './plot-input';

const BUILDER = 'groupData';

/** Fields the builder writes next to the response, group and x. */
const JITTER_FIELD = 'jitter';

export interface GroupDataOptions {
  /** Numeric response field (required). */
  response: string;
  /** Grouping field (required), e.g. 'site'. */
  group: string;
  /**
   * Numeric covariate field. When given, each group gets its own panel with response against x;
   * when absent, groups lie side by side on the x axis, in their natural order (numbers and years by value, otherwise as they first appear). Default: absent.
   */
  x?: string;
  /** Panels per row when `x` is given; panels follow the groups' first appearance in the rows. Default 4. */
  columns?: number;
  /** Display names for fields on axes and headers. Default: the field names. */
  fieldTitles?: FieldTitles;
  /** Chart title. Default: "<response> by <group>". */
  title?: string;
  /** Width of the plot (of one panel when `x` is given) in pixels. Default: 14 px per group, at least 300; 160 per panel. */
  width?: number;
  /** Height of the plot (of one panel) in pixels. Default 240 (120 per panel). */
  height?: number;
}

/**
 * Points of `response` per group with the group mean marked (a wide black tick, or a dashed rule
 * across the panel when `x` is given). Rows with a missing (null, NaN) response or x are left out
 * and counted under the title. Points within a group are spread sideways by a fixed,
 * deterministic offset (golden-ratio sequence, common practice, no source) so ties stay visible.
 *
 * Throws, naming the row and field, when the group is not a string or finite number or the
 * response or x is neither a number nor missing.
 */
export function groupData(rows: readonly object[], options: GroupDataOptions): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  checkFieldOption(options.response, 'response', BUILDER, true);
  checkFieldOption(options.group, 'group', BUILDER, true);
  checkFieldOption(options.x, 'x', BUILDER, false);
  const { response, group, x } = options;
  const named = [response, group, ...(x === undefined ? [] : [x])];
  if (new Set(named).size !== named.length) fail(BUILDER, `options.response, options.group and options.x must be different fields`);
  if (named.includes(JITTER_FIELD)) fail(BUILDER, `the field name '${JITTER_FIELD}' is used by the plot; rename that column`);
  const titles = checkFieldTitles(options.fieldTitles, BUILDER);
  const titleOption = stringOption(options.title, 'title', BUILDER);
  const columns = positiveOption(options.columns, 'columns', BUILDER, 4);
  if (!Number.isInteger(columns)) fail(BUILDER, `options.columns must be a whole number, got ${columns}`);
  checkArray(rows, 'rows', BUILDER);

  const values: InlineRow[] = [];
  const groups = new Map<string, { sum: number; count: number }>();
  let dropped = 0;
  rows.forEach((row, index) => {
    checkRowObject(row, index, BUILDER);
    const g = String(readKey(row, group, index, BUILDER));
    const y = readOptionalNumber(row, response, index);
    const xv = x === undefined ? 0 : readOptionalNumber(row, x, index);
    if (!Number.isFinite(y) || !Number.isFinite(xv)) {
      dropped++;
      return;
    }
    const stats = groups.get(g) ?? { sum: 0, count: 0 };
    stats.sum += y;
    stats.count++;
    groups.set(g, stats);
    const out: InlineRow = { [group]: g, [response]: y };
    if (x !== undefined) out[x] = xv;
    else out[JITTER_FIELD] = 0.2 + 0.6 * ((values.length * 0.6180339887498949) % 1);
    values.push(out);
  });
  if (values.length === 0) fail(BUILDER, `no row has a finite '${response}'${x === undefined ? '' : ` and '${x}'`}`);

  const responseTitle = fieldTitle(response, titles);
  const groupTitle = fieldTitle(group, titles);
  const y = { field: fieldRef(response), type: 'quantitative' as const, title: responseTitle, scale: { zero: false } };
  const tooltip = [
    { field: fieldRef(group), type: 'nominal' as const, title: groupTitle },
    { field: fieldRef(response), type: 'quantitative' as const, title: responseTitle },
    ...(x === undefined ? [] : [{ field: fieldRef(x), type: 'quantitative' as const, title: fieldTitle(x, titles) }]),
  ];
  const subtitle: string[] = [];
  if (dropped > 0) {
    subtitle.push(`${plural(dropped, 'row', 'rows')} with a missing ${x === undefined ? `'${response}'` : `'${response}' or '${x}'`} left out.`);
  }
  const title = titleOption ?? capitalise(`${responseTitle} by ${groupTitle}`);

  if (x === undefined) {
    subtitle.unshift('Points: observations; black tick: group mean. Groups in their natural order (numbers and years by value).');
    const xEncoding = {
      field: fieldRef(group),
      type: 'nominal' as const,
      title: groupTitle,
      sort: naturalOrder([...groups.keys()]),
      scale: { type: 'band' as const, paddingInner: 0.2 },
      axis: { labelAngle: groups.size > 12 ? -90 : 0 },
    };
    const layers: LayerPart[] = [
      {
        name: 'observations',
        mark: { type: 'point', filled: true, size: 22, opacity: 0.6, color: MARK_COLOUR },
        encoding: {
          x: xEncoding,
          xOffset: { field: JITTER_FIELD, type: 'quantitative', scale: { domain: [0, 1] } },
          y,
          tooltip,
        },
      },
      {
        name: 'group_means',
        transform: [{ aggregate: [{ op: 'mean', field: fieldRef(response), as: 'groupMean' }], groupby: [fieldRef(group)] }],
        mark: { type: 'tick', color: REFERENCE_COLOUR, thickness: 2 },
        encoding: {
          x: xEncoding,
          y: { field: 'groupMean', type: 'quantitative', title: responseTitle },
          tooltip: [
            { field: fieldRef(group), type: 'nominal', title: groupTitle },
            { field: 'groupMean', type: 'quantitative', title: 'Group mean', format: '.4~g' },
          ],
        },
      },
    ];
    return layeredSpec({
      title,
      subtitle,
      values,
      width: positiveOption(options.width, 'width', BUILDER, Math.max(300, 14 * groups.size)),
      height: positiveOption(options.height, 'height', BUILDER, 240),
      layers,
    });
  }

  subtitle.unshift(`Points: observations; dashed line: mean ${responseTitle} of the group.`);
  const xEncoding = { field: fieldRef(x), type: 'quantitative' as const, title: fieldTitle(x, titles), scale: { zero: false } };
  const layers: LayerPart[] = [
    {
      name: 'observations',
      mark: { type: 'point', filled: true, size: 22, opacity: 0.7, color: MARK_COLOUR },
      encoding: { x: xEncoding, y, tooltip },
    },
    {
      name: 'group_means',
      transform: [{ aggregate: [{ op: 'mean', field: fieldRef(response), as: 'groupMean' }], groupby: [fieldRef(group)] }],
      mark: { type: 'rule', color: REFERENCE_COLOUR, strokeDash: [4, 3] },
      encoding: {
        y: { field: 'groupMean', type: 'quantitative', title: responseTitle },
        tooltip: [{ field: 'groupMean', type: 'quantitative', title: 'Group mean', format: '.4~g' }],
      },
    },
  ];
  return layeredSpec({
    title,
    subtitle,
    values,
    width: positiveOption(options.width, 'width', BUILDER, 160),
    height: positiveOption(options.height, 'height', BUILDER, 120),
    layers,
    wrap: { field: group, title: groupTitle, order: naturalOrder([...groups.keys()]), columns },
  });
}

function readOptionalNumber(row: Record<string, unknown>, field: string, index: number): number {
  const v = row[field];
  if (v === null || v === undefined) return NaN;
  if (typeof v !== 'number') {
    fail(BUILDER, `row ${index}: field '${field}' must be a number (null or NaN when missing), got ${describeValue(v)}`);
  }
  return v;
}
