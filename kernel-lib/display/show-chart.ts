/**
 * Show a Vega-Lite v5 chart from a notebook cell.
 *
 * One output carries several mime types and each front end picks the one it renders best:
 * - `application/vnd.vegalite.v5+json`: JupyterLab draws the chart itself (interactive);
 * - `text/markdown` with an `<img>` of the SVG as a data URI: nbconvert's HTML keeps this,
 *   whereas it strips `image/svg+xml` outputs;
 * - `text/plain`: a one-line description for plain consoles.
 * - `text/html` (live sessions always; while scripts/render-notebook.js renders, only for charts
 *   shown with `interactive: true`): the same picture, replaced by a vega-embed view when the
 *   page runs its script. The classic Notebook interface, which has no Vega-Lite renderer, shows
 *   this entry: a live chart when it trusts the output, the picture when it does not (it strips
 *   the scripts of untrusted HTML). nbconvert prefers it too, hence only on request when rendering.
 *   JupyterLab ranks HTML above Vega-Lite as well, and runs the script of trusted outputs.
 * The vega scripts are inlined once per kernel process, in the first chart that carries this
 * entry (see vega-libraries): no network is needed. Outside tslab, a line is printed instead.
 */
import { escapeHtml, jsonForScript } from './escape-html';
import { specToSvg, svgDataUri } from './spec-to-svg';
import { type MimeBundle, displayBundle, insideTslab, renderingToHtml } from './tslab-bridge';
import { claimLibraryInlining, vegaLibrariesScript } from './vega-libraries';

export const VEGA_LITE_MIME = 'application/vnd.vegalite.v5+json';

export interface ShowChartOptions {
  /** Add the interactive vega-embed view to HTML rendered by scripts/render-notebook.js (live sessions always have it). */
  interactive?: boolean;
}

export interface ChartBundleOptions {
  /** Include the `text/html` interactive view. */
  interactive: boolean;
  /** Inline the vega scripts in that view (the first interactive chart of a document). */
  includeLibraries: boolean;
  /** Element id of the interactive view; unique within the document. */
  elementId: string;
}

let chartCounter = 0;

/** A short description of the chart for text outputs and `alt` text. */
export function describeSpec(spec: object): string {
  const s = spec as { title?: unknown; description?: unknown; mark?: unknown; layer?: unknown };
  const title = typeof s.title === 'string' ? s.title : (s.title as { text?: unknown } | undefined)?.text;
  if (typeof title === 'string' && title !== '') return `Chart: ${title}`;
  if (typeof s.description === 'string' && s.description !== '') return `Chart: ${s.description}`;
  const mark = typeof s.mark === 'string' ? s.mark : (s.mark as { type?: unknown } | undefined)?.type;
  if (typeof mark === 'string') return `Chart: ${mark} marks`;
  if (Array.isArray(s.layer)) return `Chart: ${s.layer.length} layers`;
  return 'Chart';
}

/** The mime bundle of one chart output (pure: no display, no global state). */
export function chartBundle(spec: object, svg: string, options: ChartBundleOptions): MimeBundle {
  const alt = escapeHtml(describeSpec(spec));
  const img = `<img src="${svgDataUri(svg)}" alt="${alt}">`;
  const bundle: MimeBundle = {
    [VEGA_LITE_MIME]: spec,
    'text/markdown': img,
    'text/plain': `<${describeSpec(spec)}>`,
  };
  if (options.interactive) {
    const id = escapeHtml(options.elementId);
    const embed =
      `<script>(function () {\n` +
      // by id, or (a front end that runs the script before the output is in the page) beside the script
      `  var el = document.getElementById(${jsonForScript(options.elementId)})\n` +
      `    || (document.currentScript && document.currentScript.previousElementSibling);\n` +
      `  if (!el || typeof window.vegaEmbed !== 'function') return;\n` +
      `  var fallback = el.innerHTML;\n` +
      `  window.vegaEmbed(el, ${jsonForScript(spec)}, { renderer: 'svg', actions: false })\n` +
      `    .catch(function (err) { el.innerHTML = fallback; console.error('vega-embed:', err); });\n` +
      `})();</script>`;
    bundle['text/html'] =
      (options.includeLibraries ? vegaLibrariesScript() + '\n' : '') +
      `<div id="${id}" class="quadrat-chart">${img}</div>\n${embed}`;
  }
  return bundle;
}

/**
 * Display a chart in a tslab cell (always `await` it: the SVG is rendered asynchronously and a
 * display sent after the cell has finished may be lost by nbconvert).
 */
export async function showChart(spec: object, options: ShowChartOptions = {}): Promise<void> {
  const svg = await specToSvg(spec);
  // A live session always gets the HTML view; a render only when asked (nbconvert prefers it to the picture).
  const interactive = renderingToHtml() ? options.interactive === true : true;
  chartCounter += 1;
  const bundle = chartBundle(spec, svg, {
    interactive,
    includeLibraries: interactive && insideTslab() && claimLibraryInlining(),
    elementId: `quadrat-chart-${process.pid}-${chartCounter}`,
  });
  if (!displayBundle(bundle)) {
    console.log(`${describeSpec(spec)} (${svg.length} bytes of SVG; charts are drawn only in a notebook, use specToSvg or reportHtml to save one)`);
  }
}
