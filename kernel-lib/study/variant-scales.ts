/**
 * Variants fitted on another scale than the truth (e.g. a normal model, identity link, fitted to
 * simulated counts, log link): their estimates, SEs and intervals are not on the scale of
 * `truth.fixed`, so bias, RMSE, coverage, width and SD recovery compare unlike quantities. Power
 * and type I error depend only on whether the test rejects (a true zero is zero on every scale),
 * so they stay. The metrics keep only those, and say why in their notes.
 */
import { expandGrid } from '../design/grid';
import type { SurveyDesign } from '../design/types';
import { RESPONSE_FAMILIES, type FamilyName } from '../family/index';
import type { MetricRow } from './metrics';

/** Opening words of the note that marks a variant on another scale (for readers of the metrics). */
const OTHER_SCALE = 'on another scale than the truth';

/** Why each variant of each scenario is on another scale than the truth (only such variants are listed). */
export function variantScales(design: SurveyDesign): Record<string, Record<string, string>> {
  const out: Record<string, Record<string, string>> = {};
  for (const scenario of expandGrid(design)) {
    const d = scenario.design;
    const dataLink = RESPONSE_FAMILIES[d.family as FamilyName]!.link;
    const byVariant: Record<string, string> = {};
    for (const v of d.variants) {
      const link = RESPONSE_FAMILIES[v.model.family as FamilyName]!.link;
      if (link === dataLink) continue;
      byVariant[v.name] =
        `${OTHER_SCALE}: a ${v.model.family} model (${link} link) fitted to ${d.family} data (${dataLink} link), so bias, RMSE, ` +
        'coverage, width, SEs and SD recovery are not reported; power and type I error depend only on the test and are';
    }
    if (Object.keys(byVariant).length) out[scenario.key] = byVariant;
  }
  return out;
}

/** One line per variant on another scale, from the notes of the metrics (for summaries and reports). */
export function otherScaleNotes(metrics: readonly MetricRow[]): string[] {
  const seen = new Map<string, string>();
  for (const m of metrics) {
    if (m.parameter !== '*' || !m.note || !m.note.startsWith(OTHER_SCALE) || seen.has(m.variant)) continue;
    seen.set(m.variant, `${m.variant}: ${m.note}`);
  }
  return [...seen.values()];
}
