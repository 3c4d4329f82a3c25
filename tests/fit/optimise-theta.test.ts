import { describe, expect, it } from 'vitest';
import { BOUNDARY_TOLERANCE, optimiseTheta } from '../../kernel-lib/fit/optimise-theta';
import { ProfiledDeviance } from '../../kernel-lib/fit/profiled-deviance';
import { handDesign } from '../helpers/simple-design';
import { oneWayMeanSquares } from '../helpers/one-way-anova';

/** A stand-in criterion with a known minimum, shaped like the engine's ProfiledDeviance. */
function criterion(f: (theta: Float64Array) => number, lowerBounds: number[], start?: number[]): ProfiledDeviance {
  return {
    thetaLength: lowerBounds.length,
    lowerBounds: Float64Array.from(lowerBounds),
    momentTheta: () => Float64Array.from(start ?? lowerBounds.map(() => 1)),
    evaluate: f,
    lastFailure: '',
  } as unknown as ProfiledDeviance;
}

/** Balanced one-way layout: a groups of m observations, intercept only, random group intercept. */
function oneWay(y: number[][]) {
  const flat = y.flat();
  const index = y.flatMap((g, i) => g.map(() => i));
  return handDesign(flat.map(() => [1]), ['intercept'], flat, [{ factor: 'g', index }]);
}

describe('optimiseTheta on the engine criterion: balanced one-way REML in closed form', () => {
  // REML for balanced data equals the ANOVA estimators when they are non-negative:
  // σ̂² = MSW, σ̂_b² = (MSB − MSW)/m (Searle, Casella and McCulloch 1992, ch. 6, balanced data), so θ̂ = σ̂_b/σ̂;
  // and θ̂ = 0 when MSB ≤ MSW (same chapter: the REML estimate is truncated at the boundary).
  it('reaches θ = sqrt((MSB − MSW)/(m · MSW)) (invented data, 4 groups of 3)', () => {
    const y = [[10.1, 11.3, 9.8], [13.2, 12.7, 14.1], [8.9, 9.6, 10.4], [12.0, 11.1, 12.9]];
    const { msb, msw, m } = oneWayMeanSquares(y);
    expect(msb).toBeGreaterThan(msw);
    const r = optimiseTheta(new ProfiledDeviance(oneWay(y), true));
    expect(r.converged).toBe(true);
    expect(r.theta[0]).toBeCloseTo(Math.sqrt((msb - msw) / (m * msw)), 5);
  });

  it('lands exactly on θ = 0 when groups differ less than within-group noise predicts', () => {
    const y = [[10.0, 12.0, 8.0], [10.2, 11.8, 8.1], [9.9, 12.1, 8.2]];
    const { msb, msw } = oneWayMeanSquares(y);
    expect(msb).toBeLessThan(msw);
    const r = optimiseTheta(new ProfiledDeviance(oneWay(y), true));
    expect(r.theta[0]).toBe(0);
    expect(r.converged).toBe(true);
  });
});

describe('optimiseTheta on functions with known minima', () => {
  it('one parameter: the minimum of (θ − 2)² + 1 is at θ = 2', () => {
    const r = optimiseTheta(criterion((t) => (t[0] - 2) ** 2 + 1, [0]));
    expect(r.theta[0]).toBeCloseTo(2, 6);
    expect(r.deviance).toBeCloseTo(1, 12);
    expect(r.converged).toBe(true);
    expect(r.evaluations).toBeGreaterThan(0);
  });

  it('one parameter: a minimum below zero is clipped to exactly 0', () => {
    const r = optimiseTheta(criterion((t) => (t[0] + 0.5) ** 2, [0]));
    expect(r.theta[0]).toBe(0);
    expect(r.deviance).toBeCloseTo(0.25, 10);
  });

  it('one parameter: a criterion that keeps falling is reported as not converged, with the reason', () => {
    const r = optimiseTheta(criterion((t) => -t[0], [0]));
    expect(r.converged).toBe(false);
    expect(r.reason).toMatch(/upper search limit/);
  });

  it('two parameters: Rosenbrock valley (Rosenbrock 1960) with minimum at (1, 1)', () => {
    const r = optimiseTheta(criterion((t) => 100 * (t[1] - t[0] ** 2) ** 2 + (1 - t[0]) ** 2, [0, -Infinity], [0.5, 0.5]));
    expect(r.theta[0]).toBeCloseTo(1, 3);
    expect(r.theta[1]).toBeCloseTo(1, 3);
    expect(r.deviance).toBeLessThan(1e-6);
  });

  it('two parameters: a diagonal θ whose optimum is on the boundary is snapped to exactly 0', () => {
    // minimum of (θ₁ + 0.3)² + (θ₂ − 0.7)² over θ₁ ≥ 0 is at (0, 0.7)
    const r = optimiseTheta(criterion((t) => (t[0] + 0.3) ** 2 + (t[1] - 0.7) ** 2, [0, 0], [0.5, 0.5]));
    expect(r.theta[0]).toBe(0);
    expect(r.theta[1]).toBeCloseTo(0.7, 4);
    expect(BOUNDARY_TOLERANCE).toBe(1e-4); // the documented threshold (DEVELOPERS.md, Optimiser)
  });

  it('a criterion that cannot be evaluated gives converged false and the criterion\'s own reason', () => {
    const dev = criterion(() => NaN, [0, 0]);
    (dev as unknown as { lastFailure: string }).lastFailure = 'relative covariance factor not positive definite';
    const r = optimiseTheta(dev);
    expect(r.converged).toBe(false);
    expect(r.reason).toBe('relative covariance factor not positive definite');
  });
});
