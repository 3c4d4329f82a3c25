import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { metricVsScenario } from '../plots/metric-vs-scenario';
import { sdRecovery } from '../plots/sd-recovery';
import type { MetricRow } from '../study/metrics';
import { parseReplicateCsv } from '../study/replicate-csv';
import type { ReplicateRow } from '../study/replicate-row';
import { readStudy, readingMarkdown, type ReadingOptions } from '../study/reading';
import { gridFields, withScenarioFields } from '../study/scenario-fields';
import { readManifest, type StudyManifest } from '../study/study-folder';
import { htmlTable } from './html-table';
import { reportHtml, type ReportSection } from './report-html';
import { specToSvg } from './spec-to-svg';

export interface StudyResults {
  manifest: StudyManifest;
  metrics: MetricRow[];
  replicates: ReplicateRow[];
}

/** Read a finished study folder (metrics.json, replicates.csv, study.json). */
export function readStudyFolder(folder: string): StudyResults {
  const manifest = readManifest(folder);
  const metricsPath = join(folder, 'metrics.json');
  if (!existsSync(metricsPath)) throw new Error(`"${folder}" has no metrics yet: the study is not complete`);
  const metrics = JSON.parse(readFileSync(metricsPath, 'utf8')) as MetricRow[];
  const replicates = parseReplicateCsv(readFileSync(join(folder, 'replicates.csv'), 'utf8'), 'replicates.csv');
  return { manifest, metrics, replicates };
}

/** The chart sections of a study: coverage, bias and RMSE of each fixed effect, SD recovery. */
export async function studyChartSections(results: StudyResults, options: { parameters?: string[] } = {}): Promise<ReportSection[]> {
  const { manifest } = results;
  const fields = gridFields(manifest.scenarios);
  const x = fields[0];
  const facet = fields[1];
  const metrics = withScenarioFields(results.metrics, manifest.scenarios);
  // chart the fixed effects that every scenario × variant estimates (a year[...] dummy exists only in some)
  const cells = new Set(results.metrics.map((m) => `${m.scenario}\u0000${m.variant}`)).size;
  const coverageCount = new Map<string, number>();
  for (const m of results.metrics) {
    if (m.kind === 'fixed' && m.metric === 'coverage') coverageCount.set(m.parameter, (coverageCount.get(m.parameter) ?? 0) + 1);
  }
  const fixedParams = options.parameters ?? [...coverageCount].filter(([, count]) => count === cells).map(([p]) => p);
  const sections: ReportSection[] = [];
  if (!x) {
    sections.push({ heading: 'Metrics', html: htmlTable(results.metrics.filter((m) => ['coverage', 'bias', 'rmse', 'power'].includes(m.metric)), { mcse: true }) });
    return sections;
  }
  for (const metric of ['coverage', 'bias', 'rmse'] as const) {
    for (const parameter of fixedParams) {
      const spec = metricVsScenario(metrics, { metric, x, facet, parameter });
      sections.push({ heading: `${metric} of ${parameter}`, chartSvg: await specToSvg(spec) });
    }
  }
  const sdParams = [...new Set(results.replicates.filter((r) => r.kind === 'sd').map((r) => r.parameter))];
  const sdRows = withScenarioFields(results.replicates.filter((r) => r.kind === 'sd'), manifest.scenarios);
  for (const parameter of sdParams) {
    try {
      const spec = sdRecovery(sdRows, { x, facet, parameter });
      sections.push({ heading: `Recovery of ${parameter}`, chartSvg: await specToSvg(spec) });
    } catch (e) {
      sections.push({ heading: `Recovery of ${parameter}`, markdown: `Not drawn: ${(e as Error).message}` });
    }
  }
  return sections;
}

/** A self-contained HTML summary of a finished study. */
export async function studyReportHtml(results: StudyResults, title = 'Simulation study', reading: ReadingOptions = {}): Promise<string> {
  const { manifest, metrics } = results;
  const design = manifest.design as { variants?: { name: string }[] };
  const shares = metrics.filter((m) => m.parameter === '*');
  const sections: ReportSection[] = [
    // the answer first, before any table or chart
    { heading: 'The answer in plain words', markdown: readingMarkdown(readStudy(metrics, manifest.scenarios, reading)) },
    {
      heading: 'What was simulated',
      markdown: [
        `${manifest.replicates} replicates in each of ${manifest.scenarios.length} scenarios` +
          (manifest.scenarios.length > 1 ? ` (${manifest.scenarios.map((s) => s.key).join('; ')})` : '') + '.',
        `Analysis variants: ${(design.variants ?? []).map((v) => `**${v.name}**`).join(', ')}.`,
        'Error bars and bands show ±2 Monte Carlo standard errors.',
      ].join('\n\n'),
    },
    ...(await studyChartSections(results)),
    { heading: 'Fit problems', html: htmlTable(shares.map((m) => ({ scenario: m.scenario, variant: m.variant, metric: m.metric, value: m.value, mcse: m.mcse })), { mcse: true }) },
    {
      heading: 'All metrics',
      html: htmlTable(metrics.filter((m) => m.parameter !== '*').map((m) => ({
        scenario: m.scenario, variant: m.variant, parameter: m.parameter, metric: m.metric, value: m.value, mcse: m.mcse, n: m.n,
      })), { mcse: true }),
    },
  ];
  return reportHtml({
    title,
    sections,
    cautions: [
      'Coverage, bias and power describe these simulated designs and truths only; a real survey that differs (other variances, non-normal responses, informative missingness) can behave differently.',
    ],
  });
}
