/**
 * Naming of fixed terms and coefficients, shared by the parser (validation) and the
 * design builder (column names). Coefficient names: "x", "habitat[wet]", "x:habitat[wet]",
 * "habitat[wet]:season[dry]", "site[B]", "plot[A/1]".
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

/** Name of a treatment-coded dummy column: `habitat[wet]`. */
export function levelName(column: string, level: string): string {
  return `${column}[${level}]`;
}

/** Name of a product column: `x:habitat[wet]`. */
export function productName(left: string, right: string): string {
  return `${left}${INTERACTION_SEPARATOR}${right}`;
}
