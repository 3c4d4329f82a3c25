import { describe, expect, it } from 'vitest';
import { fitDesign } from '../../../kernel-lib/fit/fit-design';
import { contrastTest } from '../../../kernel-lib/fit/inference/contrast-test';
import { handDesign, testRandom, type TermInput } from '../../helpers/simple-design';
import { denseFaiCorneliusF, denseInference, denseKenwardRogerF, denseSatterthwaiteDf } from '../../helpers/dense-inference';

/**
 * The engine's Satterthwaite df (finite differences of the unprofiled criterion) and Kenward-Roger
 * quantities ((q+p)-space algebra) against the textbook n×n formulas computed with ml-matrix
 * (tests/helpers/dense-inference.ts): Satterthwaite (1946) with the observed information of
 * Searle, Casella and McCulloch (1992, §6.3 ML and §6.6 REML); Kenward and Roger (1997, adjusted covariance and §4).
 */
type Kind = 'unbalanced' | 'crossed' | 'nested' | 'slope' | 'independent-slopes';

function generated(kind: Kind, seed: number) {
  const rng = testRandom(seed);
  const X: number[][] = [];
  const y: number[] = [];
  const terms: TermInput[] = [];
  // responses far from 0 on purpose: the finite differences must not suffer from it
  if (kind === 'crossed') {
    const si: number[] = [], yi: number[] = [];
    const bs = Array.from({ length: 6 }, () => rng.normal());
    const by = Array.from({ length: 4 }, () => 0.6 * rng.normal());
    for (let s = 0; s < 6; s++) for (let t = 0; t < 4; t++) for (let k = 0; k < 2 + ((s + t) % 2); k++) {
      const x = rng.normal();
      X.push([1, x]); y.push(120 + 0.5 * x + bs[s] + by[t] + rng.normal()); si.push(s); yi.push(t);
    }
    terms.push({ factor: 'site', index: si }, { factor: 'year', index: yi });
  } else if (kind === 'nested') {
    const si: number[] = [], pi: number[] = [];
    for (let s = 0; s < 5; s++) {
      const bs = rng.normal();
      for (let p = 0; p < 3; p++) {
        const bp = 0.7 * rng.normal();
        for (let k = 0; k < 2 + ((s * p) % 3); k++) {
          const x = rng.uniform();
          X.push([1, x]); y.push(40 + x + bs + bp + 0.5 * rng.normal()); si.push(s); pi.push(s * 3 + p);
        }
      }
    }
    terms.push({ factor: 'site', index: si }, { factor: 'plot', index: pi });
  } else if (kind === 'unbalanced') {
    const gi: number[] = [];
    for (let l = 0; l < 7; l++) {
      const b = rng.normal();
      const xl = rng.normal();
      for (let k = 0; k < 2 + ((l * 7) % 5); k++) { const x = rng.normal(); X.push([1, x, xl]); y.push(60 + b + 0.3 * x + xl + rng.normal()); gi.push(l); }
    }
    terms.push({ factor: 'g', index: gi });
  } else {
    const gi: number[] = [], xs: number[] = [];
    for (let l = 0; l < 8; l++) {
      const b0 = rng.normal();
      const b1 = 0.3 * b0 + 0.5 * rng.normal();
      for (let k = 0; k < 4 + (l % 3); k++) {
        const x = rng.normal();
        X.push([1, x]); y.push(25 + b0 + (0.7 + b1) * x + 0.8 * rng.normal()); gi.push(l); xs.push(x);
      }
    }
    terms.push({ factor: 'g', index: gi, slopes: [xs], slopeNames: ['x'], correlated: kind === 'slope' });
  }
  const names = X[0].length === 3 ? ['intercept', 'x', 'xl'] : ['intercept', 'x'];
  return handDesign(X, names, y, terms);
}

