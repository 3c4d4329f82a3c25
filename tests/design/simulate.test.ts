import { describe, expect, it } from 'vitest';
import { Matrix, inverse, solve } from 'ml-matrix';
import { parseDesign } from '../../kernel-lib/design/parse';
import { TargetProjector } from '../../kernel-lib/design/realised-truth';
import { buildDesign } from '../../kernel-lib/data/build-design';
import type { Columns } from '../../kernel-lib/data/columns';
import { createWorkspace, simulateColumns, simulateInto, simulationPlan, type SimulatedData } from '../../kernel-lib/design/simulate';
import { createStream } from '../../kernel-lib/random/stream';

// All surveys here are invented for the tests.

function example(missing = 0.1): any {
  return {
    seed: 42,
    replicates: 1000,
    factors: [
      { name: 'site', levels: 6 },
      { name: 'year', levels: 3 },
      { name: 'plot', levels: 4, within: 'site' },
    ],
    perCell: 2,
    missing,
    covariates: [
      { name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } },
      { name: 'habitat', varies: 'site', categories: { dry: 0.5, wet: 0.5 } },
    ],
    truth: { fixed: { intercept: 10, rain: 0.5, 'habitat=wet': 1 }, sd: { site: 1, year: 0.5, residual: 2 } },
    variants: [{ name: 'all random', model: { response: 'y', fixed: ['rain', 'habitat'], groups: [{ factor: 'site', as: 'random' }, { factor: 'year', as: 'random' }] } }],
  };
}

function oneWay(sites: number, perCell: number, sdSite: number, sdResidual: number): any {
  return {
    seed: 1,
    replicates: 1,
    factors: [{ name: 'site', levels: sites }],
    perCell,
    truth: { fixed: { intercept: 10 }, sd: { site: sdSite, residual: sdResidual } },
    variants: [{ name: 'random site', model: { response: 'y', groups: [{ factor: 'site', as: 'random' }] } }],
  };
}

const col = (data: SimulatedData, name: string): Float64Array => data.columns[name] as Float64Array;
const labels = (data: SimulatedData, name: string): string[] => data.columns[name] as string[];

/** Mean and sample variance of the values grouped by level index (balanced or not). */
function groupMeans(values: ArrayLike<number>, index: Int32Array, levels: number): Float64Array {
  const sum = new Float64Array(levels);
  const count = new Float64Array(levels);
  for (let i = 0; i < values.length; i++) {
    sum[index[i]] += values[i];
    count[index[i]]++;
  }
  return sum.map((s, g) => s / count[g]);
}

function sampleVariance(x: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) m += x[i];
  m /= x.length;
  let s = 0;
  for (let i = 0; i < x.length; i++) s += (x[i] - m) ** 2;
  return s / (x.length - 1);
}

/** Mean of replicate values and its standard error. */
function meanAndSe(values: number[]): [number, number] {
  const m = values.reduce((a, b) => a + b, 0) / values.length;
  return [m, Math.sqrt(sampleVariance(values) / values.length)];
}

