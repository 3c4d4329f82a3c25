import { afterEach, describe, expect, it, vi } from 'vitest';
import { chartBundle, describeSpec, showChart, specToSvg, svgDataUri, VEGA_LITE_MIME } from '../../kernel-lib/display/index';
import { claimLibraryInlining, resetLibraryInlining, vegaLibrariesScript } from '../../kernel-lib/display/vega-libraries';
import { insideTslab } from '../../kernel-lib/display/tslab-bridge';

// Invented counts of quadrats per site.
const barSpec = {
  data: { values: [{ site: 'North', n: 3 }, { site: 'Ditch', n: 5 }, { site: 'Sedge bed', n: 2 }] },
  mark: 'bar',
  encoding: { x: { field: 'site', type: 'nominal' }, y: { field: 'n', type: 'quantitative' } },
};

/** Bar marks in vega's SVG: one <path> per bar with aria-roledescription="bar". */
function barPaths(svg: string): string[] {
  return svg.match(/<path[^>]*aria-roledescription="bar"[^>]*>/g) ?? [];
}

describe('specToSvg', () => {
  it('draws one bar per data row, heights proportional to the value', async () => {
    const svg = await specToSvg(barSpec);
    expect(svg.startsWith('<svg')).toBe(true);
    const bars = barPaths(svg);
    // Vega-Lite documentation (mark "bar"): without aggregation, one bar per data row.
    expect(bars).toHaveLength(3);
    // Vega-Lite documentation (view size, scale): the default continuous height is 200 px and a
    // quantitative bar scale includes zero and is "nice", so the domain here is [0, 5] and a
    // bar of value v is 200 * v / 5 px tall. Bars are in the path's "v<height>" segment.
    const heights = bars.map((p) => Number(/v(-?[\d.]+)h/.exec(p)![1])).sort((a, b) => a - b);
    expect(heights).toEqual([80, 120, 200]);
    // Axis labels are drawn as text even without a canvas (vega estimates their widths).
    expect(svg).toContain('>Sedge bed<');
  });

  it('rejects a non-object spec and reports compile failures with their reason', async () => {
    await expect(specToSvg(null as unknown as object)).rejects.toThrow(/expected a Vega-Lite spec object, got null/);
    await expect(specToSvg({ mark: 'bar', layer: 3 } as object)).rejects.toThrow(/does not compile/);
  });

  it('gives a base64 data URI that decodes back to the SVG (RFC 2397 data URIs)', async () => {
    const svg = await specToSvg(barSpec);
    const uri = svgDataUri(svg);
    expect(uri.startsWith('data:image/svg+xml;base64,')).toBe(true);
    expect(Buffer.from(uri.split(',')[1], 'base64').toString('utf8')).toBe(svg);
  });
});

describe('chartBundle', () => {
  it('holds the Vega-Lite v5 spec, a Markdown image and a text line (Jupyter mime bundle)', async () => {
    const svg = await specToSvg(barSpec);
    const bundle = chartBundle(barSpec, svg, { interactive: false, includeLibraries: false, elementId: 'c1' });
    // JupyterLab's vega extension registers application/vnd.vegalite.v5+json (value from memory).
    expect(bundle[VEGA_LITE_MIME]).toBe(barSpec);
    expect(bundle['text/markdown']).toBe(`<img src="${svgDataUri(svg)}" alt="Chart: bar marks">`);
    expect(bundle['text/plain']).toBe('<Chart: bar marks>');
    expect(bundle['text/html']).toBeUndefined();
  });

  it('adds an interactive view whose inline spec cannot close the script element', async () => {
    const spec = { ...barSpec, title: '</script><b>x</b>' };
    const svg = await specToSvg(spec);
    const html = chartBundle(spec, svg, { interactive: true, includeLibraries: false, elementId: 'c2' })['text/html'] as string;
    expect(html).toContain('<div id="c2" class="quadrat-chart"><img src="data:image/svg+xml;base64,');
    // HTML Living Standard, script data state: "</script" ends the element wherever it appears.
    expect(html.match(/<\/script/gi)).toHaveLength(1);
    expect(html).toContain('\\u003c/script\\u003e');
    expect(html).not.toContain('vegaEmbed=');
  });

  it('inlines the vega builds only when asked, as globals hidden from AMD loaders', async () => {
    const svg = await specToSvg(barSpec);
    const html = chartBundle(barSpec, svg, { interactive: true, includeLibraries: true, elementId: 'c3' })['text/html'] as string;
    const libs = vegaLibrariesScript();
    expect(html.startsWith(libs)).toBe(true);
    expect(libs).not.toMatch(/<script[^>]*\bsrc=/);
    expect(libs).not.toContain('sourceMappingURL');
    expect(libs.match(/\(function \(define, module, exports\) \{/g)).toHaveLength(3);
    // The UMD headers of the three builds (vega, vega-lite, vega-embed) assign these globals.
    for (const global of ['.vega={}', '.vegaLite={}', '.vegaEmbed=']) expect(libs).toContain(global);
  });
});

describe('library inlining flag and console fallback', () => {
  afterEach(() => {
    resetLibraryInlining();
    vi.restoreAllMocks();
  });

  it('claims the inlining once per process', () => {
    resetLibraryInlining();
    expect(claimLibraryInlining()).toBe(true);
    expect(claimLibraryInlining()).toBe(false);
    resetLibraryInlining();
    expect(claimLibraryInlining()).toBe(true);
  });

  it('prints one line instead of displaying when not in a tslab kernel', async () => {
    expect(insideTslab()).toBe(false);
    const log = vi.spyOn(console, 'log').mockImplementation(() => undefined);
    await expect(showChart({ ...barSpec, title: 'Quadrats' })).resolves.toBeUndefined();
    expect(log).toHaveBeenCalledTimes(1);
    expect(String(log.mock.calls[0][0])).toMatch(/^Chart: Quadrats \(\d+ bytes of SVG;/);
  });

  it('describes charts by title, description, mark or layers', () => {
    expect(describeSpec({ title: { text: 'T' } })).toBe('Chart: T');
    expect(describeSpec({ description: 'D', mark: 'bar' })).toBe('Chart: D');
    expect(describeSpec({ mark: { type: 'line' } })).toBe('Chart: line marks');
    expect(describeSpec({ layer: [{}, {}] })).toBe('Chart: 2 layers');
  });
});
