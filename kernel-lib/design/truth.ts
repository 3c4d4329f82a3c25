/** The data-generating truth: fixed coefficients, random-effect SDs, slopes and correlations. */
import { listNames } from '../model/errors';
import { bracketFormToCurrent, INTERACTION_SEPARATOR, INTERCEPT, levelName, splitLevelName } from '../model/terms';
import { expectNonNegative, expectNumber, expectObject, fail, rejectUnknownKeys } from '../model/option-checks';
import { keyPath } from './checks';
import type { ColumnCatalog } from './columns';
import type { ResponseFamily } from '../family/index';
import type { RandomTruth, ResolvedFactor, ResolvedTruth, TruthPart, TruthTerm } from './types';

const TRUTH_KEYS = ['fixed', 'sd', 'slopes', 'correlations', 'aggregation'];
/** Family parameters given in truth.sd (a residual SD); the others (the NB aggregation k) sit in truth itself. */
const SD_PARAMS = ['residual'];

export function parseTruth(
  value: unknown,
  path: string,
  catalog: ColumnCatalog,
  factors: readonly ResolvedFactor[],
  family: ResponseFamily,
  warnings: string[],
): ResolvedTruth {
  const obj = expectObject(value, path);
  rejectUnknownKeys(obj, TRUTH_KEYS, path);

  const fixedPath = `${path}.fixed`;
  const fixedObj = obj.fixed === undefined ? {} : expectObject(obj.fixed, fixedPath);
  const fixed: Record<string, number> = {};
  const terms: TruthTerm[] = [];
  const byCanonical = new Map<string, string>();
  for (const name of Object.keys(fixedObj)) {
    const p = keyPath(fixedPath, name);
    const v = expectNumber(fixedObj[name], p);
    const term = parseTruthTerm(name, v, p, catalog);
    const earlier = byCanonical.get(term.canonical);
    if (earlier !== undefined) fail(`${p}: the same coefficient as "${earlier}"`, p);
    byCanonical.set(term.canonical, name);
    fixed[name] = v;
    terms.push(term);
  }

  const sdPath = `${path}.sd`;
  const sdObj = expectObject(obj.sd, sdPath);
  const sd: Record<string, number> = {};
  for (const key of Object.keys(sdObj)) {
    const p = keyPath(sdPath, key);
    const sdParams = family.params.filter((q) => SD_PARAMS.includes(q));
    if (!catalog.factors.includes(key) && !sdParams.includes(key)) {
      fail(`${p}: unknown key "${key}"; expected a factor (${listNames(catalog.factors)})${sdParams.length ? ` or ${listNames(sdParams)}` : ''}`, p);
    }
    sd[key] = expectNonNegative(sdObj[key], p);
  }
  const familyParams: Record<string, number> = {};
  for (const param of family.params) {
    if (!SD_PARAMS.includes(param)) {
      const p = keyPath(path, param);
      const v = obj[param];
      if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) fail(`${p}: expected a number > 0 (required by the ${family.name} family; e.g. aggregation k = 2 for clumped counts)`, p);
      familyParams[param] = v as number;
      continue;
    }
    const p = keyPath(sdPath, param);
    if (sd[param] === undefined) fail(`${p}: expected a number ≥ 0 (required by the ${family.name} family)`, p);
    familyParams[param] = sd[param];
  }
  if (family.params.includes('residual') && familyParams.residual === 0) {
    warnings.push(`${keyPath(sdPath, 'residual')}: residual SD is 0, so responses carry no residual noise`);
  }

  const slopes = parseSlopes(obj.slopes, `${path}.slopes`, catalog);
  const random: RandomTruth[] = [];
  for (const f of factors) {
    const slopeSds = slopes[f.name] ?? {};
    const slopeNames = Object.keys(slopeSds).sort();
    const interceptSd = sd[f.name] ?? 0;
    if (interceptSd === 0 && slopeNames.every((s) => slopeSds[s] === 0)) continue;
    if (f.totalLevels === 1) {
      warnings.push(`${keyPath(sdPath, f.name)}: factor "${f.name}" has 1 level, so its random effect cannot be told from the intercept`);
    }
    random.push({ factor: f.name, terms: [INTERCEPT, ...slopeNames], sd: [interceptSd, ...slopeNames.map((s) => slopeSds[s])], correlation: new Float64Array(0), cholesky: new Float64Array(0) });
  }
  const correlations = parseCorrelations(obj.correlations, `${path}.correlations`, random, catalog);
  return { fixed, sd, slopes, correlations, terms, random, familyParams };
}

