/**
 * How well each analysis variant recovers a random-effect standard deviation: the spread of the
 * estimates against the true SD, by a scenario field such as the number of levels.
 */
import type { ReplicateRow } from '../study/replicate-row';
import { REFERENCE_COLOUR } from './theme';
import type { FieldTitles, InlineRow, LayerPart, VegaLiteSpec } from './types';
import { type FacetField, layeredSpec } from './layout';
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
} from './plot-input';

const BUILDER = 'sdRecovery';

/** Fields the builder writes; scenario fields must not use these names. */
const COMPUTED_FIELDS = ['variant', 'parameter', 'scenario', 'estimate', 'truth', 'atZero'];

export interface SdRecoveryOptions {
  /** Scenario field on the x axis (required), e.g. 'levels'. */
  x: string;
  /** Scenario field whose values become columns of panels. Default: no facet. */
  facet?: string;
  /** Keep only these SD parameters, e.g. 'site'. Default: every SD parameter in the rows (which must then be one, or the facet). */
  parameter?: string | readonly string[];
  /** An estimate at or below this counts as zero (a singular fit). Default 0: boundary fits are reported as exactly 0. */
  zeroTolerance?: number;
  /** Variant order, which fixes colours across plots. Default: variant names sorted. */
  variants?: readonly string[];
  /** Display names for fields on axes and headers. Default: the field names. */
  fieldTitles?: FieldTitles;
  /** Chart title. Default: "Estimated SD of '<parameter>' by <x title>". */
  title?: string;
  /** Width of one panel in pixels. Default 300. */
  width?: number;
  /** Height of one panel in pixels. Default 220. */
  height?: number;
}

/**
 * Box plots of the SD estimates per x value and variant (box: quartiles, by linear interpolation
 * as Hyndman and Fan 1996 definition 7; whiskers: smallest and largest estimate, so a pile of
 * zeros stays visible), a black tick at the true SD, and above each box the share of replicates
 * whose estimate is 0.
 *
 * Only rows of kind 'sd' are used. Rows with status 'failed' or 'aliased' or a non-finite
 * estimate are left out, and their count is stated under the title. The true SD must be the same
 * for every variant at an x value (and facet).
 *
 * Throws, naming the option, row and field, on a missing scenario field, no usable row, or rows
 * of different scenarios or parameters that would fall into the same box.
 */
