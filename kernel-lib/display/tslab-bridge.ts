/**
 * The link to the tslab kernel, when there is one.
 *
 * tslab's public `display` sends one mime type per output. Its kernel keeps the writer of the
 * current cell in `tslab/dist/jupyter.js` as `lastWriteDisplayData(content, update)`, which
 * sends a `display_data` message whose `data` may hold several mime types at once; the
 * front end then picks the richest one it can render. That writer is found in the module
 * cache (rather than by `require('tslab/dist/jupyter')`) so that the kernel's own copy is used
 * even when the kernel runs from another tslab install. Outside tslab every function here
 * reports "not available" and callers fall back to console output.
 */

/** A mime bundle: mime type -> string, or JSON value for `+json` types. */
export type MimeBundle = Record<string, unknown>;

type DisplayWriter = (
  content: { data: MimeBundle; metadata: Record<string, unknown>; transient: Record<string, unknown> },
  update: boolean,
) => void;

const JUPYTER_MODULE = /[\\/]tslab[\\/]dist[\\/]jupyter\.js$/;

/** The display writer of the cell being run, or null outside a tslab kernel. */
function currentWriter(): DisplayWriter | null {
  if ((globalThis as { __tslab__?: unknown }).__tslab__ === undefined) return null;
  const cache = require.cache;
  for (const key of Object.keys(cache)) {
    if (!JUPYTER_MODULE.test(key)) continue;
    const writer = (cache[key]?.exports as { lastWriteDisplayData?: unknown } | undefined)?.lastWriteDisplayData;
    if (typeof writer === 'function') return writer as DisplayWriter;
  }
  return null;
}

/** Whether the code runs inside a tslab kernel cell that can display rich output. */
export function insideTslab(): boolean {
  return currentWriter() !== null;
}

/**
 * Display one output holding every mime type of `bundle`. Returns false (and shows nothing)
 * outside tslab, so callers can print a console fallback instead.
 */
export function displayBundle(bundle: MimeBundle): boolean {
  const writer = currentWriter();
  if (writer === null) return false;
  writer({ data: bundle, metadata: {}, transient: {} }, false);
  return true;
}

/**
 * Whether this kernel runs under scripts/render-notebook.js, which sets QUADRAT_HTML_RENDER=1
 * for nbconvert and thereby for the kernel it starts. Then interactive HTML is added only to
 * charts that ask for it, because nbconvert shows `text/html` in preference to the picture; a
 * live session (a person at the Notebook) gets it for every chart.
 */
export function renderingToHtml(): boolean {
  return process.env.QUADRAT_HTML_RENDER === '1';
}
