import type { DesignMatrices, RandomTerm } from '../../kernel-lib/data/design-matrices';

/** A tiny seeded generator for test data (Park and Miller 1988 minimal standard, with Box-Muller normals). */
export function testRandom(seed: number) {
  let s = seed % 2147483647;
  if (s <= 0) s += 2147483646;
  const uniform = () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647;
  };
  const normal = () => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  return { uniform, normal };
}

export interface TermInput {
  factor: string;
  index: number[];
  slopes?: number[][];
  slopeNames?: string[];
  correlated?: boolean;
}

/** Build design matrices by hand, independent of the project's data layer. */
export function handDesign(X: number[][], names: string[], y: number[], terms: TermInput[] = []): DesignMatrices {
  const n = y.length;
  const p = names.length;
  const random: RandomTerm[] = terms.map((t) => {
    const k = 1 + (t.slopes?.length ?? 0);
    const m = Math.max(...t.index) + 1;
    const values = new Float64Array(n * k);
    for (let i = 0; i < n; i++) {
      values[i * k] = 1;
      for (let j = 1; j < k; j++) values[i * k + j] = t.slopes![j - 1][i];
    }
    return {
      factor: t.factor,
      levels: Array.from({ length: m }, (_, l) => `${t.factor}${String(l + 1).padStart(2, '0')}`),
      index: Int32Array.from(t.index),
      terms: ['intercept', ...(t.slopeNames ?? [])],
      values,
      correlated: t.correlated ?? true,
    };
  });
  const levelCounts: Record<string, number> = {};
  for (const t of random) levelCounts[t.factor] = t.levels.length;
  return {
    n, p, X: Float64Array.from(X.flat()), fixedNames: names,
    roles: names.map((name, j) => (j === 0 && name === 'intercept' ? { kind: 'intercept' as const, sources: [] } : { kind: 'covariate' as const, sources: [name] })),
    y: Float64Array.from(y), random, levelCounts,
    droppedRows: [], rowIds: Int32Array.from({ length: n }, (_, i) => i), warnings: [],
  };
}