export function sdRecovery<R extends ReplicateRow>(replicates: readonly R[], options: SdRecoveryOptions): VegaLiteSpec {
  checkOptionsObject(options, BUILDER);
  checkFieldOption(options.x, 'x', BUILDER, true);
  checkFieldOption(options.facet, 'facet', BUILDER, false);
  const positional = options.facet === undefined ? [options.x] : [options.x, options.facet];
  if (options.facet === options.x) fail(BUILDER, `options.facet '${options.facet}' is already the x field`);
  for (const [option, field] of [
    ['x', options.x],
    ['facet', options.facet],
  ] as const) {
    if (field !== undefined && COMPUTED_FIELDS.includes(field) && field !== 'parameter') {
      fail(BUILDER, `options.${option} '${field}' is a replicate field, not a scenario field; expected e.g. 'levels'`);
    }
  }
  const titles = checkFieldTitles(options.fieldTitles, BUILDER);
  const width = positiveOption(options.width, 'width', BUILDER, 300);
  const height = positiveOption(options.height, 'height', BUILDER, 220);
  const titleOption = stringOption(options.title, 'title', BUILDER);
  const zeroTolerance = options.zeroTolerance ?? 0;
  if (typeof zeroTolerance !== 'number' || !(zeroTolerance >= 0) || !Number.isFinite(zeroTolerance)) {
    fail(BUILDER, `options.zeroTolerance must be a finite number >= 0, got ${describeValue(zeroTolerance)}`);
  }

  checkArray(replicates, 'replicates', BUILDER);
  const { kept, leftOut } = selectRows(replicates, options.parameter);
  const columns = new Map<string, { keys: (string | number)[]; order: KeyOrder }>();
  for (const field of positional) {
    columns.set(field, keyColumn(kept.map(({ row, index }) => readKey(row, field, index, BUILDER))));
  }
  checkOneSourcePerBox(kept, positional, columns);
  checkOneTruthPerCell(kept, positional, columns);

  const variants = variantOrder(
    kept.map((k) => k.row.variant as string),
    options.variants,
    BUILDER,
  );
  // colours follow the full variant order; the legend and the offsets list the variants drawn here
  const drawn = new Set(kept.map((k) => k.row.variant));
  const present = variants.filter((v) => drawn.has(v));
  const values: InlineRow[] = kept.map(({ row }, i) => {
    const out: InlineRow = {
      scenario: row.scenario as string,
      variant: row.variant as string,
      parameter: row.parameter as string,
    };
    for (const field of positional) out[field] = columns.get(field)!.keys[i];
    out.estimate = row.estimate as number;
    out.truth = row.truth as number;
    out.atZero = (row.estimate as number) <= zeroTolerance;
    return out;
  });

  const x = options.x;
  const xTitle = fieldTitle(x, titles);
  const parameters = distinctInOrder(kept.map((k) => k.row.parameter as string));
  const xEncoding = {
    field: fieldRef(x),
    type: 'ordinal' as const,
    title: xTitle,
    sort: columns.get(x)!.order,
    scale: { type: 'band' as const, paddingInner: 0.2, paddingOuter: 0.1 },
    axis: { labelAngle: 0 },
  };
  const xOffset = { field: 'variant', type: 'nominal' as const, scale: { domain: present, paddingInner: 0.15 } };
  const colour = variantColour(variants, 'Analysis variant', present);
  const yTitle = 'Estimated SD';
  const groupby = positional.map(fieldRef);

  const layers: LayerPart[] = [
    {
      name: 'sd_boxes',
      mark: { type: 'boxplot', extent: 'min-max', size: 14, median: { color: 'white' } },
      encoding: {
        x: xEncoding,
        xOffset,
        y: { field: 'estimate', type: 'quantitative', title: yTitle },
        color: colour,
      },
    },
    {
      name: 'true_sd',
      transform: [{ aggregate: [{ op: 'min', field: 'truth', as: 'truth' }], groupby }],
      mark: { type: 'tick', color: REFERENCE_COLOUR, thickness: 2 },
      encoding: {
        x: xEncoding,
        y: { field: 'truth', type: 'quantitative', title: yTitle },
        tooltip: [{ field: 'truth', type: 'quantitative', title: 'True SD' }],
      },
    },
    {
      name: 'zero_share',
      transform: [
        { calculate: 'datum.atZero ? 1 : 0', as: 'zero' },
        {
          aggregate: [
            { op: 'mean', field: 'zero', as: 'zeroShare' },
            { op: 'sum', field: 'zero', as: 'zeroCount' },
            { op: 'count', as: 'replicates' },
          ],
          groupby: [...groupby, 'variant'],
        },
      ],
      mark: { type: 'text', baseline: 'bottom', dy: -4, fontSize: 10 },
      encoding: {
        x: xEncoding,
        xOffset,
        y: { value: 0 },
        text: { field: 'zeroShare', type: 'quantitative', format: '.0%' },
        color: colour,
        tooltip: [
          { field: 'variant', type: 'nominal', title: 'Variant' },
          { field: 'zeroCount', type: 'quantitative', title: 'Estimates at 0' },
          { field: 'replicates', type: 'quantitative', title: 'Replicates' },
        ],
      },
    },
  ];

  const subtitle = [
    'Boxes: quartiles of the SD estimates over replicates; whiskers: smallest and largest; black tick: true SD.',
    `Percentages above: share of replicates with the SD estimated as ${zeroTolerance === 0 ? '0' : `≤ ${zeroTolerance}`} (singular fit).`,
  ];
  if (leftOut > 0) subtitle.push(`${plural(leftOut, 'replicate', 'replicates')} without an estimate (failed or aliased) left out.`);
  const about = parameters.length === 1 ? ` of '${parameters[0]}'` : '';
  const column: FacetField | undefined =
    options.facet === undefined
      ? undefined
      : { field: options.facet, title: fieldTitle(options.facet, titles), order: columns.get(options.facet)!.order };

  return layeredSpec({
    title: titleOption ?? `Estimated SD${about} by ${xTitle}`,
    subtitle,
    values,
    width,
    height,
    layers,
    column,
  });
}

