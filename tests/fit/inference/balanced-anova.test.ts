import { describe, expect, it } from 'vitest';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { termTest } from '../../../kernel-lib/fit/inference/contrast-test';
import { handDesign, testRandom } from '../../helpers/simple-design';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const mean = (v: number[]) => v.reduce((a, b) => a + b, 0) / v.length;

/** Balanced one-way layout, m groups × r observations, around `offset`. */
function oneWay(seed: number, m: number, r: number, offset = 250) {
  const rng = testRandom(seed);
  const y: number[] = [];
  const g: number[] = [];
  for (let l = 0; l < m; l++) {
    const b = 2 * rng.normal();
    for (let j = 0; j < r; j++) { y.push(offset + b + rng.normal()); g.push(l); }
  }
  const groupMeans = Array.from({ length: m }, (_, l) => mean(y.slice(l * r, (l + 1) * r)));
  const grand = mean(y);
  let ssw = 0;
  for (let l = 0; l < m; l++) for (let j = 0; j < r; j++) ssw += (y[l * r + j] - groupMeans[l]) ** 2;
  const msb = (r * groupMeans.reduce((s, v) => s + (v - grand) ** 2, 0)) / (m - 1);
  const msw = ssw / (m * (r - 1));
  return { design: handDesign(y.map(() => [1]), ['intercept'], y, [{ factor: 'g', index: g }]), grand, msb, msw };
}

describe('balanced one-way random model: the classical interval for the mean', () => {
  // Searle, Casella and McCulloch (1992), Variance Components, ch. 3 (balanced one-way classification):
  // ȳ.. has variance (σₑ² + rσₐ²)/(mr), estimated without bias by MSB/(mr) with MSB ~ (σₑ² + rσₐ²)χ²_{m−1}/(m−1),
  // so the exact interval is ȳ.. ± t_{m−1} √(MSB/(mr)). With MSB > MSW the REML estimate gives the same
  // variance, and both Satterthwaite and Kenward-Roger df equal m − 1.
  const cases: [number, number, number, number][] = [[1, 3, 4, 0], [2, 4, 5, 0], [3, 5, 3, 0], [4, 8, 6, 0], [5, 12, 2, 0], [1, 3, 4, 250], [4, 8, 6, 250], [5, 12, 2, 250]];
  it.each(cases)('seed %i, %i groups × %i around %i: df = groups − 1 and the interval is the classical one', (seed, m, r, offset) => {
    const { design, grand, msb, msw } = oneWay(seed, m, r, offset);
    expect(msb).toBeGreaterThan(msw); // precondition: the REML estimate is interior
    const half = (df: number) => {
      const q = { 2: 4.302652729911275, 3: 3.182446305284263, 4: 2.7764451051977987, 7: 2.3646242510102993, 11: 2.200985160082949 }[df]!;
      return q * Math.sqrt(msb / (m * r)); // t quantiles: scipy 1.10.1 stats.t.ppf(0.975, df)
    };
    // Tolerance: around 0 the REML optimum is located to ~1e-8 and the df agree to ~1e-6. Around 250
    // residual SDs the engine's cross-products lose about six digits, θ̂ is located to ~1e-6 and the
    // df follow to ~3e-5.
    const tol = offset === 0 ? 2e-6 : 1e-4;
    for (const interval of ['satterthwaite', 'kenward-roger'] as const) {
      const fit = fitDesign(design, { interval });
      const row = fit.fixed[0];
      expect(fit.singular).toBe(false);
      expect(Math.abs(row.df - (m - 1)), interval).toBeLessThan(tol * (m - 1));
      expect(Math.abs(row.estimate - grand)).toBeLessThan(1e-12 * Math.max(1, offset));
      expect(rel(row.se, Math.sqrt(msb / (m * r))), interval).toBeLessThan(tol);
      expect(rel(row.upper - row.estimate, half(m - 1)), interval).toBeLessThan(tol);
      expect(rel(row.estimate - row.lower, half(m - 1)), interval).toBeLessThan(tol);
    }
  });

  it('Wald is narrower than the classical interval (why it is not the default)', () => {
    const { design, msb } = oneWay(2, 4, 5);
    const wald = fitDesign(design, { interval: 'wald' }).fixed[0];
    const satt = fitDesign(design, { interval: 'satterthwaite' }).fixed[0];
    expect(wald.upper - wald.lower).toBeLessThan(0.75 * (satt.upper - satt.lower)); // z = 1.96 vs t₃ = 3.18
    expect(rel(wald.se, Math.sqrt(msb / 20))).toBeLessThan(1e-6);
  });
});

/**
 * Balanced split-plot in randomised blocks: r blocks (random), whole-plot factor A (a levels) on
 * whole plots within blocks (random block:A), sub-plot factor B (b levels). Columns are
 * sum-to-zero (effect) coded so the A, B and A:B coefficients are the classical main effects and
 * interaction, named as the data layer names them.
 */