describe('simulateColumns: layout', () => {
  const design = parseDesign(example(0));
  const data = simulateColumns(design, createStream(42, 'layout', 1));

  it('produces every cell perCell times (6 sites × 3 years × 4 plots per site × 2)', () => {
    expect(data.n).toBe(144);
    expect(data.dropped).toBe(0);
    const counts = new Map<string, number>();
    for (let i = 0; i < data.n; i++) {
      const key = `${labels(data, 'site')[i]} ${labels(data, 'year')[i]} ${labels(data, 'plot')[i]}`;
      counts.set(key, (counts.get(key) ?? 0) + 1);
    }
    expect(counts.size).toBe(72);
    expect([...counts.values()].every((c) => c === 2)).toBe(true);
  });

  it('nests plots in sites: four plots per site, each plot in one site', () => {
    const siteOfPlot = new Map<string, Set<string>>();
    for (let i = 0; i < data.n; i++) {
      const p = labels(data, 'plot')[i];
      if (!siteOfPlot.has(p)) siteOfPlot.set(p, new Set());
      siteOfPlot.get(p)!.add(labels(data, 'site')[i]);
    }
    expect(siteOfPlot.size).toBe(24);
    expect([...siteOfPlot.values()].every((s) => s.size === 1)).toBe(true);
    const plotsOfSite1 = [...siteOfPlot.entries()].filter(([, s]) => s.has('site1')).map(([p]) => p).sort();
    expect(plotsOfSite1).toEqual(['plot01', 'plot02', 'plot03', 'plot04']);
  });

  it('keeps a site-level covariate constant within each site and level indices in label order', () => {
    const bySite = new Map<string, Set<string>>();
    for (let i = 0; i < data.n; i++) {
      const s = labels(data, 'site')[i];
      if (!bySite.has(s)) bySite.set(s, new Set());
      bySite.get(s)!.add(labels(data, 'habitat')[i]);
      expect(design.factors[0].labels[data.levelIndex.site[i]]).toBe(s);
    }
    expect([...bySite.values()].every((h) => h.size === 1)).toBe(true);
  });

  it('returns columns of length n and realised effects for factors with an SD', () => {
    for (const name of ['site', 'year', 'plot', 'rain', 'habitat', 'y']) expect(data.columns[name].length).toBe(data.n);
    expect(Object.keys(data.effects)).toEqual(['site', 'year']);
    expect(data.effects.site.values.length).toBe(6);
  });
});

describe('simulateColumns: determinism', () => {
  const design = parseDesign(example());

  it('gives identical columns for the same stream key and different ones for another replicate', () => {
    const a = simulateColumns(design, createStream(42, 'base', 3));
    const b = simulateColumns(design, createStream(42, 'base', 3));
    const c = simulateColumns(design, createStream(42, 'base', 4));
    expect(b.columns).toEqual(a.columns);
    expect(b.rowIds).toEqual(a.rowIds);
    expect(Array.from(col(c, 'y').subarray(0, 5))).not.toEqual(Array.from(col(a, 'y').subarray(0, 5)));
  });

  it('gives the same data through the reusable workspace', () => {
    const ws = createWorkspace(simulationPlan(design));
    for (let r = 0; r < 5; r++) {
      const fresh = simulateColumns(design, createStream(42, 'ws', r));
      const reused = simulateInto(ws, createStream(42, 'ws', r));
      expect(reused.n).toBe(fresh.n);
      expect(Array.from(col(reused, 'y'))).toEqual(Array.from(col(fresh, 'y')));
      expect(labels(reused, 'plot')).toEqual(labels(fresh, 'plot'));
      expect(Array.from(reused.effects.site.values)).toEqual(Array.from(fresh.effects.site.values));
    }
  });

  it('does not let a fresh result change when the design is simulated again', () => {
    const a = simulateColumns(design, createStream(1, 'keep'));
    const y = Array.from(col(a, 'y'));
    simulateColumns(design, createStream(2, 'keep'));
    expect(Array.from(col(a, 'y'))).toEqual(y);
  });
});

