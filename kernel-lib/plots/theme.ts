/** Shared look of the plots: one font, a colour-blind-safe palette, quiet axes. */
import type { VegaLiteConfig } from './types';

export const VEGA_LITE_SCHEMA = 'https://vega.github.io/schema/vega-lite/v5.json';

export const FONT = 'Helvetica Neue, Helvetica, Arial, sans-serif';

/**
 * Okabe and Ito (2008), "Color Universal Design", colour-blind-safe palette, reordered so the
 * first colours contrast most on white; yellow (hard to see on white) comes last.
 */
export const VARIANT_COLOURS: readonly string[] = [
  '#0072B2', // blue
  '#D55E00', // vermillion
  '#009E73', // bluish green
  '#CC79A7', // reddish purple
  '#E69F00', // orange
  '#56B4E9', // sky blue
  '#000000', // black
  '#F0E442', // yellow
];

/** Point shapes paired with the colours, so variants stay apart in greyscale too. */
export const VARIANT_SHAPES: readonly string[] = [
  'circle',
  'square',
  'triangle-up',
  'diamond',
  'triangle-down',
  'cross',
  'triangle-left',
  'triangle-right',
];

/** Single-colour marks (one series): the first palette colour. */
export const MARK_COLOUR = VARIANT_COLOURS[0];
/** Reference lines and target values. */
export const REFERENCE_COLOUR = '#333333';
/** Shaded tolerance bands. */
export const BAND_COLOUR = '#d9d9d9';

export const THEME_CONFIG: VegaLiteConfig = {
  font: FONT,
  view: { stroke: '#e0e0e0' },
  axis: {
    labelFontSize: 11,
    titleFontSize: 12,
    titleFontWeight: 'normal',
    labelColor: '#333333',
    titleColor: '#333333',
    domainColor: '#888888',
    tickColor: '#888888',
    gridColor: '#eeeeee',
  },
  header: { labelFontSize: 11, titleFontSize: 12, titleFontWeight: 'normal', labelColor: '#333333' },
  // no label limit: variant names such as 'year random, satterthwaite' are read in full
  legend: { labelFontSize: 11, titleFontSize: 12, titleFontWeight: 'normal', orient: 'bottom', symbolOpacity: 1, labelLimit: 0 },
  title: {
    fontSize: 14,
    fontWeight: 'bold',
    anchor: 'start',
    subtitleFontSize: 11,
    subtitleColor: '#555555',
    offset: 10,
  },
};
