/**
 * The interval level of every variant in every scenario (a grid can change a variant's level), so
 * the metrics compare coverage with each variant's own level and type I error with 1 − level.
 */
import { expandGrid } from '../design/grid';
import type { SurveyDesign } from '../design/types';

export function variantLevels(design: SurveyDesign): Record<string, Record<string, number>> {
  const out: Record<string, Record<string, number>> = {};
  for (const scenario of expandGrid(design)) {
    const byVariant: Record<string, number> = {};
    for (const v of scenario.design.variants) byVariant[v.name] = v.model.level;
    out[scenario.key] = byVariant;
  }
  return out;
}
