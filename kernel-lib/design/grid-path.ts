/**
 * Dotted paths into the design JSON, as used by the scenario grid: "perCell",
 * "truth.sd.site", "factors.year.levels". Inside an array of named objects (factors,
 * covariates, variants) a segment is an element's `name`; inside a plain array, an index.
 */
import { describeValue, listNames } from '../model/errors';
import { fail, isPlainObject } from '../model/option-checks';

export interface GridTarget {
  /** The object or array holding the value. */
  container: Record<string, unknown> | unknown[];
  /** Key or index of the value in the container. */
  key: string | number;
}

/** Find the value a grid path addresses; it must exist and be a number or text. */
export function resolveGridPath(source: unknown, gridPath: string, field: string): GridTarget {
  const segments = gridPath.split('.');
  if (segments.some((s) => s === '')) fail(`${field}: expected a dotted path such as "truth.sd.site", got ${describeValue(gridPath)}`, field);
  if (segments[0] === 'grid') fail(`${field}: the grid cannot change itself`, field);
  let current: unknown = source;
  let target: GridTarget | undefined;
  for (let i = 0; i < segments.length; i++) {
    const seg = segments[i];
    const here = segments.slice(0, i + 1).join('.');
    if (Array.isArray(current)) {
      const byName = current.findIndex((el) => isPlainObject(el) && el.name === seg);
      const index = byName >= 0 ? byName : /^\d+$/.test(seg) ? Number(seg) : -1;
      if (index < 0 || index >= current.length) {
        const names = current.filter(isPlainObject).map((el) => String(el.name));
        const hint = names.length > 0 ? `names: ${listNames(names)}` : `indices 0..${current.length - 1}`;
        fail(`${field}: nothing at "${here}" (${hint})`, field);
      }
      target = { container: current, key: index };
      current = current[index];
    } else if (isPlainObject(current)) {
      if (!Object.prototype.hasOwnProperty.call(current, seg)) {
        fail(`${field}: nothing at "${here}"; keys there: ${listNames(Object.keys(current))}`, field);
      }
      target = { container: current, key: seg };
      current = current[seg];
    } else {
      fail(`${field}: nothing at "${here}" (the path continues past a value)`, field);
    }
  }
  if (typeof current !== 'number' && typeof current !== 'string') {
    fail(`${field}: "${gridPath}" holds ${describeValue(current)}, not a number or text`, field);
  }
  return target!;
}
