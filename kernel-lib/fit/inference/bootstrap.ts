/**
 * Parametric bootstrap (Davison and Hinkley 1997, Bootstrap Methods and their Application, §2.2
 * and §5.2): simulate y* = Xβ̂ + Zb* + e* with b* ~ N(0, Σ̂), e* ~ N(0, σ̂²I) from the fitted model,
 * refit with the same criterion, and read percentile intervals off the refitted estimates.
 *
 * Resample b draws from its own stream createStream(seed, 'bootstrap', b): first the spherical
 * random effects u (engine term order, level by level), then the n residuals. So a resample is
 * the same whichever worker runs it and in whatever order, and any one can be rerun alone.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import { ProfiledDeviance } from '../profiled-deviance';
import { optimiseTheta } from '../optimise-theta';
import { createStream } from '../../random/stream';
import { addDrawnEffects } from './random-draw';
import { CountBootstrapRunner, countBootstrapWidth, type CountResampling } from './count-bootstrap';

export const BOOTSTRAP_DEFAULTS = { resamples: 999, seed: 1 };

/** Everything a worker needs to run resamples: plain data only (structured-cloneable). */
export interface BootstrapModel {
  /** Design restricted to its estimable columns. */
  design: DesignMatrices;
  reml: boolean;
  beta: Float64Array;
  theta: Float64Array;
  sigma: number;
  seed: number | string;
  /** Count and detection fits: family, trials, offset, integration and k (./count-bootstrap); sigma is unused. */
  count?: CountResampling;
}

/**
 * Layout of one resample's row of results: the p fixed effects, then the SD of every random
 * component in the design's term order, then the residual SD.
 */
export function bootstrapWidth(design: DesignMatrices): number {
  return design.p + design.random.reduce((s, t) => s + t.terms.length, 0) + 1;
}

/** Row width of a model's resamples (count fits have no residual SD). */
export function modelBootstrapWidth(model: BootstrapModel): number {
  return model.count ? countBootstrapWidth(model.design) : bootstrapWidth(model.design);
}

/** The runner of a model's resamples: normal or count. */
export function createBootstrapRunner(model: BootstrapModel): { width: number; run(from: number, to: number): Float64Array } {
  return model.count
    ? new CountBootstrapRunner(model.design, model.beta, model.theta, model.seed, model.count)
    : new BootstrapRunner(model);
}

/** Runs resamples of one fitted model; reuses one engine instance across resamples. */
class BootstrapRunner {
  private readonly dev: ProfiledDeviance;
  private readonly mean: Float64Array;
  private readonly ystar: Float64Array;
  private readonly u: Float64Array;
  private readonly b: Float64Array;
  readonly width: number;

  constructor(private readonly model: BootstrapModel) {
    const { design, beta } = model;
    this.dev = new ProfiledDeviance(design, model.reml);
    const { n, p, X } = design;
    this.mean = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let a = 0; a < p; a++) s += X[i * p + a] * beta[a];
      this.mean[i] = s;
    }
    this.ystar = new Float64Array(n);
    this.u = new Float64Array(this.dev.q);
    this.b = new Float64Array(this.dev.q);
    this.width = bootstrapWidth(design);
  }

  /** Results of resamples [from, to), row-major (to − from) × width; a failed refit is a row of NaN. */
  run(from: number, to: number): Float64Array {
    const out = new Float64Array((to - from) * this.width);
    for (let b = from; b < to; b++) this.resample(b, out, (b - from) * this.width);
    return out;
  }

  private resample(b: number, out: Float64Array, offset: number): void {
    const { dev, model, ystar, u } = this;
    const { design, theta, sigma } = model;
    const stream = createStream(model.seed, 'bootstrap', b);
    for (let i = 0; i < u.length; i++) u[i] = stream.normal();
    ystar.set(this.mean);
    dev.setTheta(theta);
    // b = σ Λ u per term and level, added through Z
    addDrawnEffects(dev, u, this.b, sigma, ystar);
    for (let i = 0; i < design.n; i++) ystar[i] += sigma * stream.normal();
    dev.setResponse(ystar);
    let thetaStar: Float64Array;
    let ok: boolean;
    if (dev.thetaLength === 0) {
      thetaStar = new Float64Array(0);
      ok = dev.factor(thetaStar);
    } else {
      const opt = optimiseTheta(dev, theta);
      thetaStar = opt.theta;
      ok = Number.isFinite(opt.deviance) && dev.factor(thetaStar);
    }
    if (!ok) {
      out.fill(NaN, offset, offset + this.width);
      return;
    }
    const beta = dev.beta();
    const s2 = dev.sigma2();
    let c = offset;
    for (let a = 0; a < design.p; a++) out[c++] = beta[a];
    const layoutOf = new Map(dev.terms.map((t, s) => [t.term, s]));
    for (const term of design.random) {
      const s = layoutOf.get(term)!;
      const T = dev.templates[s];
      const k = dev.terms[s].k;
      for (let i = 0; i < k; i++) {
        let sum = 0;
        for (let j = 0; j <= i; j++) sum += T[i * k + j] * T[i * k + j];
        out[c++] = Math.sqrt(s2 * sum);
      }
    }
    out[c] = Math.sqrt(s2);
  }
}

