/**
 * A self-contained HTML report: inline CSS, charts as inline SVG, no scripts and no external
 * resources, so the file can be mailed and opened offline. It always ends with the cautions
 * block, whose last sentence is fixed.
 */
import { escapeHtml } from './escape-html';
import { markdownToHtml } from './markdown-lite';

export const STANDING_CAUTION =
  'Results hold only under the simulated assumptions; defer to a qualified statistician and local survey protocols.';

export interface ReportSection {
  heading: string;
  /** Prose in the Markdown subset of markdownToHtml. */
  markdown?: string;
  /** Trusted HTML inserted as is (e.g. from htmlTable); must not load anything from elsewhere. */
  html?: string;
  /** An SVG document (e.g. from specToSvg), inlined. */
  chartSvg?: string;
  /** Fold the section's html and chart under this line (an HTML `<details>` the reader opens); its prose stays visible. */
  collapsed?: string;
}

export interface ReportInput {
  title: string;
  sections: ReportSection[];
  /** Extra cautions listed before the standing one. */
  cautions?: string[];
}

/** Width of the report's text column in CSS pixels; charts are sized to it. */
export const REPORT_CONTENT_WIDTH = 960;

const CSS = `
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: #222; max-width: ${REPORT_CONTENT_WIDTH}px; margin: 2rem auto; padding: 0 1rem; line-height: 1.5; }
h1 { border-bottom: 2px solid #4c78a8; padding-bottom: .3rem; }
h2 { margin-top: 2rem; color: #2b4a6f; }
code { background: #f3f3f3; padding: 0 .2em; border-radius: 3px; }
table.quadrat-table { border-collapse: collapse; margin: 1rem 0; font-variant-numeric: tabular-nums; }
table.quadrat-table th, table.quadrat-table td { padding: .25rem .6rem; border-bottom: 1px solid #ddd; white-space: nowrap; }
div.table-scroll { overflow-x: auto; }
table.quadrat-table thead th { border-bottom: 2px solid #999; }
table.quadrat-table caption { caption-side: top; text-align: left; font-weight: 600; padding-bottom: .3rem; }
figure.chart { margin: 1rem 0; overflow-x: auto; }
figure.chart svg { max-width: 100%; height: auto; }
details > summary { cursor: pointer; color: #2b4a6f; margin: .5rem 0; }
section.cautions { margin-top: 2.5rem; padding: .8rem 1rem; border-left: 4px solid #c0392b; background: #fdf3f2; }
section.cautions h2 { margin-top: 0; color: #c0392b; }
`;

/** Anything that would make the browser fetch something: scripts, stylesheets, frames, remote images. */
const EXTERNAL_REFERENCE = /<script\b[^>]*\bsrc\s*=|<link\b[^>]*\bhref\s*=|<iframe\b|\b(?:src|href|xlink:href)\s*=\s*["']?\s*(?:https?:)?\/\//i;
const SCRIPT = /<script\b/i;

function checkSelfContained(where: string, html: string): void {
  const match = EXTERNAL_REFERENCE.exec(html) ?? SCRIPT.exec(html);
  if (match) {
    throw new Error(`reportHtml ${where}: contains "${match[0]}"; the report must be self-contained (no scripts, no external resources)`);
  }
}

function checkText(where: string, value: unknown): string {
  if (typeof value !== 'string' || value.trim() === '') {
    throw new TypeError(`reportHtml ${where}: expected a non-empty string, got ${value === undefined ? 'undefined' : JSON.stringify(value)}`);
  }
  return value;
}

/** Inline SVG without its XML prolog or doctype, which are not allowed inside HTML. */
function inlineSvg(where: string, svg: string): string {
  const body = svg.replace(/^\s*<\?xml[^>]*\?>\s*/, '').replace(/^\s*<!DOCTYPE[^>]*>\s*/i, '');
  if (!/^<svg\b/.test(body)) throw new Error(`reportHtml ${where}: expected an SVG document starting with "<svg"`);
  checkSelfContained(where, body);
  return body;
}

export function reportHtml(input: ReportInput): string {
  const title = checkText('title', input.title);
  if (!Array.isArray(input.sections)) throw new TypeError('reportHtml sections: expected an array of sections');
  const cautions = input.cautions ?? [];
  if (!Array.isArray(cautions)) throw new TypeError('reportHtml cautions: expected an array of strings');

  const body: string[] = [`<h1>${escapeHtml(title)}</h1>`];
  input.sections.forEach((section, i) => {
    const where = `section ${i + 1}`;
    const heading = checkText(`${where} heading`, section.heading);
    body.push('<section>', `<h2>${escapeHtml(heading)}</h2>`);
    if (section.markdown !== undefined) body.push(markdownToHtml(section.markdown));
    if (section.collapsed !== undefined) body.push(`<details><summary>${escapeHtml(checkText(`${where} collapsed`, section.collapsed))}</summary>`);
    if (section.html !== undefined) {
      checkSelfContained(`${where} ("${heading}") html`, section.html);
      body.push(`<div class="table-scroll">${section.html}</div>`);
    }
    if (section.chartSvg !== undefined) {
      body.push(`<figure class="chart">${inlineSvg(`${where} ("${heading}") chartSvg`, section.chartSvg)}</figure>`);
    }
    if (section.collapsed !== undefined) body.push('</details>');
    body.push('</section>');
  });
  const items = cautions.map((c, i) => `<li>${escapeHtml(checkText(`cautions[${i}]`, c))}</li>`);
  items.push(`<li>${escapeHtml(STANDING_CAUTION)}</li>`);
  body.push('<section class="cautions">', '<h2>Cautions</h2>', `<ul>${items.join('')}</ul>`, '</section>');

  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeHtml(title)}</title>`,
    `<style>${CSS}</style>`,
    '</head>',
    '<body>',
    ...body,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
