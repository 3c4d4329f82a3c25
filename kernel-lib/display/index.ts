/**
 * Display helpers for notebooks (tslab kernel "quadrat-ts") that fall back to console output in
 * Node scripts.
 *
 * In a notebook cell, import this file by its full name,
 *   import { showChart, showTable } from './kernel-lib/display/index';
 * because tslab resolves imports of project .ts files by appending ".js" to the path and does
 * not look for a folder's index. `await showChart(...)`: its SVG is drawn asynchronously.
 */
export { specToSvg, svgDataUri } from './spec-to-svg';
export { showChart, chartBundle, describeSpec, VEGA_LITE_MIME } from './show-chart';
export type { ShowChartOptions, ChartBundleOptions } from './show-chart';
export { htmlTable, textTable, showTable, formatCell } from './html-table';
export type { HtmlTableOptions, TableInput } from './html-table';
export { progressDisplay } from './progress';
export type { Progress, ProgressOptions } from './progress';
export { reportHtml, STANDING_CAUTION } from './report-html';
export type { ReportInput, ReportSection } from './report-html';
export { markdownToHtml } from './markdown-lite';
export { escapeHtml } from './escape-html';
export { insideTslab, displayBundle, renderingToHtml } from './tslab-bridge';
export type { MimeBundle } from './tslab-bridge';
export { resetLibraryInlining } from './vega-libraries';