export interface PercentileInterval {
  lower: number;
  upper: number;
}

/**
 * Percentile interval of the finite values: the (B+1)α-th and (B+1)(1−α)-th order statistics,
 * interpolated between neighbours (Davison and Hinkley 1997, §5.2).
 * Positions outside 1..B take the extreme value (`clipped`).
 */
export function percentileInterval(values: ArrayLike<number>, level: number): PercentileInterval & { clipped: boolean; count: number } {
  const sorted = Array.from(values).filter(Number.isFinite).sort((a, b) => a - b);
  const B = sorted.length;
  if (B === 0) return { lower: NaN, upper: NaN, clipped: false, count: 0 };
  const alpha = (1 - level) / 2;
  let clipped = false;
  const at = (prob: number): number => {
    let pos = (B + 1) * prob;
    if (Math.abs(pos - Math.round(pos)) < 1e-9) pos = Math.round(pos); // (1 − 0.9)/2 is not exactly 0.05
    if (pos < 1) { clipped = true; return sorted[0]; }
    if (pos > B) { clipped = true; return sorted[B - 1]; }
    const lo = Math.floor(pos);
    const frac = pos - lo;
    return lo >= B ? sorted[B - 1] : sorted[lo - 1] + frac * (sorted[lo] - sorted[lo - 1]);
  };
  return { lower: at(alpha), upper: at(1 - alpha), clipped, count: B };
}

export interface BootstrapSummary {
  /** Per fixed effect (estimable columns), then per random component, then the residual SD. */
  intervals: PercentileInterval[];
  resamples: number;
  failed: number;
  warnings: string[];
  /** All results, resamples × width (for further summaries). */
  samples: Float64Array;
  width: number;
}

/** Percentile intervals from assembled resample rows. */
export function summariseBootstrap(samples: Float64Array, width: number, level: number): BootstrapSummary {
  const resamples = samples.length / width;
  let failed = 0;
  for (let b = 0; b < resamples; b++) if (Number.isNaN(samples[b * width])) failed++;
  const warnings: string[] = [];
  if (failed) warnings.push(`bootstrap: ${failed} of ${resamples} refits failed and were left out of the intervals`);
  const column = new Float64Array(resamples);
  let clipped = false;
  const intervals: PercentileInterval[] = [];
  for (let c = 0; c < width; c++) {
    for (let b = 0; b < resamples; b++) column[b] = samples[b * width + c];
    const iv = percentileInterval(column, level);
    clipped ||= iv.clipped;
    intervals.push({ lower: iv.lower, upper: iv.upper });
  }
  if (clipped) warnings.push(`bootstrap: too few resamples for the ${level} level; an interval end is the most extreme resample (use more resamples)`);
  return { intervals, resamples, failed, warnings, samples, width };
}

/** Run every resample in this thread. */
export function runBootstrapInThread(model: BootstrapModel, resamples: number, onProgress?: (done: number, total: number) => void): Float64Array {
  const runner = createBootstrapRunner(model);
  const out = new Float64Array(resamples * runner.width);
  const chunk = 50;
  for (let from = 0; from < resamples; from += chunk) {
    const to = Math.min(resamples, from + chunk);
    out.set(runner.run(from, to), from * runner.width);
    onProgress?.(to, resamples);
  }
  return out;
}
