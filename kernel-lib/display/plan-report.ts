/**
 * A self-contained HTML report of a plan: the answer in one sentence first, then the curve of
 * each goal's metric against the varied value, and every evaluated value with its replicates.
 */
import { planCurve } from '../plots/plan-curve';
import { formatMetric } from '../study/format-metric';
import type { PlanResult } from '../study/plan-run';
import { scenarioFieldName } from '../study/scenario-fields';
import { htmlTable } from './html-table';
import { reportHtml, type ReportSection } from './report-html';
import { specToSvg } from './spec-to-svg';

/** The Vega-Lite spec of each goal's curve, in goal order. */
export function planCurveSpecs(result: PlanResult) {
  const xTitle = scenarioFieldName(result.vary);
  return result.goals.map((g, j) =>
    planCurve(
      result.probes.map((p) => ({ value: p.value, estimate: p.goals[j].estimate, mcse: p.goals[j].mcse, replicates: p.replicates, verdict: p.goals[j].verdict })),
      {
        threshold: g.threshold,
        answer: result.answer,
        xTitle,
        yTitle: g.parameter === '*' ? `${g.metric} (${g.variant})` : `${g.metric} of ${g.parameter} (${g.variant})`,
      },
    ),
  );
}

export async function planReportHtml(result: PlanResult, title = 'Sample-size plan'): Promise<string> {
  const specs = planCurveSpecs(result);
  const sections: ReportSection[] = [
    { heading: 'The answer', markdown: result.sentence + (result.interrupted ? '\n\nThe plan was interrupted: run it again to resume.' : '') },
    {
      heading: 'How it was found',
      markdown: [
        `Candidates for \`${result.vary}\`: ${result.values.join(', ')}. Each candidate's replicates come from the same seeded streams as a study with that value.`,
        'A value meets a goal when the estimate is beyond the threshold by at least 1.96 Monte Carlo SEs (95% Monte Carlo confidence); a value that is neither clearly above nor clearly below gets more replicates, up to the cap. The metric is assumed to change monotonically with the varied value.',
      ].join('\n\n'),
    },
  ];
  for (let j = 0; j < specs.length; j++) {
    const g = result.goals[j];
    sections.push({ heading: `Goal ${j + 1}: ${g.metric} ${g.direction === 'atLeast' ? 'at least' : 'at most'} ${g.threshold}`, chartSvg: await specToSvg(specs[j]) });
  }
  sections.push({
    heading: 'Every value evaluated',
    html: htmlTable(result.probes.map((p) => ({
      [scenarioFieldName(result.vary)]: p.value,
      replicates: p.replicates,
      ...Object.fromEntries(p.goals.map((g, j) => [`goal ${j + 1}`, formatMetric(g.estimate, g.mcse)])),
      verdict: p.verdict,
    }))),
  });
  return reportHtml({
    title,
    sections,
    cautions: [
      'The answer holds for the simulated design and true values only; if the variances or effects differ in the field, so does the number needed. Plan over the plausible range of each uncertain value.',
    ],
  });
}
