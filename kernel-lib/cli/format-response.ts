/** The count and detection parts of `quadrat fit` (text and JSON): family, link, response scale, overdispersion. */
import type { FitResult } from '../fit/result';
import { groupPredictions, responseScaleEstimates } from '../fit/rate-and-odds-ratios';
import { formatNumber, renderTable } from '../display/text-table';

const INTEGRATION_WORDS: Record<string, string> = {
  exact: 'exact likelihood (no random effects)',
  laplace: 'Laplace approximation',
  quadrature: 'adaptive Gauss-Hermite quadrature',
};

/** JSON fields of a non-normal fit (nothing for a normal one, whose JSON stays as it was). */
export function responseJson(fit: FitResult, num: (v: number) => number | null): Record<string, unknown> {
  const r = fit.response;
  if (!r) return {};
  return {
    family: r.family,
    link: r.link,
    integration: r.integration,
    ...(r.integration === 'quadrature' ? { nodes: r.nodes } : {}),
    ...(r.aggregation === undefined ? {} : { aggregation: num(r.aggregation) }),
    overdispersion: { pearsonChi2: num(r.pearsonChi2), df: r.residualDf, ratio: num(r.overdispersion) },
    responseScale: responseScaleEstimates(fit).map((x) => ({ term: x.term, quantity: x.quantity, value: num(x.value), lower: num(x.lower), upper: num(x.upper) })),
    groupPredictions: groupPredictions(fit).map((g) => ({ factor: g.factor, level: g.level, quantity: g.quantity, value: num(g.value) })),
  };
}

/** One line naming the family, link and integration, for the header of the text output. */
export function responseHeader(fit: FitResult): string | undefined {
  const r = fit.response;
  if (!r) return undefined;
  return `${r.family} response, ${r.link} link · ${INTEGRATION_WORDS[r.integration] ?? r.integration}${r.integration === 'quadrature' ? ` (${r.nodes} nodes)` : ''}`;
}

/** Text blocks after the fixed-effects table of a non-normal fit. */
export function responseBlocks(fit: FitResult, level: number): string[] {
  const r = fit.response;
  if (!r || fit.failure) return [];
  const out: string[] = [];
  const scale = responseScaleEstimates(fit);
  if (scale.length) {
    out.push('', `On the response scale (${Math.round(level * 100)}% intervals transformed from the ${r.link} scale)`);
    out.push(renderTable(['term', 'quantity', 'value', 'lower', 'upper'], scale.map((x) => [x.term, x.quantity, x.value, x.lower, x.upper])));
  }
  const notes: string[] = [];
  if (r.aggregation !== undefined) notes.push(`aggregation k ${formatNumber(r.aggregation, 4)} (variance μ + μ²/k; small k = clumped counts)`);
  if (Number.isFinite(r.overdispersion)) notes.push(`overdispersion: Pearson χ² ${formatNumber(r.pearsonChi2, 4)} / ${r.residualDf} df = ${formatNumber(r.overdispersion, 3)} (about 1 expected)`);
  if (fit.random.length) notes.push(`random-effect SDs are on the ${r.link} scale; Wald intervals of mixed models for counts and detections are approximate, more so with few groups`);
  if (notes.length) out.push('', ...notes);
  const groups = groupPredictions(fit);
  if (groups.length) {
    out.push('', `Predicted ${groups[0].quantity} per level at the intercept (covariates 0, reference levels, offset 0)`);
    out.push(renderTable(['factor', 'level', groups[0].quantity], groups.map((g) => [g.factor, g.level, g.value])));
  }
  return out;
}
