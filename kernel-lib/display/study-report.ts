import { existsSync, readFileSync } from 'node:fs';
import { metricVsScenario } from '../plots/metric-vs-scenario';
import { sdRecovery } from '../plots/sd-recovery';
import { failureWarnings } from '../study/failure-warnings';
import { otherScaleNotes } from '../study/variant-scales';
import type { MetricRow } from '../study/metrics';
import { parseReplicateCsv } from '../study/replicate-csv';
import type { ReplicateRow } from '../study/replicate-row';
import { readStudy, readingMarkdown, scenarioLabels, type ReadingOptions } from '../study/reading';
import { gridFields, scenarioFieldName, withScenarioFields } from '../study/scenario-fields';
import { summaryRows } from '../study/summary-rows';
import { readManifest, type StudyManifest } from '../study/study-folder';
import { metricsJsonPath, replicatesPath } from '../study/folder-layout';
import { htmlTable } from './html-table';
import { REPORT_CONTENT_WIDTH, reportHtml, type ReportSection } from './report-html';
import { specToSvg } from './spec-to-svg';

export interface StudyResults {
  manifest: StudyManifest;
  metrics: MetricRow[];
  replicates: ReplicateRow[];
}

/** Read a finished study folder (metrics.json, replicates.csv, study.json). */
export function readStudyFolder(folder: string): StudyResults {
  const manifest = readManifest(folder);
  const metricsPath = metricsJsonPath(folder);
  if (!existsSync(metricsPath)) throw new Error(`"${folder}" has no metrics yet: the study is not complete`);
  const metrics = JSON.parse(readFileSync(metricsPath, 'utf8')) as MetricRow[];
  const replicates = parseReplicateCsv(readFileSync(replicatesPath(folder), 'utf8'), 'replicates.csv');
  return { manifest, metrics, replicates };
}

/** Metrics charted per fixed effect, in this order. */
const CHARTED_METRICS = ['coverage', 'power', 'bias', 'rmse'] as const;

const METRIC_HEADINGS: Record<(typeof CHARTED_METRICS)[number], string> = {
  coverage: 'Coverage',
  power: 'Power',
  bias: 'Bias',
  rmse: 'RMSE',
};

/**
 * Width of one chart panel so that `panels` panels side by side fill the report's text column:
 * about 110 px go to the y axis, its title and the margins, 20 px between panels.
 */
function panelWidth(panels: number, pageWidth = REPORT_CONTENT_WIDTH): number {
  const free = pageWidth - 110 - 20 * Math.max(0, panels - 1);
  return Math.max(140, Math.floor(free / Math.max(1, panels)));
}

/** The study's variants in design order: the one order that fixes each variant's colour in every chart. */
function studyVariants(results: StudyResults): string[] {
  const design = results.manifest.design as { variants?: { name: string }[] };
  const fromDesign = (design.variants ?? []).map((v) => v.name);
  return distinct([...fromDesign, ...results.metrics.map((m) => m.variant), ...results.replicates.map((r) => r.variant)]);
}

