/**
 * Show a Vega-Lite v5 chart from a notebook cell.
 *
 * One output carries several mime types and each front end picks the one it renders best:
 * - `application/vnd.vegalite.v5+json`: JupyterLab draws the chart itself (interactive);
 * - `text/markdown` with an `<img>` of the SVG as a data URI: nbconvert's HTML keeps this,
 *   whereas it strips `image/svg+xml` outputs;
 * - `text/plain`: a one-line description for plain consoles.
 * - `application/javascript` (live front ends only, not while scripts/render-notebook.js renders):
 *   the classic Notebook interface has no Vega-Lite renderer and runs this first; it puts the
 *   picture in the output and replaces it by a live vega-embed view. JupyterLab ranks JavaScript
 *   below Vega-Lite and Markdown, so it keeps drawing the chart itself. The classic Notebook
 *   runs no script of untrusted saved outputs (nor does it show their Markdown): the text line
 *   shows until the cell is run again.
 * With `interactive: true` and only while scripts/render-notebook.js renders the notebook,
 * a `text/html` entry is added (nbconvert prefers it): the same picture, replaced on page load
 * by a vega-embed view. The vega scripts are inlined once per kernel process (see vega-libraries),
 * in the first chart that needs them: no network is used.
 * Outside tslab, a line is printed instead.
 */
import { escapeHtml, jsonForScript } from './escape-html';
import { specToSvg, svgDataUri } from './spec-to-svg';
import { type MimeBundle, displayBundle, insideTslab, renderingToHtml } from './tslab-bridge';
import { claimLibraryInlining, vegaLibrariesCode, vegaLibrariesScript } from './vega-libraries';

export const VEGA_LITE_MIME = 'application/vnd.vegalite.v5+json';

export interface ShowChartOptions {
  /** Add an interactive vega-embed view to the rendered HTML (JupyterLab is interactive anyway). */
  interactive?: boolean;
}

export interface ChartBundleOptions {
  /** Include the `text/html` interactive view (for nbconvert's HTML). */
  interactive: boolean;
  /** Include the `application/javascript` live view (for the classic Notebook interface). */
  live?: boolean;
  /** Inline the vega scripts in that view (the first interactive or live chart of a session). */
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
      `  var el = document.getElementById(${jsonForScript(options.elementId)});\n` +
      `  if (!el || typeof window.vegaEmbed !== 'function') return;\n` +
      `  var fallback = el.innerHTML;\n` +
      `  window.vegaEmbed(el, ${jsonForScript(spec)}, { renderer: 'svg', actions: false })\n` +
      `    .catch(function (err) { el.innerHTML = fallback; console.error('vega-embed:', err); });\n` +
      `})();</script>`;
    bundle['text/html'] =
      (options.includeLibraries ? vegaLibrariesScript() + '\n' : '') +
      `<div id="${id}" class="quadrat-chart">${img}</div>\n${embed}`;
  }
  if (options.live === true) bundle['application/javascript'] = liveChartScript(spec, img, options.includeLibraries);
  return bundle;
}

/**
 * JavaScript that draws the chart where it runs: `element` is the output area (a jQuery object
 * in the classic Notebook, a DOM element in nbconvert's HTML). The picture goes in first and
 * stays when vega-embed is missing or fails; the libraries are defined only when no earlier
 * output of the page defined them.
 */
export function liveChartScript(spec: object, img: string, includeLibraries: boolean): string {
  const libraries = includeLibraries ? `if (typeof window.vegaEmbed !== 'function') {\n${vegaLibrariesCode()}\n}\n` : '';
  return (
    `(function (host) {\n` +
    `  if (host && host.jquery) host = host[0];\n` +
    `  if (!host || !host.appendChild) return;\n` +
    `  var box = document.createElement('div');\n` +
    `  box.className = 'quadrat-chart quadrat-live-chart';\n` +
    `  box.innerHTML = ${jsonForScript(img)};\n` +
    `  host.appendChild(box);\n` +
    libraries +
    `  if (typeof window.vegaEmbed !== 'function') return;\n` +
    `  window.vegaEmbed(box, ${jsonForScript(spec)}, { renderer: 'svg', actions: false })\n` +
    `    .catch(function (err) { box.innerHTML = ${jsonForScript(img)}; console.error('vega-embed:', err); });\n` +
    `})(typeof element === 'undefined' ? null : element);\n`
  );
}

/**
 * Display a chart in a tslab cell (always `await` it: the SVG is rendered asynchronously and a
 * display sent after the cell has finished may be lost by nbconvert).
 */
export async function showChart(spec: object, options: ShowChartOptions = {}): Promise<void> {
  const svg = await specToSvg(spec);
  const rendering = renderingToHtml();
  const interactive = options.interactive === true && rendering;
  const live = !rendering;
  chartCounter += 1;
  const bundle = chartBundle(spec, svg, {
    interactive,
    live,
    includeLibraries: (interactive || live) && insideTslab() && claimLibraryInlining(),
    elementId: `quadrat-chart-${process.pid}-${chartCounter}`,
  });
  if (!displayBundle(bundle)) {
    console.log(`${describeSpec(spec)} (${svg.length} bytes of SVG; charts are drawn only in a notebook, use specToSvg or reportHtml to save one)`);
  }
}
