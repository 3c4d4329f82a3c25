/**
 * Naming of fixed terms and coefficients, shared by the parser (validation) and the
 * design builder (column names). Coefficient names: "x", "habitat=wet", "x:habitat=wet",
 * "habitat=wet:season=dry", "site=B", "plot=A/1".
 */
import type { FixedTerm } from './types';

/** Name of the always-present first column of X. */
export const INTERCEPT = 'intercept';

/** Separator of the two parts of an interaction term. */
export const INTERACTION_SEPARATOR = ':';

/** Separator of outer and inner labels of a nested grouping factor ("A/1"). */
export const NESTING_SEPARATOR = '/';

/** The columns a fixed term reads: one for a main effect, two for an interaction. */
export function termColumns(term: FixedTerm): string[] {
  if (typeof term === 'string') return term.split(INTERACTION_SEPARATOR);
  return [term.column];
}

/** Whether a fixed term is a two-way interaction `a:b`. */
export function isInteraction(term: FixedTerm): boolean {
  return typeof term === 'string' && term.includes(INTERACTION_SEPARATOR);
}

/** The model text of a fixed term (the column, or `a:b`). */
export function termLabel(term: FixedTerm): string {
  return typeof term === 'string' ? term : term.column;
}

/** Separator of a column and one of its levels in a coefficient name ("habitat=wet"). */
const LEVEL_SEPARATOR = '=';

/** Name of a treatment-coded dummy column: `habitat=wet`. */
export function levelName(column: string, level: string): string {
  return `${column}${LEVEL_SEPARATOR}${level}`;
}

/** Whether one part of a coefficient name is a level of `column` (`habitat=wet` for "habitat"). */
export function isLevelOf(part: string, column: string): boolean {
  return part.startsWith(`${column}${LEVEL_SEPARATOR}`);
}

/** Whether any part of a coefficient name is a level of `column` (`x:site=B` for "site"). */
export function involvesLevelOf(name: string, column: string): boolean {
  return name.split(INTERACTION_SEPARATOR).some((part) => isLevelOf(part, column));
}

/** The column and level of one part `habitat=wet`, or undefined for a plain column name. */
export function splitLevelName(part: string): { column: string; level: string } | undefined {
  const at = part.indexOf(LEVEL_SEPARATOR);
  if (at <= 0 || at === part.length - 1) return undefined;
  return { column: part.slice(0, at), level: part.slice(at + 1) };
}

/**
 * The current spelling of a name written in the earlier bracket form (`habitat[wet]` →
 * `habitat=wet`, `x:habitat[wet]` → `x:habitat=wet`), or undefined when no part uses brackets.
 */
export function bracketFormToCurrent(name: string): string | undefined {
  const parts = name.split(INTERACTION_SEPARATOR);
  let changed = false;
  const out = parts.map((part) => {
    const m = /^([^[\]]+)\[([^[\]]+)\]$/.exec(part);
    if (!m) return part;
    changed = true;
    return levelName(m[1], m[2]);
  });
  return changed ? out.join(INTERACTION_SEPARATOR) : undefined;
}

/** Name of a product column: `x:habitat=wet`. */
export function productName(left: string, right: string): string {
  return `${left}${INTERACTION_SEPARATOR}${right}`;
}

/** Name of the group-mean column of a split covariate: `rain_mean_site`. */
export function groupMeanName(column: string, factor: string): string {
  return `${column}_mean_${factor}`;
}
