/**
 * Parametric bootstrap of a count or detection fit (Davison and Hinkley 1997, Bootstrap Methods and
 * their Application, §2.2; percentile intervals §5.2, in ./bootstrap): from the fitted model draw
 * b* ~ N(0, Σ̂) on the link scale, η* = Xβ̂ + offset + Zb*, y* from the family's own draw at
 * g⁻¹(η*) (with the fitted aggregation k for the negative binomial and the observed trials for the
 * binomial), refit with the same family and integration, and keep β* and the random-effect SDs.
 *
 * Resample b draws from its own stream createStream(seed, 'bootstrap', b): the spherical random
 * effects u (engine term order, level by level), then the n responses in row order. A resample
 * is therefore the same whichever worker runs it. A refit that yields no likelihood, does not
 * converge or has no finite maximum (separation: see ../estimate/no-finite-maximum) is a failure:
 * its row is NaN, and failures are counted and reported by summariseBootstrap.
 */
import type { DesignMatrices } from '../../data/design-matrices';
import { RESPONSE_FAMILIES } from '../../family/index';
import { createStream } from '../../random/stream';
import { ProfiledDeviance } from '../profiled-deviance';
import { addDrawnEffects } from './random-draw';
import { estimateCountModel, type CountFitOptions } from '../estimate/count-model';
import { unboundedCoefficients } from '../estimate/no-finite-maximum';

/** What a count resample needs beyond the design and estimates (plain data, structured-cloneable). */
export interface CountResampling {
  options: Omit<CountFitOptions, 'priority' | 'theta'>;
  /** Fitted NB aggregation k (NaN for the other families). */
  aggregation: number;
}

/** Row width of a count resample: the p fixed effects, then every random-effect SD (no residual). */
export function countBootstrapWidth(design: DesignMatrices): number {
  return design.p + design.random.reduce((s, t) => s + t.terms.length, 0);
}

export class CountBootstrapRunner {
  private readonly layout: ProfiledDeviance | null;
  private readonly base: Float64Array;
  private readonly ystar: Float64Array;
  private readonly eta: Float64Array;
  private readonly u: Float64Array;
  private readonly b: Float64Array;
  private readonly resampled: DesignMatrices;
  readonly width: number;

  constructor(
    private readonly design: DesignMatrices,
    private readonly beta: Float64Array,
    private readonly theta: Float64Array,
    private readonly seed: number | string,
    private readonly count: CountResampling,
  ) {
    const { n, p, X } = design;
    const offset = count.options.offset;
    this.base = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = offset ? offset[i] : 0;
      for (let a = 0; a < p; a++) s += X[i * p + a] * beta[a];
      this.base[i] = s;
    }
    this.layout = design.random.length ? new ProfiledDeviance(design, false) : null;
    this.u = new Float64Array(this.layout ? this.layout.q : 0);
    this.b = new Float64Array(this.u.length);
    this.ystar = new Float64Array(n);
    this.eta = new Float64Array(n);
    this.resampled = { ...design, y: this.ystar };
    this.width = countBootstrapWidth(design);
  }

  /** Results of resamples [from, to), row-major (to − from) × width; a failed refit is a row of NaN. */
  run(from: number, to: number): Float64Array {
    const out = new Float64Array((to - from) * this.width);
    for (let b = from; b < to; b++) this.resample(b, out, (b - from) * this.width);
    return out;
  }

  private resample(b: number, out: Float64Array, at: number): void {
    const { design, layout, u, ystar, eta, count } = this;
    const family = RESPONSE_FAMILIES[count.options.family]!;
    const params = { aggregation: count.aggregation };
    const trials = count.options.trials;
    const stream = createStream(this.seed, 'bootstrap', b);
    for (let i = 0; i < u.length; i++) u[i] = stream.normal();
    eta.set(this.base);
    if (layout) {
      layout.setTheta(this.theta);
      addDrawnEffects(layout, u, this.b, 1, eta);
    }
    for (let i = 0; i < design.n; i++) ystar[i] = family.draw(family.linkInverse(eta[i]), stream, params, trials ? trials[i] : 1);
    const est = estimateCountModel(this.resampled, count.options);
    if (!est.converged || !Number.isFinite(est.logLik) || est.estimable.length !== design.p || !finiteMaximum(est.cov, design.p)) {
      out.fill(NaN, at, at + this.width);
      return;
    }
    let c = at;
    for (let a = 0; a < design.p; a++) out[c++] = est.beta[a];
    const fitted = est.layout;
    if (!fitted) return;
    fitted.setTheta(est.theta);
    for (const term of design.random) {
      const s = fitted.termIndex.get(term)!;
      const T = fitted.templates[s];
      const k = fitted.terms[s].k;
      for (let i = 0; i < k; i++) {
        let sum = 0;
        for (let j = 0; j <= i; j++) sum += T[i * k + j] * T[i * k + j];
        out[c++] = Math.sqrt(sum);
      }
    }
  }
}

function finiteMaximum(cov: Float64Array, p: number): boolean {
  return unboundedCoefficients(cov, p).length === 0;
}