interface KeptRow {
  row: Record<string, unknown>;
  index: number;
}

function selectRows(replicates: readonly unknown[], parameter: unknown): { kept: KeptRow[]; leftOut: number } {
  let wanted: string[] | undefined;
  if (parameter !== undefined) {
    wanted = typeof parameter === 'string' ? [parameter] : (parameter as string[]);
    if (!Array.isArray(wanted) || wanted.length === 0 || !wanted.every((p) => typeof p === 'string')) {
      fail(BUILDER, `options.parameter must be a parameter name or a non-empty array of names, got ${describeValue(parameter)}`);
    }
  }
  const kept: KeptRow[] = [];
  const sdParameters = new Set<string>();
  let leftOut = 0;
  replicates.forEach((row, index) => {
    checkRowObject(row, index, BUILDER);
    if (readString(row, 'kind', index, BUILDER) !== 'sd') return;
    readString(row, 'variant', index, BUILDER);
    readString(row, 'scenario', index, BUILDER);
    const p = readString(row, 'parameter', index, BUILDER);
    sdParameters.add(p);
    if (wanted !== undefined && !wanted.includes(p)) return;
    const estimate = readNumber(row, 'estimate', index, BUILDER);
    const truth = readNumber(row, 'truth', index, BUILDER);
    if (!Number.isFinite(truth)) fail(BUILDER, `row ${index}: field 'truth' must be finite, got ${truth}`);
    const status = row.status;
    if (status === 'failed' || status === 'aliased' || !Number.isFinite(estimate)) {
      leftOut++;
      return;
    }
    kept.push({ row, index });
  });
  if (wanted !== undefined) {
    const absent = wanted.filter((p) => !sdParameters.has(p));
    if (absent.length > 0) {
      fail(BUILDER, `options.parameter: no SD rows for ${quoteList(absent)}; SD parameters present: ${quoteList([...sdParameters]) || 'none'}`);
    }
  }
  if (kept.length === 0) {
    fail(BUILDER, sdParameters.size === 0 ? "no rows of kind 'sd'" : 'no SD row with a finite estimate');
  }
  return { kept, leftOut };
}

function cellKey(i: number, positional: readonly string[], columns: Map<string, { keys: (string | number)[] }>) {
  return positional.map((f) => columns.get(f)!.keys[i]);
}

function describeCell(i: number, positional: readonly string[], columns: Map<string, { keys: (string | number)[] }>) {
  return positional.map((f) => `${f}=${describeValue(columns.get(f)!.keys[i])}`).join(', ');
}

/** One box must hold one scenario's replicates of one parameter; pooling hides a field not on the plot. */
function checkOneSourcePerBox(
  kept: readonly KeptRow[],
  positional: readonly string[],
  columns: Map<string, { keys: (string | number)[] }>,
): void {
  const source = new Map<string, number>();
  kept.forEach(({ row, index }, i) => {
    const key = JSON.stringify([row.variant, ...cellKey(i, positional, columns)]);
    const first = source.get(key);
    if (first === undefined) {
      source.set(key, i);
      return;
    }
    const other = kept[first].row;
    for (const field of ['scenario', 'parameter']) {
      if (other[field] !== row[field]) {
        fail(
          BUILDER,
          `rows ${kept[first].index} and ${index} fall into the same box (variant '${String(row.variant)}', ` +
            `${describeCell(i, positional, columns)}) but their '${field}' differs ` +
            `(${describeValue(other[field])} vs ${describeValue(row[field])}); filter them or facet by that field`,
        );
      }
    }
  });
}

function checkOneTruthPerCell(
  kept: readonly KeptRow[],
  positional: readonly string[],
  columns: Map<string, { keys: (string | number)[] }>,
): void {
  const truth = new Map<string, number>();
  kept.forEach(({ row, index }, i) => {
    const key = JSON.stringify(cellKey(i, positional, columns));
    const t = row.truth as number;
    const first = truth.get(key);
    if (first === undefined) truth.set(key, i);
    else if ((kept[first].row.truth as number) !== t) {
      fail(
        BUILDER,
        `rows ${kept[first].index} and ${index} (${describeCell(i, positional, columns)}) have different true SDs ` +
          `(${String(kept[first].row.truth)} vs ${t}); expected one true SD per x value`,
      );
    }
  });
}