describe('simulateColumns: moments over replicates', () => {
  it('drops observations with the missing probability (within 4 standard errors)', () => {
    // Binomial proportion, SE sqrt(p(1-p)/N) (textbook).
    const design = parseDesign(example(0.1));
    let dropped = 0;
    let rows = 0;
    for (let r = 0; r < 300; r++) {
      const d = simulateColumns(design, createStream(5, 'missing', r));
      dropped += d.dropped;
      rows += d.n + d.dropped;
    }
    expect(rows).toBe(300 * 144);
    expect(Math.abs(dropped / rows - 0.1)).toBeLessThan(4 * Math.sqrt((0.1 * 0.9) / rows));
  });

  it('gives site means with variance sd_site² + sd_e²/m (one-way random model)', () => {
    // Balanced one-way random model: Var(ybar_i) = sigma_a² + sigma_e²/m and E[within-site variance] = sigma_e²
    // (Searle, Casella and McCulloch 1992, Variance Components, ch. 3).
    const design = parseDesign(oneWay(40, 5, 1, 2));
    const between: number[] = [];
    const within: number[] = [];
    for (let r = 0; r < 300; r++) {
      const d = simulateColumns(design, createStream(9, 'oneway', r));
      const means = groupMeans(col(d, 'y'), d.levelIndex.site, 40);
      between.push(sampleVariance(means));
      let ss = 0;
      for (let i = 0; i < d.n; i++) ss += (col(d, 'y')[i] - means[d.levelIndex.site[i]]) ** 2;
      within.push(ss / (d.n - 40));
    }
    const [b, bse] = meanAndSe(between);
    const [w, wse] = meanAndSe(within);
    expect(Math.abs(b - (1 + 4 / 5))).toBeLessThan(4 * bse);
    expect(Math.abs(w - 4)).toBeLessThan(4 * wse);
  });

  it('builds y from the truth exactly: residuals have mean 0 and variance sd_residual²', () => {
    // A small residual SD makes any error in the linear predictor show in the residual variance.
    const input = {
      seed: 3,
      replicates: 1,
      factors: [{ name: 'site', levels: 30 }, { name: 'year', levels: 4 }],
      perCell: 3,
      covariates: [
        { name: 'rain', varies: 'observation', normal: { mean: 1, sd: 2 } },
        { name: 'temp', varies: 'site', uniform: { min: 0, max: 10 } },
        { name: 'habitat', varies: 'observation', categories: { dry: 0.3, wet: 0.5, marsh: 0.2 } },
      ],
      truth: {
        fixed: { intercept: 2, rain: 0.5, temp: -0.1, 'habitat=wet': 1, 'habitat=marsh': -1, 'rain:habitat=wet': 0.3, 'year=year2': 0.7 },
        sd: { site: 1, residual: 0.1 },
        slopes: { site: { rain: 0.4 } },
        correlations: { site: { 'intercept:rain': 0.6 } },
      },
      variants: [{ name: 'm', model: { response: 'y', fixed: ['rain', 'temp', 'habitat'], groups: [{ factor: 'site', as: 'random', slopes: ['rain'] }] } }],
    };
    const design = parseDesign(input);
    const resid: number[] = [];
    const b0: number[] = [];
    const b1: number[] = [];
    const habitatCounts: Record<string, number> = { dry: 0, wet: 0, marsh: 0 };
    const temps: number[] = [];
    let rows = 0;
    for (let r = 0; r < 100; r++) {
      const d = simulateColumns(design, createStream(3, 'truth', r));
      const e = d.effects.site;
      expect(e.terms).toEqual(['intercept', 'rain']);
      for (let g = 0; g < 30; g++) {
        b0.push(e.values[2 * g]);
        b1.push(e.values[2 * g + 1]);
      }
      const tempOfSite = new Map<number, number>();
      for (let i = 0; i < d.n; i++) {
        const rain = col(d, 'rain')[i];
        const temp = col(d, 'temp')[i];
        const h = labels(d, 'habitat')[i];
        const s = d.levelIndex.site[i];
        if (tempOfSite.has(s)) expect(tempOfSite.get(s)).toBe(temp);
        else {
          tempOfSite.set(s, temp);
          temps.push(temp);
        }
        habitatCounts[h]++;
        const eta =
          2 + 0.5 * rain - 0.1 * temp + (h === 'wet' ? 1 + 0.3 * rain : 0) + (h === 'marsh' ? -1 : 0) +
          (labels(d, 'year')[i] === 'year2' ? 0.7 : 0) + e.values[2 * s] + e.values[2 * s + 1] * rain;
        resid.push(col(d, 'y')[i] - eta);
      }
      rows += d.n;
    }
    // Normal residuals: mean SE sigma/sqrt(N), variance SE sigma² sqrt(2/N) (textbook).
    const N = resid.length;
    const m = resid.reduce((a, b) => a + b, 0) / N;
    expect(Math.abs(m)).toBeLessThan((4 * 0.1) / Math.sqrt(N));
    expect(Math.abs(sampleVariance(resid) - 0.01)).toBeLessThan(4 * 0.01 * Math.sqrt(2 / N));

    // Random effects: SD SE sigma/sqrt(2n); correlation SE (1 - rho²)/sqrt(n) (Fisher's large-sample result).
    const n = b0.length;
    const sd0 = Math.sqrt(sampleVariance(b0));
    const sd1 = Math.sqrt(sampleVariance(b1));
    expect(Math.abs(sd0 - 1)).toBeLessThan(4 / Math.sqrt(2 * n));
    expect(Math.abs(sd1 - 0.4)).toBeLessThan((4 * 0.4) / Math.sqrt(2 * n));
    const m0 = b0.reduce((a, b) => a + b, 0) / n;
    const m1 = b1.reduce((a, b) => a + b, 0) / n;
    let cov = 0;
    for (let i = 0; i < n; i++) cov += (b0[i] - m0) * (b1[i] - m1);
    const rho = cov / (n - 1) / (sd0 * sd1);
    expect(Math.abs(rho - 0.6)).toBeLessThan((4 * (1 - 0.36)) / Math.sqrt(n));

    // Categories with probabilities 0.3/0.5/0.2, binomial SE per category.
    for (const [h, p] of [['dry', 0.3], ['wet', 0.5], ['marsh', 0.2]] as const) {
      expect(Math.abs(habitatCounts[h] / rows - p)).toBeLessThan(4 * Math.sqrt((p * (1 - p)) / rows));
    }
    // Uniform(0, 10) site values: mean 5, variance 100/12.
    expect(Math.abs(temps.reduce((a, b) => a + b, 0) / temps.length - 5)).toBeLessThan(4 * Math.sqrt(100 / 12 / temps.length));
  });

  it('puts the stated share of a covariate\'s variance between sites', () => {
    // x = mu + sd (sqrt(s) a_site + sqrt(1-s) e): a one-way random model with sigma_a² = s sd², sigma_e² = (1-s) sd².
    // Expected site-mean variance sigma_a² + sigma_e²/m and total sample variance sigma_e² + sigma_a² (N-m)/(N-1)
    // (Searle, Casella and McCulloch 1992, ch. 3, expected sums of squares of the balanced one-way model).
    const input = {
      ...oneWay(50, 4, 0, 1),
      covariates: [{ name: 'x', varies: 'observation', normal: { mean: 1, sd: 2 }, between: { factor: 'site', share: 0.8 } }],
    };
    const design = parseDesign(input);
    const between: number[] = [];
    const total: number[] = [];
    for (let r = 0; r < 300; r++) {
      const d = simulateColumns(design, createStream(4, 'conf', r));
      between.push(sampleVariance(groupMeans(col(d, 'x'), d.levelIndex.site, 50)));
      total.push(sampleVariance(col(d, 'x')));
    }
    const sa2 = 0.8 * 4;
    const se2 = 0.2 * 4;
    const [b, bse] = meanAndSe(between);
    const [t, tse] = meanAndSe(total);
    expect(Math.abs(b - (sa2 + se2 / 4))).toBeLessThan(4 * bse);
    expect(Math.abs(t - (se2 + (sa2 * (200 - 4)) / 199))).toBeLessThan(4 * tse);
  });
});