function splitPlot(seed: number, r: number, a: number, b: number) {
  const rng = testRandom(seed);
  const alpha = Array.from({ length: a }, (_, i) => 0.8 * i);
  const beta = Array.from({ length: b }, (_, j) => 0.5 * j - 0.6);
  const blockEffects = Array.from({ length: r }, () => 1.5 * rng.normal());
  const rows: { k: number; i: number; j: number; y: number }[] = [];
  for (let k = 0; k < r; k++) {
    for (let i = 0; i < a; i++) {
      const wp = rng.normal();
      for (let j = 0; j < b; j++) rows.push({ k, i, j, y: 80 + alpha[i] + beta[j] + 0.3 * i * j + blockEffects[k] + wp + 0.7 * rng.normal() });
    }
  }
  const effect = (level: number, levels: number, c: number) => (level === c + 1 ? 1 : level === 0 ? -1 : 0);
  const names = ['intercept'];
  for (let c = 0; c < a - 1; c++) names.push(`A=${c + 2}`);
  for (let c = 0; c < b - 1; c++) names.push(`B=${c + 2}`);
  for (let c = 0; c < a - 1; c++) for (let e = 0; e < b - 1; e++) names.push(`A=${c + 2}:B=${e + 2}`);
  const X = rows.map(({ i, j }) => {
    const ea = Array.from({ length: a - 1 }, (_, c) => effect(i, a, c));
    const eb = Array.from({ length: b - 1 }, (_, c) => effect(j, b, c));
    return [1, ...ea, ...eb, ...ea.flatMap((u) => eb.map((v) => u * v))];
  });
  const y = rows.map((row) => row.y);
  const design = handDesign(X, names, y, [
    { factor: 'block', index: rows.map((row) => row.k) },
    { factor: 'wholeplot', index: rows.map((row) => row.k * a + row.i) },
  ]);
  return { design, rows };
}

/** Classical split-plot ANOVA from sums of squares (Montgomery, Design and Analysis of Experiments, 8th ed. 2013, ch. 14, split-plot design). */
function splitPlotAnova(rows: { k: number; i: number; j: number; y: number }[], r: number, a: number, b: number) {
  const grand = mean(rows.map((x) => x.y));
  const by = (f: (x: typeof rows[number]) => string) => {
    const m = new Map<string, number[]>();
    for (const x of rows) m.set(f(x), [...(m.get(f(x)) ?? []), x.y]);
    return new Map([...m].map(([key, v]) => [key, mean(v)]));
  };
  const mk = by((x) => `${x.k}`), mi = by((x) => `${x.i}`), mj = by((x) => `${x.j}`);
  const mki = by((x) => `${x.k},${x.i}`), mij = by((x) => `${x.i},${x.j}`);
  let ssBlock = 0, ssA = 0, ssWp = 0, ssB = 0, ssAB = 0, ssTotal = 0;
  for (const [, v] of mk) ssBlock += a * b * (v - grand) ** 2;
  for (const [, v] of mi) ssA += r * b * (v - grand) ** 2;
  for (const [key, v] of mki) { const [k, i] = key.split(','); ssWp += b * (v - mk.get(k)! - mi.get(i)! + grand) ** 2; }
  for (const [, v] of mj) ssB += r * a * (v - grand) ** 2;
  for (const [key, v] of mij) { const [i, j] = key.split(','); ssAB += r * (v - mi.get(i)! - mj.get(j)! + grand) ** 2; }
  for (const x of rows) ssTotal += (x.y - grand) ** 2;
  const ssE = ssTotal - ssBlock - ssA - ssWp - ssB - ssAB;
  const dfWp = (r - 1) * (a - 1);
  const dfE = a * (r - 1) * (b - 1);
  const ms = { block: ssBlock / (r - 1), wp: ssWp / dfWp, e: ssE / dfE };
  return {
    ms,
    A: { F: ssA / (a - 1) / ms.wp, df: dfWp },
    B: { F: ssB / (b - 1) / ms.e, df: dfE },
    AB: { F: ssAB / ((a - 1) * (b - 1)) / ms.e, df: dfE },
  };
}

describe('balanced split-plot: F tests equal the classical ANOVA', () => {
  // Kenward and Roger (1997) show their method reproduces the exact F tests of balanced designs; the Fai-Cornelius Satterthwaite F does too when every eigen-contrast has the
  // same error stratum. Textbook df: whole plot (r−1)(a−1), sub plot a(r−1)(b−1).
  const r = 4, a = 3, b = 4;
  for (const seed of [3, 17]) {
    it(`seed ${seed}: A on (2, 6) df, B on (3, 27) df and A:B on (6, 27) df`, () => {
      const { design, rows } = splitPlot(seed, r, a, b);
      const classical = splitPlotAnova(rows, r, a, b);
      // precondition: the REML estimates equal the ANOVA ones (no variance truncated at 0)
      expect(classical.ms.block).toBeGreaterThan(classical.ms.wp);
      expect(classical.ms.wp).toBeGreaterThan(classical.ms.e);
      const fit = fitDesign(design);
      expect(fit.converged && !fit.singular).toBe(true);
      for (const [term, ref, numDf] of [['A', classical.A, a - 1], ['B', classical.B, b - 1], ['A:B', classical.AB, (a - 1) * (b - 1)]] as const) {
        for (const method of ['kenward-roger', 'satterthwaite'] as const) {
          // the columns are sum-to-zero coded, so the coefficients themselves are the classical effects:
          // test them as they are (the default marginal rows assume the data layer's treatment coding)
          const t = termTest(design, fit, term, method, 'reference');
          expect(t.numDf).toBe(numDf);
          // tolerance: the two-parameter REML optimum is located to about 1e-5 (Nelder-Mead), hence 1e-4
          expect(rel(t.statistic, ref.F), `${method} ${term} F`).toBeLessThan(1e-4);
          expect(rel(t.denDf, ref.df), `${method} ${term} df`).toBeLessThan(1e-4);
          if (method === 'kenward-roger') expect(Math.abs(t.scale - 1), `${term} λ`).toBeLessThan(1e-4);
        }
      }
    });
  }
});