/** Parse one truth.fixed key into the columns and levels it multiplies. */
function parseTruthTerm(name: string, value: number, path: string, catalog: ColumnCatalog): TruthTerm {
  if (name === INTERCEPT) return { name, canonical: INTERCEPT, value, parts: [] };
  const current = bracketFormToCurrent(name);
  if (current !== undefined) {
    fail(`${path}: level coefficients are written column=level; write "${current}" instead of "${name}"`, path);
  }
  const pieces = name.split(INTERACTION_SEPARATOR);
  if (pieces.length > 2) fail(`${path}: expected a main effect or a two-way product "a:b", got ${pieces.length} parts`, path);
  const parts = pieces.map((piece) => parsePart(piece, path, catalog));
  if (parts.length === 2 && parts[0].column === parts[1].column) {
    fail(`${path}: both parts of the product use column "${parts[0].column}"`, path);
  }
  const canonical = parts.map(partName).sort().join(INTERACTION_SEPARATOR);
  return { name, canonical, value, parts };
}

function partName(p: TruthPart): string {
  return p.kind === 'numeric' ? p.column : levelName(p.column, p.level);
}

function parsePart(piece: string, path: string, catalog: ColumnCatalog): TruthPart {
  if (piece === INTERCEPT) fail(`${path}: "intercept" cannot be part of a product`, path);
  const split = catalog.numeric.includes(piece) || catalog.text.has(piece) ? undefined : splitLevelName(piece);
  if (split) {
    const { column, level } = split;
    const levels = catalog.text.get(column);
    if (levels === undefined) {
      const hint = catalog.numeric.includes(column) ? ` ("${column}" is numeric: write it without =level)` : '';
      fail(`${path}: no categorical column "${column}"${hint}; categorical columns: ${listNames([...catalog.text.keys()])}`, path);
    }
    if (!levels.includes(level)) fail(`${path}: column "${column}" has no level "${level}"; levels: ${listNames(levels)}`, path);
    if (level === levels[0]) {
      fail(
        `${path}: "${level}" is the reference level of "${column}" (first in sorted order); ` +
          `give effects of the other levels, e.g. ${levelName(column, levels[1] ?? levels[0])}`,
        path,
      );
    }
    return { kind: 'level', column, level };
  }
  if (catalog.numeric.includes(piece)) return { kind: 'numeric', column: piece };
  const levels = catalog.text.get(piece);
  if (levels !== undefined) {
    fail(`${path}: "${piece}" is categorical; name one of its non-reference levels, e.g. ${levelName(piece, levels[1] ?? levels[0])}`, path);
  }
  return fail(
    `${path}: matches no column of the data; numeric covariates: ${listNames(catalog.numeric)}; ` +
      `categorical columns: ${listNames([...catalog.text.keys()])} (written as column=level)`,
    path,
  );
}

function parseSlopes(value: unknown, path: string, catalog: ColumnCatalog): Record<string, Record<string, number>> {
  if (value === undefined) return {};
  const obj = expectObject(value, path);
  const out: Record<string, Record<string, number>> = {};
  for (const factor of Object.keys(obj)) {
    const p = keyPath(path, factor);
    if (!catalog.factors.includes(factor)) fail(`${p}: unknown factor "${factor}"; factors: ${listNames(catalog.factors)}`, p);
    const inner = expectObject(obj[factor], p);
    out[factor] = {};
    for (const cov of Object.keys(inner)) {
      const q = keyPath(p, cov);
      if (!catalog.numeric.includes(cov)) fail(`${q}: a random slope needs a numeric covariate; numeric covariates: ${listNames(catalog.numeric)}`, q);
      out[factor][cov] = expectNonNegative(inner[cov], q);
    }
  }
  return out;
}