describe('simulateColumns: a covariate correlated with the group effects', () => {
  it('gives the between-site part the stated correlation with the realised site intercepts, keeping its variance', () => {
    // one observation per site, share 1: x_g = mu + sd a_g with a_g = rho z_g + sqrt(1 - rho²) f_g (types.ts BetweenSpec).
    // Sample correlation of m pairs has SE about (1 - rho²)/sqrt(m) (Fisher 1921; common practice, no source).
    const m = 3000;
    const input = {
      ...oneWay(m, 1, 1.5, 1),
      covariates: [{ name: 'x', varies: 'observation', normal: { mean: 0, sd: 2 }, between: { factor: 'site', share: 1, correlation: 0.6 } }],
    };
    const d = simulateColumns(parseDesign(input), createStream(9, 'corr'));
    const x = Array.from(col(d, 'x'));
    const b = Array.from(d.effects.site.values);
    const mx = x.reduce((a, v) => a + v, 0) / m;
    const mb = b.reduce((a, v) => a + v, 0) / m;
    let sxx = 0, sbb = 0, sxb = 0;
    for (let g = 0; g < m; g++) { sxx += (x[g] - mx) ** 2; sbb += (b[g] - mb) ** 2; sxb += (x[g] - mx) * (b[g] - mb); }
    const r = sxb / Math.sqrt(sxx * sbb);
    expect(Math.abs(r - 0.6)).toBeLessThan(4 * (1 - 0.36) / Math.sqrt(m));
    expect(Math.abs(sxx / (m - 1) / 4 - 1)).toBeLessThan(4 * Math.sqrt(2 / m)); // variance sd² = 4 (chi-square SE)
  });
});

