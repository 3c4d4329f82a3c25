/**
 * Targets of a variant's coefficients in one simulated data set. When a grouping factor that has
 * random truth enters a variant as fixed (treatment coding, reference level r), its coefficients
 * estimate the realised effects of that data set: level l estimates β[l] + b(l) − b(r), the
 * intercept β₀ + b(r), a random-slope covariate x's main coefficient β_x + b_x(r), and the
 * product x:factor[l] estimates β + b_x(l) − b_x(r). Other coefficients keep the values of truth.fixed.
 */
import { INTERACTION_SEPARATOR, INTERCEPT, NESTING_SEPARATOR, levelName } from '../model/terms';
import type { SimulatedData } from './simulate';
import type { SurveyDesign } from './types';

export function realisedTruth(design: SurveyDesign, variantIndex: number, data: SimulatedData): Record<string, number> {
  const variant = design.variants[variantIndex];
  if (variant === undefined) throw new RangeError(`realisedTruth: no variant ${variantIndex} (the design has ${design.variants.length})`);
  const truth = { ...variant.truth };
  if (variant.realised.length === 0) return truth;
  const wanted = new Set(variant.realised);
  const add = (coef: string, value: number): void => {
    if (wanted.has(coef)) truth[coef] += value;
  };

  for (const g of variant.fixedGroups) {
    const eff = data.effects[g.factor];
    if (eff === undefined) continue;
    const factor = design.factors.find((f) => f.name === g.factor)!;
    const levelOf = new Map(factor.labels.map((l, i) => [l, i]));
    const k = eff.terms.length;
    // Level names are own labels, or "outer/…/own" with `within`: the last part is the own label.
    const own = (name: string): number => levelOf.get(name.split(NESTING_SEPARATOR).pop()!)!;
    const r = own(g.reference);
    add(INTERCEPT, eff.values[r * k]);
    for (let j = 1; j < k; j++) add(eff.terms[j], eff.values[r * k + j]);
    for (const name of g.levels) {
      if (name === g.reference) continue;
      const l = own(name);
      const coef = levelName(g.factor, name);
      add(coef, eff.values[l * k] - eff.values[r * k]);
      for (let j = 1; j < k; j++) {
        const delta = eff.values[l * k + j] - eff.values[r * k + j];
        add(`${eff.terms[j]}${INTERACTION_SEPARATOR}${coef}`, delta);
        add(`${coef}${INTERACTION_SEPARATOR}${eff.terms[j]}`, delta);
      }
    }
  }
  return truth;
}