/** The chart sections of a study: coverage, power, bias and RMSE of each fixed effect, SD recovery. */
export async function studyChartSections(results: StudyResults, options: { parameters?: string[] } = {}): Promise<ReportSection[]> {
  const { manifest } = results;
  const fields = gridFields(manifest.scenarios);
  const x = fields[0];
  const facet = fields[1];
  const metrics = withScenarioFields(results.metrics, manifest.scenarios);
  // Chart every fixed effect that some variant estimates in every scenario (a year=… dummy that exists
  // only in some scenarios is left to the tables).
  const scenarioCount = manifest.scenarios.length;
  const coverageScenarios = new Map<string, Set<string>>();
  for (const m of results.metrics) {
    if (m.kind !== 'fixed' || m.metric !== 'coverage') continue;
    if (!coverageScenarios.has(m.parameter)) coverageScenarios.set(m.parameter, new Set());
    coverageScenarios.get(m.parameter)!.add(m.scenario);
  }
  const fixedParams = options.parameters ?? [...coverageScenarios].filter(([, sc]) => sc.size === scenarioCount).map(([p]) => p);
  const variants = studyVariants(results);
  const sections: ReportSection[] = [];
  if (!x) {
    sections.push({ heading: 'Metrics', html: htmlTable(results.metrics.filter((m) => ['coverage', 'bias', 'rmse', 'power', 'notEstimableShare'].includes(m.metric)), { mcse: true }) });
    return sections;
  }
  const panels = facet === undefined ? 1 : distinct(metrics.map((m) => m[facet])).length;
  const width = panelWidth(panels);
  for (const metric of CHARTED_METRICS) {
    for (const parameter of fixedParams) {
      const rows = metrics.filter((m) => m.parameter === parameter && m.metric === metric);
      if (rows.length === 0) continue; // e.g. power of a coefficient whose truth is 0 (type I error instead)
      const note = notEstimableNote(results.metrics, parameter);
      // variants with different interval levels are drawn against their own nominal level, one chart each
      const levels = metric === 'coverage' ? distinct(rows.map((m) => m.nominal)) : [undefined];
      for (const level of levels) {
        const mine = levels.length > 1 ? rows.filter((m) => m.nominal === level) : rows;
        const spec = metricVsScenario(mine, { metric, x, facet, parameter, variants, width });
        const heading = `${METRIC_HEADINGS[metric]} of ${parameter}` + (levels.length > 1 ? ` (${percent(level)} intervals)` : '');
        sections.push({ heading, chartSvg: await specToSvg(spec), ...(note ? { markdown: note } : {}) });
      }
    }
  }
  const sdParams = [...new Set(results.replicates.filter((r) => r.kind === 'sd').map((r) => r.parameter))];
  const sdRows = withScenarioFields(results.replicates.filter((r) => r.kind === 'sd'), manifest.scenarios);
  for (const parameter of sdParams) {
    try {
      const spec = sdRecovery(sdRows, { x, facet, parameter, variants, width });
      sections.push({ heading: `Recovery of ${parameter}`, chartSvg: await specToSvg(spec) });
    } catch (e) {
      sections.push({ heading: `Recovery of ${parameter}`, markdown: `Not drawn: ${(e as Error).message}` });
    }
  }
  return sections;
}

function percent(level: number | undefined): string {
  return level === undefined ? 'unknown-level' : `${Number((100 * level).toPrecision(4))}%`;
}

function distinct<T>(values: readonly T[]): T[] {
  return [...new Set(values)];
}

/** Which variants cannot estimate a coefficient (aliased in every replicate of some scenario). */
function notEstimableNote(metrics: readonly MetricRow[], parameter: string): string {
  const never = distinct(metrics.filter((m) => m.parameter === parameter && m.metric === 'notEstimableShare' && m.value === 1).map((m) => m.variant));
  if (!never.length) return '';
  return `Not estimable with ${never.map((v) => `**${v}**`).join(', ')} (aliased with the variant's fixed grouping columns), so ${never.length > 1 ? 'they have' : 'it has'} no points here.`;
}

/** What a count or detection study assumes, and why its Wald intervals are approximate. */
function countCautions(design: { family?: string }): string[] {
  const family = design.family ?? 'gaussian';
  if (family === 'gaussian') return [];
  return [
    `The ${family} responses were drawn exactly from that family around the stated linear predictor, with normal random effects on the link scale and any effort or trials known without error; real counts are often more variable (overdispersion) than that.`,
    'Wald intervals of mixed models for counts and detections are approximate, more so with few groups; the coverage above shows by how much for these designs only.',
  ];
}

/** Metrics of the summary table, in this order. */
const SUMMARY_METRICS = ['coverage', 'power', 'typeIError', 'bias', 'rmse', 'width', 'sdMean', 'sdMedian'];

/**
 * The summary table: every parameter estimated in every scenario (fixed effects and SDs), its true
 * value, and each metric as "value (MCSE)" to the digits the Monte Carlo error supports.
 */