describe('simulateColumns: unequal group sizes', () => {
  it('uses the given observations per cell for each level', () => {
    const input = { ...oneWay(6, 2, 1, 1), factors: [{ name: 'site', levels: 6 }, { name: 'year', levels: 2 }], unequal: { factor: 'site', sizes: [1, 2, 3, 4, 5, 6] } };
    const d = simulateColumns(parseDesign(input), createStream(1, 'sizes'));
    const counts = new Array(6).fill(0);
    for (let i = 0; i < d.n; i++) counts[d.levelIndex.site[i]]++;
    expect(counts).toEqual([2, 4, 6, 8, 10, 12]);
  });

  it('draws sizes from cv once, the same in every parse, with mean perCell', () => {
    const input = { ...oneWay(200, 10, 1, 1), unequal: { factor: 'site', cv: 0.5 } };
    const a = parseDesign(input).unequal!.sizes;
    const b = parseDesign(input).unequal!.sizes;
    expect(a).toEqual(b);
    expect(new Set(a).size).toBeGreaterThan(5);
    expect(Math.min(...a)).toBeGreaterThanOrEqual(1);
    // Log-normal multipliers with mean 1 and CV 0.5: sample mean SE 0.5/sqrt(200) (rounding adds < 0.05/10).
    const mean = a.reduce((x, y) => x + y, 0) / a.length / 10;
    expect(Math.abs(mean - 1)).toBeLessThan(4 * (0.5 / Math.sqrt(200)) + 0.005);
    expect(parseDesign({ ...input, seed: 2 }).unequal!.sizes).not.toEqual(a);
  });
});

describe('TargetProjector', () => {
  it('matches an OLS fit when a random year factor enters as fixed', () => {
    // Least squares by ml-matrix (general-purpose library) on X = [1, rain, year2..year4]; with 200
    // observations per year its estimates lie within 4 SE of the realised contrasts, not of truth.fixed.
    const input = {
      seed: 11,
      replicates: 1,
      factors: [{ name: 'year', levels: 4 }],
      perCell: 200,
      covariates: [{ name: 'rain', varies: 'observation', normal: { mean: 0, sd: 1 } }],
      truth: { fixed: { intercept: 10, rain: 0.5 }, sd: { year: 1, residual: 0.5 } },
      variants: [{ name: 'year fixed', model: { response: 'y', fixed: ['rain'], groups: [{ factor: 'year', as: 'fixed' }] } }],
    };
    const design = parseDesign(input);
    const variant = design.variants[0];
    expect(variant.coefficients).toEqual(['intercept', 'rain', 'year=year2', 'year=year3', 'year=year4']);
    const d = simulateColumns(design, createStream(11, 'realised'));
    const X = new Matrix(d.n, 5);
    const y = Matrix.columnVector(Array.from(col(d, 'y')));
    for (let i = 0; i < d.n; i++) {
      X.set(i, 0, 1);
      X.set(i, 1, col(d, 'rain')[i]);
      for (let l = 1; l < 4; l++) X.set(i, 1 + l, d.levelIndex.year[i] === l ? 1 : 0);
    }
    const beta = solve(X, y);
    const cov = inverse(X.transpose().mmul(X)).mul(0.25);
    const built = buildDesign(d.columns as Columns, variant.model);
    const targets = new TargetProjector(design, variant).targets(d, built.X, built.n, built.p, built.rowIds, built.fixedNames, []);
    const truth = Object.fromEntries(variant.coefficients.map((c, j) => [c, targets[j]]));
    const b = d.effects.year.values;
    expect(truth.intercept).toBeCloseTo(10 + b[0], 12);
    expect(truth['year=year3']).toBeCloseTo(b[2] - b[0], 12);
    variant.coefficients.forEach((name, j) => {
      expect(Math.abs(beta.get(j, 0) - truth[name])).toBeLessThan(4 * Math.sqrt(cov.get(j, j)));
    });
  });
});
