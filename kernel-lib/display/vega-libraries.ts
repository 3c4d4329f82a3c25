/**
 * The browser builds of vega, vega-lite and vega-embed from node_modules, as one inline
 * `<script>` for HTML that must work without network access.
 *
 * Trade-off: this adds about 0.8 MB to the HTML file (vega ~515 kB, vega-lite ~252 kB,
 * vega-embed ~60 kB, minified), so it is sent once per kernel process and only when a chart
 * asks to be interactive; later interactive charts reuse the globals it defines.
 */
import { readFileSync } from 'fs';
import { dirname, join } from 'path';

/** Global flag (per kernel process) so that the scripts are inlined once even if this module is reloaded. */
const SENT = Symbol.for('quadrat.display.vegaLibrariesInlined');

function minifiedBuild(packageName: string, file: string): string {
  // vega-embed's "exports" map hides build/ subpaths, so resolve the main file and look beside it.
  const main = require.resolve(packageName);
  const code = readFileSync(join(dirname(main), file), 'utf8');
  return code.replace(/^\/\/# sourceMappingURL=.*$/gm, '').replace(/<\/script/gi, '<\\/script');
}

/**
 * One `<script>` defining window.vega, window.vegaLite and window.vegaEmbed. Each build is a
 * UMD bundle that would register itself as an AMD module if require.js is on the page (as in
 * nbconvert's HTML), so `define`, `module` and `exports` are shadowed to force the globals.
 */
export function vegaLibrariesScript(): string {
  const parts = [
    minifiedBuild('vega', 'vega.min.js'),
    minifiedBuild('vega-lite', 'vega-lite.min.js'),
    minifiedBuild('vega-embed', 'vega-embed.min.js'),
  ].map((code) => `(function (define, module, exports) {\n${code}\n}).call(window);`);
  return `<script>\n${parts.join('\n')}\n</script>`;
}

/** True the first time it is called in this process, false afterwards. */
export function claimLibraryInlining(): boolean {
  const store = globalThis as unknown as Record<symbol, boolean | undefined>;
  if (store[SENT]) return false;
  store[SENT] = true;
  return true;
}

/** Forget that the scripts were sent (for tests and for a fresh HTML document in the same process). */
export function resetLibraryInlining(): void {
  (globalThis as unknown as Record<symbol, boolean | undefined>)[SENT] = false;
}
