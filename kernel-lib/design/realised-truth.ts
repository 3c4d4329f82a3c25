/**
 * Targets of a variant's coefficients in one simulated data set. When a grouping factor that has
 * random truth enters a variant as fixed (treatment coding, reference level r), its coefficients
 * estimate the realised effects of that data set: level l estimates β[l] + b(l) − b(r), the
 * intercept β₀ + b(r), a random-slope covariate x's main coefficient β_x + b_x(r), and the
 * product x:factor[l] estimates β + b_x(l) − b_x(r). Other coefficients keep the values of truth.fixed.
 */
import { INTERACTION_SEPARATOR, INTERCEPT, levelName } from '../model/terms';
import type { SimulatedData } from './simulate';
import type { ResolvedVariant } from './types';

/** Truth of every coefficient of `variant` for the data set `data` (realised where it applies). */
export function realisedTruth(variant: ResolvedVariant, data: SimulatedData): Record<string, number> {
  const truth = { ...variant.truth };
  if (variant.realised.length === 0) return truth;
  const wanted = new Set(variant.realised);
  const add = (coef: string, value: number): void => {
    if (wanted.has(coef)) truth[coef] += value;
  };
  for (const g of variant.fixedGroups) {
    const eff = data.effects[g.factor];
    if (eff === undefined) continue;
    const k = eff.terms.length;
    const r = g.designLevel[g.levels.indexOf(g.reference)];
    add(INTERCEPT, eff.values[r * k]);
    for (let j = 1; j < k; j++) add(eff.terms[j], eff.values[r * k + j]);
    g.levels.forEach((name, i) => {
      if (name === g.reference) return;
      const l = g.designLevel[i];
      const coef = levelName(g.factor, name);
      add(coef, eff.values[l * k] - eff.values[r * k]);
      for (let j = 1; j < k; j++) {
        const delta = eff.values[l * k + j] - eff.values[r * k + j];
        add(`${eff.terms[j]}${INTERACTION_SEPARATOR}${coef}`, delta);
        add(`${coef}${INTERACTION_SEPARATOR}${eff.terms[j]}`, delta);
      }
    });
  }
  return truth;
}
