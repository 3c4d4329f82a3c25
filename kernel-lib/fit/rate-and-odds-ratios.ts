/**
 * Estimates of a log- or logit-link fit on the scale people read them: exp(coefficient) is a rate
 * ratio (log link) or an odds ratio (logit link), with its interval transformed the same way (the
 * interval of a monotone function of β; McCullagh and Nelder 1989, §4.4 and §6.2); and the
 * predicted rate or probability of each level of a random-intercept factor, at the intercept
 * (every covariate 0, every categorical at its reference, offset 0).
 */
import type { FitResult } from './result';

export interface ResponseScaleRow {
  term: string;
  /** "rate ratio", "odds ratio", "baseline rate" or "baseline probability". */
  quantity: string;
  value: number;
  lower: number;
  upper: number;
}

export interface GroupPredictionRow {
  factor: string;
  level: string;
  /** "rate" (log link) or "probability" (logit link). */
  quantity: string;
  value: number;
}

const logistic = (x: number) => (x >= 0 ? 1 / (1 + Math.exp(-x)) : Math.exp(x) / (1 + Math.exp(x)));

/** Fixed effects on the response scale; empty for a normal (identity-link) fit. */
export function responseScaleEstimates(fit: FitResult): ResponseScaleRow[] {
  const link = fit.response?.link;
  if (link !== 'log' && link !== 'logit') return [];
  return fit.fixed.filter((r) => !r.aliased).map((r) => {
    if (r.term === 'intercept') {
      const f = link === 'log' ? Math.exp : logistic;
      return { term: r.term, quantity: link === 'log' ? 'baseline rate' : 'baseline probability', value: f(r.estimate), lower: f(r.lower), upper: f(r.upper) };
    }
    return { term: r.term, quantity: link === 'log' ? 'rate ratio' : 'odds ratio', value: Math.exp(r.estimate), lower: Math.exp(r.lower), upper: Math.exp(r.upper) };
  });
}

/** Predicted rate or probability per level of each random intercept, at the intercept. */
export function groupPredictions(fit: FitResult): GroupPredictionRow[] {
  const link = fit.response?.link;
  if (link !== 'log' && link !== 'logit') return [];
  const intercept = fit.fixed.find((r) => r.term === 'intercept');
  if (!intercept || intercept.aliased) return [];
  const f = link === 'log' ? Math.exp : logistic;
  return fit.modes.filter((m) => m.term === 'intercept').map((m) => ({
    factor: m.factor, level: m.level, quantity: link === 'log' ? 'rate' : 'probability', value: f(intercept.estimate + m.mode),
  }));
}
