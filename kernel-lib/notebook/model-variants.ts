/** One-field changes of a model description: a grouping factor's role, the interval method. */
import { QuadratInputError, listNames } from '../model/errors';
import { parseModel } from '../model/parse';
import { termColumns } from '../model/terms';
import type { GroupRole, ModelSpec } from '../model/types';

/** A copy of `model` with grouping factor `factor` entered `as` random or fixed; nothing else changes. */
export function withGroupAs<M extends ModelSpec>(model: M, factor: string, as: GroupRole): M {
  const groups = model.groups ?? [];
  if (!groups.some((g) => g.factor === factor)) {
    throw new QuadratInputError(
      `model.groups: no grouping factor "${factor}"; the model's factors are ${listNames(groups.map((g) => g.factor))}`,
      { field: 'model.groups' },
    );
  }
  return { ...model, groups: groups.map((g) => (g.factor === factor ? { ...g, as } : g)) };
}

/** A copy of `model` with the given interval method. */
export function withInterval<M extends ModelSpec>(model: M, interval: string): M {
  return { ...model, interval };
}

/** The columns a model uses, by role: for checking a table before fitting. */
export function modelColumns(model: ModelSpec): { response: string; factors: string[]; covariates: string[] } {
  const resolved = parseModel(model);
  const factors = resolved.groups.map((g) => g.factor);
  for (const g of resolved.groups) if (g.within && !factors.includes(g.within)) factors.push(g.within);
  const covariates = [...new Set(resolved.fixed.flatMap((t) => termColumns(t)))].filter((c) => !factors.includes(c));
  return { response: resolved.response, factors, covariates };
}

/** Grouping factor -> the factor it is nested in, from a model's `within` fields. */
export function modelNesting(model: ModelSpec): Record<string, string> {
  const out: Record<string, string> = {};
  for (const g of parseModel(model).groups) if (g.within) out[g.factor] = g.within;
  return out;
}