function parseCorrelations(
  value: unknown,
  path: string,
  random: RandomTruth[],
  catalog: ColumnCatalog,
): Record<string, Record<string, number>> {
  const out: Record<string, Record<string, number>> = {};
  const given = value === undefined ? {} : expectObject(value, path);
  for (const factor of Object.keys(given)) {
    const p = keyPath(path, factor);
    if (!catalog.factors.includes(factor)) fail(`${p}: unknown factor "${factor}"; factors: ${listNames(catalog.factors)}`, p);
    if (!random.some((r) => r.factor === factor)) fail(`${p}: factor "${factor}" has no random effects in truth.sd or truth.slopes`, p);
  }
  for (const r of random) {
    const k = r.terms.length;
    const corr = new Float64Array(k * k);
    for (let i = 0; i < k; i++) corr[i * k + i] = 1;
    const p = keyPath(path, r.factor);
    const inner = given[r.factor] === undefined ? {} : expectObject(given[r.factor], p);
    out[r.factor] = {};
    for (const pair of Object.keys(inner)) {
      const q = keyPath(p, pair);
      const names = pair.split(INTERACTION_SEPARATOR);
      if (names.length !== 2 || names[0] === names[1]) fail(`${q}: expected "a:b" naming two different terms of ${listNames(r.terms)}`, q);
      const [a, b] = names.map((n) => r.terms.indexOf(n));
      if (a < 0 || b < 0) fail(`${q}: expected "a:b" with a and b among the random terms of "${r.factor}": ${listNames(r.terms)}`, q);
      const rho = expectNumber(inner[pair], q);
      if (rho < -1 || rho > 1) fail(`${q}: a correlation lies in [-1, 1], got ${rho}`, q);
      if (corr[a * k + b] !== 0) fail(`${q}: correlation of these two terms given twice`, q);
      corr[a * k + b] = rho;
      corr[b * k + a] = rho;
      out[r.factor][pair] = rho;
    }
    const cov = new Float64Array(k * k);
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) cov[i * k + j] = r.sd[i] * r.sd[j] * corr[i * k + j];
    const chol = semidefiniteCholesky(cov, k);
    if (chol === null) fail(`${p}: these correlations do not form a valid correlation matrix (not positive semidefinite)`, p);
    r.correlation = corr;
    r.cholesky = chol;
  }
  return out;
}

/**
 * Cholesky factor of a positive semidefinite matrix (Golub and Van Loan, Matrix Computations,
 * 4th ed., section 4.2.5; zero pivots as in Higham, Accuracy and Stability, 2nd ed., section 10.3):
 * a zero pivot leaves a zero column, which is exact for a zero variance or a correlation of ±1.
 * Returns null when the matrix is not semidefinite.
 */
export function semidefiniteCholesky(a: Float64Array, k: number): Float64Array | null {
  let scale = 0;
  for (let i = 0; i < k; i++) scale = Math.max(scale, a[i * k + i]);
  const tol = 1e-12 * Math.max(scale, Number.MIN_VALUE);
  const l = new Float64Array(k * k);
  for (let j = 0; j < k; j++) {
    let d = a[j * k + j];
    for (let m = 0; m < j; m++) d -= l[j * k + m] * l[j * k + m];
    if (d < -tol) return null;
    const pivot = d > tol ? Math.sqrt(d) : 0;
    l[j * k + j] = pivot;
    for (let i = j + 1; i < k; i++) {
      let s = a[i * k + j];
      for (let m = 0; m < j; m++) s -= l[i * k + m] * l[j * k + m];
      if (pivot === 0) {
        if (Math.abs(s) > Math.sqrt(tol) * Math.sqrt(scale)) return null;
      } else {
        l[i * k + j] = s / pivot;
      }
    }
  }
  return l;
}
