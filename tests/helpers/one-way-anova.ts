/**
 * Mean squares of a balanced one-way layout, groups[i] holding the m values of group i
 * (Searle, Casella and McCulloch 1992, Variance Components, ch. 3): a groups, grand mean,
 * MSB = m Σ(ȳᵢ − ȳ)²/(a − 1), MSW = ΣΣ(yᵢⱼ − ȳᵢ)²/(a(m − 1)).
 */
export function oneWayMeanSquares(groups: number[][]): { a: number; m: number; grand: number; msb: number; msw: number } {
  const a = groups.length;
  const m = groups[0].length;
  const means = groups.map((g) => g.reduce((s, v) => s + v, 0) / m);
  const grand = means.reduce((s, v) => s + v, 0) / a;
  const msb = (m * means.reduce((s, v) => s + (v - grand) ** 2, 0)) / (a - 1);
  const msw = groups.reduce((s, g, i) => s + g.reduce((t, v) => t + (v - means[i]) ** 2, 0), 0) / (a * (m - 1));
  return { a, m, grand, msb, msw };
}
