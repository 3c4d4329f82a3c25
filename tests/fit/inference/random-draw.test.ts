/**
 * addDrawnEffects (kernel-lib/fit/inference/random-draw.ts) against the dense product scale·Z·Λ·u
 * built independently with ml-matrix (Bates et al. 2015, J. Stat. Softw. 67(1), §2: b = Λu, Zb).
 */
import { describe, expect, it } from 'vitest';
import { Matrix } from 'ml-matrix';
import { ProfiledDeviance } from '../../../kernel-lib/fit/profiled-deviance';
import { addDrawnEffects } from '../../../kernel-lib/fit/inference/random-draw';
import { handDesign, testRandom } from '../../helpers/simple-design';

describe('random effects drawn through Z', () => {
  it('equal scale · Z Λ u for a correlated random slope crossed with a random intercept', () => {
    const rng = testRandom(12);
    const n = 30;
    const x = Array.from({ length: n }, () => rng.normal());
    const site = Array.from({ length: n }, (_, i) => i % 5);
    const year = Array.from({ length: n }, (_, i) => Math.floor(i / 10));
    const design = handDesign(x.map((v) => [1, v]), ['intercept', 'x'], x.map(() => 0), [
      { factor: 'site', index: site, slopes: [x], slopeNames: ['x'], correlated: true },
      { factor: 'year', index: year },
    ]);
    const dev = new ProfiledDeviance(design, false);
    const theta = Float64Array.from({ length: dev.thetaLength }, (_, i) => 0.3 + 0.2 * i);
    dev.setTheta(theta);
    const u = Float64Array.from({ length: dev.q }, () => rng.normal());
    // dense Z (n × q) and Λ (q × q, block diagonal) in the engine's term order
    const Z = Matrix.zeros(n, dev.q);
    const L = Matrix.zeros(dev.q, dev.q);
    dev.terms.forEach((t, s) => {
      const T = dev.templates[s];
      for (let l = 0; l < t.m; l++) {
        for (let a = 0; a < t.k; a++) for (let c = 0; c <= a; c++) L.set(t.start + l * t.k + a, t.start + l * t.k + c, T[a * t.k + c]);
      }
      for (let i = 0; i < n; i++) for (let a = 0; a < t.k; a++) Z.set(i, t.start + t.term.index[i] * t.k + a, t.term.values[i * t.k + a]);
    });
    const expected = Z.mmul(L).mmul(Matrix.columnVector(Array.from(u))).mul(1.7).to1DArray();
    const out = Float64Array.from({ length: n }, (_, i) => i);
    addDrawnEffects(dev, u, new Float64Array(dev.q), 1.7, out);
    out.forEach((v, i) => expect(Math.abs(v - i - expected[i])).toBeLessThan(1e-12));
  });
});
