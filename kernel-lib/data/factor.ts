/**
 * Integer coding of categorical columns and of nested grouping factors.
 *
 * Levels are compared as text: the number 1 and the string "1" are the same level.
 * A nested level is the tuple (outer parts..., own label); its display label joins the parts
 * with "/" ("A/1"). Final level order is plain code-unit order of the parts (JavaScript `<`,
 * no locale, no natural number order: "10" sorts before "9"), outer part first.
 */
import { QuadratInputError } from '../model/errors';
import { NESTING_SEPARATOR } from '../model/terms';

/** A coded factor over the used rows. Codes index `parts`; order is first appearance. */
export interface CodedFactor {
  codes: Int32Array;
  /** Label parts of each level: one part for a plain factor, more for a nested one. */
  parts: string[][];
}

/** A factor with its levels in final (sorted) order. */
export interface SortedFactor {
  codes: Int32Array;
  levels: string[];
}

/** Code `values` at rows `rowIds` (no missing values expected there). One Map lookup per row. */
export function codeColumn(values: ArrayLike<unknown>, rowIds: Int32Array): CodedFactor {
  const n = rowIds.length;
  const codes = new Int32Array(n);
  const byValue = new Map<unknown, number>();
  const byLabel = new Map<string, number>();
  const parts: string[][] = [];
  for (let r = 0; r < n; r++) {
    const v = values[rowIds[r]];
    let code = byValue.get(v);
    if (code === undefined) {
      // First sight of this raw value: merge with an existing level of the same text.
      const label = String(v);
      code = byLabel.get(label);
      if (code === undefined) {
        code = parts.length;
        parts.push([label]);
        byLabel.set(label, code);
      }
      byValue.set(v, code);
    }
    codes[r] = code;
  }
  return { codes, parts };
}

/** Level identity by the pair (outer level, inner level). */
export function nestFactor(outer: CodedFactor, inner: CodedFactor): CodedFactor {
  const n = inner.codes.length;
  const width = inner.parts.length;
  const codes = new Int32Array(n);
  const byPair = new Map<number, number>();
  const parts: string[][] = [];
  for (let r = 0; r < n; r++) {
    const oc = outer.codes[r];
    const ic = inner.codes[r];
    const key = oc * width + ic;
    let code = byPair.get(key);
    if (code === undefined) {
      code = parts.length;
      parts.push([...outer.parts[oc], ...inner.parts[ic]]);
      byPair.set(key, code);
    }
    codes[r] = code;
  }
  return { codes, parts };
}

/**
 * Put levels in sorted order and join nested parts into labels. Throws when two different
 * level tuples give the same label (a label containing "/"), naming the factor.
 */
export function sortFactor(factor: CodedFactor, name: string): SortedFactor {
  const { parts } = factor;
  const order = parts.map((_, i) => i).sort((a, b) => compareParts(parts[a], parts[b]));
  const rank = new Int32Array(parts.length);
  const levels: string[] = new Array(parts.length);
  for (let k = 0; k < order.length; k++) {
    rank[order[k]] = k;
    levels[k] = parts[order[k]].join(NESTING_SEPARATOR);
  }
  const seen = new Map<string, number>();
  for (let k = 0; k < levels.length; k++) {
    const earlier = seen.get(levels[k]);
    if (earlier !== undefined) {
      throw new QuadratInputError(
        `factor "${name}": levels (${parts[order[earlier]].map((p) => JSON.stringify(p)).join(', ')}) and ` +
          `(${parts[order[k]].map((p) => JSON.stringify(p)).join(', ')}) both read "${levels[k]}"; ` +
          `labels of nested factors must not contain "${NESTING_SEPARATOR}"`,
        { column: name },
      );
    }
    seen.set(levels[k], k);
  }
  const codes = new Int32Array(factor.codes.length);
  for (let r = 0; r < codes.length; r++) codes[r] = rank[factor.codes[r]];
  return { codes, levels };
}

function compareParts(a: string[], b: string[]): number {
  const m = Math.min(a.length, b.length);
  for (let i = 0; i < m; i++) {
    if (a[i] < b[i]) return -1;
    if (a[i] > b[i]) return 1;
  }
  return a.length - b.length;
}