const unit = (p: number, j: number) => Array.from({ length: p }, (_, i) => (i === j ? 1 : 0));
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('Satterthwaite and Kenward-Roger against dense n×n formulas', () => {
  const kinds: Kind[] = ['unbalanced', 'crossed', 'nested', 'slope', 'independent-slopes'];
  for (const kind of kinds) {
    it(`${kind}: Satterthwaite df (REML and ML) match the observed-information formula`, () => {
      for (const estimation of ['REML', 'ML'] as const) {
        const d = generated(kind, 5);
        const fit = fitDesign(d, { estimation, interval: 'satterthwaite' });
        expect(fit.converged).toBe(true);
        expect(fit.singular).toBe(false);
        const dense = denseInference(d, fit, estimation === 'REML');
        for (let j = 0; j < d.p; j++) {
          const expected = denseSatterthwaiteDf(dense, unit(d.p, j), dense.observedInformation);
          // finite differences of the criterion: 1e-6 relative (see kernel-lib/fit/inference/satterthwaite.ts)
          expect(rel(fit.fixed[j].df, expected), `${kind} ${estimation} ${d.fixedNames[j]}`).toBeLessThan(1e-6);
          expect(fit.fixed[j].method).toBe('satterthwaite');
        }
      }
    });

    it(`${kind}: Kenward-Roger adjusted SEs and df match Kenward and Roger's formulas`, () => {
      const d = generated(kind, 5);
      const fit = fitDesign(d, { interval: 'kenward-roger' });
      const dense = denseInference(d, fit, true);
      for (let j = 0; j < d.p; j++) {
        expect(rel(fit.fixed[j].se, Math.sqrt(dense.phiAdjusted.get(j, j)))).toBeLessThan(1e-9);
        // for one contrast the KR df is the Satterthwaite df with the expected information (KR 1997, §4 with ℓ = 1)
        expect(rel(fit.fixed[j].df, denseSatterthwaiteDf(dense, unit(d.p, j), dense.expectedInformation))).toBeLessThan(1e-9);
        for (let k = 0; k < d.p; k++) expect(rel(fit.fixedCov[j * d.p + k], dense.phiAdjusted.get(j, k))).toBeLessThan(1e-8);
      }
      // the adjustment inflates the variances with few groups (Kenward and Roger 1997)
      expect(fit.fixed[0].se).toBeGreaterThan(Math.sqrt(dense.phi.get(0, 0)));
    });
  }

  it('Kenward-Roger F test of two coefficients matches the dense §4 formulas', () => {
    for (const kind of ['unbalanced', 'crossed', 'slope'] as Kind[]) {
      const d = generated(kind, 8);
      const fit = fitDesign(d);
      const L = d.p === 3 ? [[0, 1, 0], [0, 0, 1]] : [[1, 0], [0, 1]];
      const mine = contrastTest(d, fit, L, 'kenward-roger');
      const dense = denseKenwardRogerF(denseInference(d, fit, true), fit.fixed.map((r) => r.estimate), L);
      expect(rel(mine.statistic, dense.statistic), kind).toBeLessThan(1e-8);
      expect(rel(mine.scale, dense.scale), kind).toBeLessThan(1e-8);
      expect(rel(mine.denDf, dense.denDf), kind).toBeLessThan(1e-8);
      expect(mine.numDf).toBe(2);
    }
  });

  it('Satterthwaite F test of two coefficients matches the dense Fai-Cornelius computation', () => {
    for (const kind of ['unbalanced', 'crossed', 'slope'] as Kind[]) {
      const d = generated(kind, 8);
      const fit = fitDesign(d);
      const L = d.p === 3 ? [[0, 1, 0], [0, 0, 1]] : [[1, 0], [0, 1]];
      const mine = contrastTest(d, fit, L, 'satterthwaite');
      const dense = denseFaiCorneliusF(denseInference(d, fit, true), fit.fixed.map((r) => r.estimate), L);
      expect(rel(mine.statistic, dense.statistic), kind).toBeLessThan(1e-9);
      expect(rel(mine.denDf, dense.denDf), kind).toBeLessThan(1e-6);
      expect(mine.scale).toBe(1);
    }
  });

  it('a one-row contrast test gives t² and the interval df', () => {
    const d = generated('unbalanced', 9);
    for (const method of ['satterthwaite', 'kenward-roger'] as const) {
      const fit = fitDesign(d, { interval: method });
      const test = contrastTest(d, fit, [unit(3, 2)], method);
      const row = fit.fixed[2];
      // F(1, ν) = t² (Abramowitz and Stegun 1964, 26.6.13 for the reference distribution)
      expect(rel(test.statistic, (row.estimate / row.se) ** 2)).toBeLessThan(1e-9);
      expect(rel(test.denDf, row.df)).toBeLessThan(1e-9);
    }
  });
});

describe('variance components on the boundary', () => {
  it('a group variance estimated at 0 is held fixed: df = n − p, the residual df, and a warning names it', () => {
    // With only σ² estimated, Φ = σ²(XᵀX)⁻¹ and Var(σ̂²) = 2σ⁴/(n − p) under REML, so ν = n − p exactly
    // (Satterthwaite 1946 with one chi-square component); Kenward-Roger's adjustment vanishes (Φ_A = Φ).
    const rng = testRandom(31);
    const X: number[][] = [];
    const y: number[] = [];
    const g: number[] = [];
    for (let l = 0; l < 6; l++) for (let k = 0; k < 4; k++) { const x = rng.normal(); X.push([1, x]); y.push(2 + x + rng.normal()); g.push(l); }
    // shrink the group means towards the grand mean so that MSB < MSW (REML estimate of σₐ² is 0)
    const means = Array.from({ length: 6 }, (_, l) => y.slice(l * 4, l * 4 + 4).reduce((a, b) => a + b, 0) / 4);
    const grand = y.reduce((a, b) => a + b, 0) / y.length;
    const yb = y.map((v, i) => v - 0.9 * (means[g[i]] - grand));
    const d = handDesign(X, ['intercept', 'x'], yb, [{ factor: 'g', index: g }]);
    for (const interval of ['satterthwaite', 'kenward-roger'] as const) {
      const fit = fitDesign(d, { interval });
      expect(fit.singular).toBe(true);
      for (const row of fit.fixed) expect(Math.abs(row.df - (d.n - d.p)), `${interval} ${row.term}`).toBeLessThan(1e-6 * d.n);
      expect(fit.warnings.join(' ')).toMatch(/var\(g\) on the boundary, held fixed/);
    }
    const kr = fitDesign(d, { interval: 'kenward-roger' });
    const wald = fitDesign(d, { interval: 'wald' });
    kr.fixed.forEach((r, j) => expect(rel(r.se, wald.fixed[j].se)).toBeLessThan(1e-12));
  });
});
