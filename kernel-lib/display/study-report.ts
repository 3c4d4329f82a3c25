import { existsSync, readFileSync } from 'node:fs';
import { metricVsScenario } from '../plots/metric-vs-scenario';
import { sdRecovery } from '../plots/sd-recovery';
import { failureWarnings } from '../study/failure-warnings';
import { otherScaleNotes } from '../study/variant-scales';
import type { MetricRow } from '../study/metrics';
import { parseReplicateCsv } from '../study/replicate-csv';
import type { ReplicateRow } from '../study/replicate-row';
import { readStudy, readingMarkdown, type ReadingOptions } from '../study/reading';
import { gridFields, withScenarioFields } from '../study/scenario-fields';
import { readManifest, type StudyManifest } from '../study/study-folder';
import { metricsJsonPath, replicatesPath } from '../study/folder-layout';
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
  const metricsPath = metricsJsonPath(folder);
  if (!existsSync(metricsPath)) throw new Error(`"${folder}" has no metrics yet: the study is not complete`);
  const metrics = JSON.parse(readFileSync(metricsPath, 'utf8')) as MetricRow[];
  const replicates = parseReplicateCsv(readFileSync(replicatesPath(folder), 'utf8'), 'replicates.csv');
  return { manifest, metrics, replicates };
}

/** The chart sections of a study: coverage, bias and RMSE of each fixed effect, SD recovery. */
export async function studyChartSections(results: StudyResults, options: { parameters?: string[] } = {}): Promise<ReportSection[]> {
  const { manifest } = results;
  const fields = gridFields(manifest.scenarios);
  const x = fields[0];
  const facet = fields[1];
  const metrics = withScenarioFields(results.metrics, manifest.scenarios);
  // Chart every fixed effect that some variant estimates in every scenario (a year=… dummy that exists
  // only in some scenarios is left to the tables), keeping every variant in the legend.
  const scenarioCount = manifest.scenarios.length;
  const coverageScenarios = new Map<string, Set<string>>();
  for (const m of results.metrics) {
    if (m.kind !== 'fixed' || m.metric !== 'coverage') continue;
    if (!coverageScenarios.has(m.parameter)) coverageScenarios.set(m.parameter, new Set());
    coverageScenarios.get(m.parameter)!.add(m.scenario);
  }
  const fixedParams = options.parameters ?? [...coverageScenarios].filter(([, sc]) => sc.size === scenarioCount).map(([p]) => p);
  const variants = distinct(results.metrics.map((m) => m.variant));
  const sections: ReportSection[] = [];
  if (!x) {
    sections.push({ heading: 'Metrics', html: htmlTable(results.metrics.filter((m) => ['coverage', 'bias', 'rmse', 'power', 'notEstimableShare'].includes(m.metric)), { mcse: true }) });
    return sections;
  }
  for (const metric of ['coverage', 'bias', 'rmse'] as const) {
    for (const parameter of fixedParams) {
      const rows = metrics.filter((m) => m.parameter === parameter && m.metric === metric);
      const note = notEstimableNote(results.metrics, parameter);
      // variants with different interval levels are drawn against their own nominal level, one chart each
      const levels = metric === 'coverage' ? distinct(rows.map((m) => m.nominal)) : [undefined];
      for (const level of levels) {
        const mine = levels.length > 1 ? rows.filter((m) => m.nominal === level) : rows;
        const spec = metricVsScenario(mine, { metric, x, facet, parameter, variants });
        const heading = levels.length > 1 ? `${metric} of ${parameter} (variants at level ${level})` : `${metric} of ${parameter}`;
        sections.push({ heading, chartSvg: await specToSvg(spec), ...(note ? { markdown: note } : {}) });
      }
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

/** A self-contained HTML summary of a finished study. */
export async function studyReportHtml(results: StudyResults, title = 'Simulation study', reading: ReadingOptions = {}): Promise<string> {
  const { manifest, metrics } = results;
  const design = manifest.design as { variants?: { name: string }[] };
  const shares = metrics.filter((m) => m.parameter === '*');
  const failures = failureWarnings(metrics);
  const sections: ReportSection[] = [
    // failed fits first: every number below describes only the data sets that could be fitted
    ...(failures.length ? [{ heading: 'Failed fits', markdown: failures.map((w) => `- ${w}`).join('\n') }] : []),
    // the answer first, before any table or chart
    { heading: 'The answer in plain words', markdown: readingMarkdown(readStudy(metrics, manifest.scenarios, reading)) },
    {
      heading: 'What was simulated',
      markdown: [
        `${manifest.replicates} replicates in each of ${manifest.scenarios.length} scenarios` +
          (manifest.scenarios.length > 1 ? ` (${manifest.scenarios.map((s) => s.key).join('; ')})` : '') + '.',
        `Analysis variants: ${(design.variants ?? []).map((v) => `**${v.name}**`).join(', ')}.`,
        ...otherScaleNotes(metrics).map((n) => `Only power and type I error for ${n.replace(/^([^:]*):/, '**$1**:')}.`),
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
      ...countCautions(manifest.design as { family?: string }),
    ],
  });
}
