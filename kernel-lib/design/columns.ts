/** The columns a simulated data set will have, by kind: what truth and variants may refer to. */
import type { ResolvedCovariate, ResolvedFactor } from './types';

export interface ColumnCatalog {
  response: string;
  /** Numeric covariates. */
  numeric: string[];
  /** Text columns (factors and categorical covariates) with their levels in sorted order. */
  text: Map<string, string[]>;
  factors: string[];
}

export function columnCatalog(response: string, factors: readonly ResolvedFactor[], covariates: readonly ResolvedCovariate[]): ColumnCatalog {
  const text = new Map<string, string[]>();
  for (const f of factors) text.set(f.name, f.labels);
  const numeric: string[] = [];
  for (const c of covariates) {
    if (c.kind === 'categorical') text.set(c.name, c.levels);
    else numeric.push(c.name);
  }
  return { response, numeric, text, factors: factors.map((f) => f.name) };
}

/** Every column name, for messages. */
export function allColumns(cat: ColumnCatalog): string[] {
  return [...cat.factors, ...[...cat.text.keys()].filter((c) => !cat.factors.includes(c)), ...cat.numeric];
}
