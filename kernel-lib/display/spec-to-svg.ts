/**
 * Vega-Lite v5 spec -> static SVG string, in Node, without node-canvas: vega-lite's `compile`
 * gives a Vega spec, and a headless vega `View` (renderer 'none') writes SVG. Without a canvas,
 * vega estimates text widths from character counts, so label layout is approximate.
 */
import { compile } from 'vega-lite';
import type { TopLevelSpec } from 'vega-lite';
import { View, parse } from 'vega';

export async function specToSvg(spec: object): Promise<string> {
  if (typeof spec !== 'object' || spec === null || Array.isArray(spec)) {
    throw new TypeError(`specToSvg: expected a Vega-Lite spec object, got ${spec === null ? 'null' : Array.isArray(spec) ? 'an array' : typeof spec}`);
  }
  let vegaSpec;
  try {
    vegaSpec = compile(spec as TopLevelSpec).spec;
  } catch (err) {
    throw new Error(`specToSvg: the Vega-Lite spec does not compile: ${(err as Error).message}`);
  }
  const view = new View(parse(vegaSpec), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/** Base64 data URI of an SVG string, for an `<img>` that survives HTML sanitisers that drop inline SVG. */
export function svgDataUri(svg: string): string {
  return `data:image/svg+xml;base64,${Buffer.from(svg, 'utf8').toString('base64')}`;
}
