/** Types shared by the plot builders. Specs are Vega-Lite v5 plain objects. */
import type { Config, TopLevelSpec } from 'vega-lite';
import type { Field } from 'vega-lite/build/src/channeldef';
import type { LayerSpec, UnitSpec } from 'vega-lite/build/src/spec';

/** A complete Vega-Lite v5 specification with its data inlined. */
export type VegaLiteSpec = TopLevelSpec;

/** One layer of a layered chart. */
export type LayerPart = LayerSpec<Field> | UnitSpec<Field>;

export type VegaLiteConfig = Config;

/** A row of inlined data: JSON-safe values only (non-finite numbers become null). */
export type InlineRow = Record<string, string | number | boolean | null>;

/** Display names for data fields used on axes, facet headers and tooltips (default: the field name). */
export type FieldTitles = Readonly<Record<string, string>>;
