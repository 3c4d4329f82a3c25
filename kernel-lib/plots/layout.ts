/** Wraps layers, inline data and titles into a complete spec, faceted when asked. */
import { THEME_CONFIG, VEGA_LITE_SCHEMA } from './theme';
import type { InlineRow, LayerPart, VegaLiteSpec } from './types';
import { type KeyOrder, fieldRef } from './plot-input';

export interface FacetField {
  field: string;
  title: string;
  /** Header order. */
  order: KeyOrder;
}

export interface LayeredChart {
  title: string;
  subtitle: string[];
  values: InlineRow[];
  width: number;
  height: number;
  layers: LayerPart[];
  column?: FacetField;
  row?: FacetField;
  /** One panel per value of a field, wrapped into rows of `columns` panels (instead of column/row). */
  wrap?: FacetField & { columns: number };
  /** Row facet only: write each row's label above its panel (as a panel title) instead of beside it. */
  rowLabelsAbove?: boolean;
  /** Facets only: give each panel its own x scale. */
  independentX?: boolean;
}

function facetChannel(f: FacetField) {
  return { field: fieldRef(f.field), type: 'ordinal' as const, title: f.title, sort: f.order };
}

/** Row headers read horizontally: beside their panel, or above it as a panel title. */
function rowChannel(f: FacetField, labelsAbove: boolean) {
  if (labelsAbove) {
    return {
      ...facetChannel(f),
      title: null,
      header: { labelAngle: 0, labelOrient: 'top' as const, labelAnchor: 'start' as const, labelFontWeight: 'bold' as const },
    };
  }
  return { ...facetChannel(f), header: { labelAngle: 0 } };
}

/**
 * Transform for a layer that draws one constant mark (a reference rule at a datum): collapses the
 * inherited rows to one per facet cell, so the mark is not drawn once per data row.
 */
export const ONE_PER_CELL = [{ aggregate: [{ op: 'count' as const, as: 'rowsInCell' }] }];

export function layeredSpec(chart: LayeredChart): VegaLiteSpec {
  const title = chart.subtitle.length > 0 ? { text: chart.title, subtitle: chart.subtitle } : { text: chart.title };
  if (chart.wrap !== undefined) {
    return {
      $schema: VEGA_LITE_SCHEMA,
      title,
      data: { values: chart.values },
      facet: facetChannel(chart.wrap),
      columns: chart.wrap.columns,
      spec: { width: chart.width, height: chart.height, layer: chart.layers },
      config: THEME_CONFIG,
    };
  }
  if (chart.column === undefined && chart.row === undefined) {
    return {
      $schema: VEGA_LITE_SCHEMA,
      title,
      data: { values: chart.values },
      width: chart.width,
      height: chart.height,
      layer: chart.layers,
      config: THEME_CONFIG,
    };
  }
  const facet: { column?: ReturnType<typeof facetChannel>; row?: ReturnType<typeof rowChannel> } = {};
  if (chart.column !== undefined) facet.column = facetChannel(chart.column);
  if (chart.row !== undefined) facet.row = rowChannel(chart.row, chart.rowLabelsAbove === true);
  const spec: VegaLiteSpec = {
    $schema: VEGA_LITE_SCHEMA,
    title,
    data: { values: chart.values },
    facet,
    spec: { width: chart.width, height: chart.height, layer: chart.layers },
    config: THEME_CONFIG,
  };
  if (chart.independentX === true) spec.resolve = { scale: { x: 'independent' } };
  return spec;
}