function summaryTableHtml(metrics: readonly MetricRow[], scenarios: StudyManifest['scenarios']): string {
  const labels = scenarioLabels(scenarios);
  const everywhere = new Map<string, Set<string>>();
  for (const m of metrics) {
    if (m.parameter === '*') continue;
    if (!everywhere.has(m.parameter)) everywhere.set(m.parameter, new Set());
    everywhere.get(m.parameter)!.add(m.scenario);
  }
  const kept = metrics.filter((m) => everywhere.get(m.parameter)?.size === scenarios.length);
  const { metrics: shown, rows } = summaryRows(kept, SUMMARY_METRICS);
  return htmlTable(
    rows.map((r) => ({ scenario: labels.get(r.scenario) ?? r.scenario, variant: r.variant, parameter: r.parameter, truth: r.truth, ...r.cells })),
    { columns: ['scenario', 'variant', 'parameter', 'truth', ...shown], caption: 'Each cell: value (Monte Carlo SE), rounded to the digits the Monte Carlo SE supports' },
  );
}

/** "year levels: 3, 4, 6 or 8" for each grid setting. */
function gridInWords(scenarios: StudyManifest['scenarios']): string {
  const paths = scenarios.length ? Object.keys(scenarios[0].values) : [];
  return paths
    .map((path) => {
      const values = distinct(scenarios.map((sc) => String(sc.values[path])));
      const list = values.length > 1 ? `${values.slice(0, -1).join(', ')} or ${values[values.length - 1]}` : values[0];
      return `${scenarioFieldName(path)}: ${list}`;
    })
    .join('; ');
}

/** A self-contained HTML summary of a finished study. */
export async function studyReportHtml(results: StudyResults, title = 'Simulation study', reading: ReadingOptions = {}): Promise<string> {
  const { manifest, metrics } = results;
  const shares = metrics.filter((m) => m.parameter === '*');
  const labels = scenarioLabels(manifest.scenarios);
  const failures = failureWarnings(metrics, labels);
  const allRows = metrics.filter((m) => m.parameter !== '*');
  const sections: ReportSection[] = [
    // failed fits first: every number below describes only the data sets that could be fitted
    ...(failures.length ? [{ heading: 'Failed fits', markdown: failures.map((w) => `- ${w}`).join('\n') }] : []),
    // the answer first, before any table or chart
    { heading: 'The answer in plain words', markdown: readingMarkdown(readStudy(metrics, manifest.scenarios, reading)) },
    {
      heading: 'What was simulated',
      markdown: [
        `${manifest.replicates} replicates in each of ${manifest.scenarios.length} scenario${manifest.scenarios.length === 1 ? '' : 's'}` +
          (manifest.scenarios.length > 1 ? ` (${gridInWords(manifest.scenarios)})` : '') + '.',
        `Analysis variants: ${studyVariants(results).map((v) => `**${v}**`).join(', ')}; each keeps its colour in every chart.`,
        ...otherScaleNotes(metrics).map((n) => `Only power and type I error for ${n.replace(/^([^:]*):/, '**$1**:')}.`),
        'Error bars and bands show ±2 Monte Carlo standard errors.',
      ].join('\n\n'),
    },
    { heading: 'Summary', html: summaryTableHtml(metrics, manifest.scenarios) },
    ...(await studyChartSections(results)),
    {
      heading: 'Fit problems',
      html: htmlTable(shares.map((m) => ({ scenario: labels.get(m.scenario) ?? m.scenario, variant: m.variant, metric: m.metric, value: m.value, mcse: m.mcse })), { mcse: true }),
    },
    {
      heading: 'Appendix: all metrics',
      markdown: 'Every metric of every parameter, scenario and variant (also in `metrics.csv` in the study folder).',
      collapsed: `Show the table (${allRows.length} rows)`,
      html: htmlTable(allRows.map((m) => ({
        scenario: labels.get(m.scenario) ?? m.scenario, variant: m.variant, parameter: m.parameter, metric: m.metric, value: m.value, mcse: m.mcse, n: m.n,
      })), { mcse: true, maxRows: Math.max(500, allRows.length) }),
    },
  ];
  return reportHtml({
    title,
    sections,
    cautions: [
      'Coverage, bias and power describe these simulated designs and truths only; a real survey that differs (other variances, non-normal responses, informative missingness) can behave differently.',
      ...countCautions(manifest.design as { family?: string }),
    ],
  });
}
