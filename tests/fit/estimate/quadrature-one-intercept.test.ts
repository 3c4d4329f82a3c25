/**
 * The one-intercept Laplace and adaptive-quadrature deviance (kernel-lib/fit/estimate/quadrature-one-intercept):
 * its gradient in (θ, β) against central differences of the deviance itself, on the invented
 * reference data of data/reference/counts (values against scipy are in count-model.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { join } from 'path';
import { readCsvFile } from '../../../kernel-lib/data/csv';
import { GlmResponse, type CountFamily } from '../../../kernel-lib/fit/estimate/glm-response';
import { OneInterceptQuadrature } from '../../../kernel-lib/fit/estimate/quadrature-one-intercept';
import { COUNT_REFERENCE_DIR } from '../../helpers/count-reference';

function load(name: string, family: CountFamily) {
  const rows = readCsvFile(join(COUNT_REFERENCE_DIR, `${name}.csv`)) as unknown as Record<string, any[]>;
  const n = rows.y.length;
  const labels = [...new Set(rows.g.map(String))].sort();
  const X = new Float64Array(2 * n);
  rows.x.forEach((x: number, i: number) => { X[2 * i] = 1; X[2 * i + 1] = x; });
  const term = {
    factor: 'g', levels: labels, index: Int32Array.from(rows.g, (g: unknown) => labels.indexOf(String(g))), terms: ['intercept'],
    values: new Float64Array(n).fill(1), correlated: true,
  };
  const response = new GlmResponse(family, n, rows.m ? Float64Array.from(rows.m) : undefined);
  response.setResponse(rows.y);
  const offset = rows.effort ? Float64Array.from(rows.effort, (v: number) => Math.log(v)) : new Float64Array(n);
  return new OneInterceptQuadrature(X, 2, offset, response, term);
}

describe('OneInterceptQuadrature.deviance gradient', () => {
  const cases: [string, CountFamily, number][] = [['poisson-groups', 'poisson', 1], ['binomial-groups', 'binomial', 1], ['nb-groups', 'negative-binomial', 2]];
  for (const [name, family, k] of cases) {
    it(`${name}: the exact gradient in (θ, β) equals central differences, Laplace and 9 nodes, θ > 0, < 0 and near 0`, () => {
      // identity: the derivative of the approximated deviance, including the moving mode and nodes (common practice, no source)
      const quad = load(name, family);
      for (const nodes of [1, 9]) {
        for (const theta of [0.6, -0.35, 1e-3]) {
          const psi = [theta, 0.3, 0.2];
          const grad = new Float64Array(3);
          quad.deviance(psi[0], psi.slice(1), k, nodes, grad);
          for (let c = 0; c < 3; c++) {
            const h = 1e-5;
            const up = psi.slice();
            const down = psi.slice();
            up[c] += h;
            down[c] -= h;
            const fd = (quad.deviance(up[0], up.slice(1), k, nodes) - quad.deviance(down[0], down.slice(1), k, nodes)) / (2 * h);
            expect(Math.abs(grad[c] - fd)).toBeLessThan(1e-5 * (1 + Math.abs(fd)));
          }
        }
      }
    });
  }

  it('the deviance is even in θ (b = θu with u symmetric), and at θ = 0 its θ-gradient vanishes', () => {
    // symmetry of the N(0, 1) random-effect density (common practice, no source)
    const quad = load('poisson-groups', 'poisson');
    const grad = new Float64Array(3);
    const plus = quad.deviance(0.5, [0.4, 0.3], 1, 9);
    const minus = quad.deviance(-0.5, [0.4, 0.3], 1, 9);
    expect(Math.abs(plus - minus)).toBeLessThan(1e-9);
    quad.deviance(0, [0.4, 0.3], 1, 9, grad);
    expect(Math.abs(grad[0])).toBeLessThan(1e-12);
  });
});
