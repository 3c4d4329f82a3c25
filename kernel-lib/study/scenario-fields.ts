import type { StudyManifest } from './study-folder';

/**
 * A readable, dot-free field name for a grid path (chart specs read dots as nesting):
 * "factors.year.levels" -> "year levels", "truth.sd.site" -> "sd site", "perCell" -> "perCell".
 */
export function scenarioFieldName(path: string): string {
  const parts = path.split('.');
  const rest = parts[0] === 'factors' || parts[0] === 'truth' || parts[0] === 'covariates' ? parts.slice(1) : parts;
  return rest.join(' ');
}

/** Copy each row and add its scenario's grid values under readable field names. */
export function withScenarioFields<T extends { scenario: string }>(
  rows: readonly T[], scenarios: StudyManifest['scenarios'],
): (T & Record<string, number | string>)[] {
  const byKey = new Map(scenarios.map((s) => [s.key, s.values]));
  return rows.map((r) => {
    const values = byKey.get(r.scenario) ?? {};
    const extra: Record<string, number | string> = {};
    for (const [path, v] of Object.entries(values)) extra[scenarioFieldName(path)] = v;
    return { ...r, ...extra };
  });
}

/** The readable names of a study's grid fields, in grid order. */
export function gridFields(scenarios: StudyManifest['scenarios']): string[] {
  return scenarios.length ? Object.keys(scenarios[0].values).map(scenarioFieldName) : [];
}
