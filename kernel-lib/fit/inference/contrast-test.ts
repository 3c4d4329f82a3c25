/**
 * Tests of linear hypotheses H₀: Lβ = 0 on the fixed effects of a fitted mixed model, with
 * small-sample denominator df: Satterthwaite (multi-df by Fai and Cornelius 1996, J. Statist.
 * Comput. Simul. 54:363) or Kenward-Roger (Kenward and Roger 1997, §4, with their scaling).
 */
import type { DesignMatrices } from '../../data/design-matrices';
import type { FitResult } from '../result';
import { QuadratInputError } from '../../model/errors';
import { checkInterval } from '../../model/interval-rule';
import { isLevelOf, splitLevelName } from '../../model/terms';
import { fSurvival } from '../../numeric/distributions';
import { symmetricEigen } from '../../numeric/symmetric-eigen';
import { contextFromFit, withResidualResponse, type InferenceContext } from './context';
import { satterthwaiteCore, satterthwaiteDf } from './satterthwaite';
import { kenwardRogerCore, kenwardRogerSizeProblem, kenwardRogerTest } from './kenward-roger';
import { sandwich } from './dense-ops';

export type TestMethod = 'satterthwaite' | 'kenward-roger';

export interface ContrastTestResult {
  method: TestMethod;
  /** Coefficients involved (nonzero columns of L). */
  coefficients: string[];
  /** Lβ̂. */
  estimate: number[];
  /** F statistic (Kenward-Roger: the scaled λF). */
  statistic: number;
  numDf: number;
  denDf: number;
  pValue: number;
  /** Kenward-Roger scale λ (1 for Satterthwaite). */
  scale: number;
  warnings: string[];
}

/** Coefficient names of a term: the column itself (numeric) or every `term=level` column (categorical). */
export function termCoefficients(names: readonly string[], term: string): string[] {
  // "habitat" → habitat=wet, habitat=dry; "x:habitat" → x:habitat=wet; "habitat:season" → habitat=wet:season=dry
  const parts = term.split(':');
  const matches = (name: string) => {
    const np = name.split(':');
    return np.length === parts.length && np.every((x, i) => x === parts[i] || isLevelOf(x, parts[i]));
  };
  const out = names.filter(matches);
  if (!out.length) {
    throw new QuadratInputError(`term "${term}": no coefficient of that name; the coefficients are ${names.join(', ')}`, { field: 'term' });
  }
  return out;
}

/**
 * What a term test tests when the term is part of an interaction. `marginal` (the default): the
 * term's effect averaged over the levels of each factor it interacts with (equal weights, so in a
 * balanced layout it is the classical ANOVA main-effect test; Searle 1987, Linear Models for
 * Unbalanced Data, §4.6 on cell-means hypotheses) and at the mean of each numeric column it
 * interacts with. `reference`: the term's own coefficients, i.e. its effect at the reference level
 * of the other factor (and at 0 of a numeric partner), as treatment coding defines them.
 * The marginal rows assume the treatment coding of data/buildDesign; for columns coded otherwise
 * (sum-to-zero, built by hand) use `reference`.
 */
export type TermTestKind = 'marginal' | 'reference';

export interface TermTestResult extends ContrastTestResult {
  kind: TermTestKind;
  /** One line per row of L, e.g. `habitat=wet + 1/3 habitat=wet:season=spring + ...`. */
  contrast: string[];
  /** What was tested, in words. */
  description: string;
}

/**
 * Test one term (all its `term=level` columns together): by default its marginal effect, averaged
 * over the factors it interacts with (see TermTestKind); the result says which was done.
 */
export function termTest(
  design: DesignMatrices, fit: FitResult, term: string, method: TestMethod = 'satterthwaite', kind: TermTestKind = 'marginal',
): TermTestResult {
  const coefs = termCoefficients(design.fixedNames, term);
  const aliased = coefs.filter((c) => fit.fixed.find((r) => r.term === c)?.aliased);
  const usable = coefs.filter((c) => !aliased.includes(c));
  if (!usable.length) {
    throw new QuadratInputError(`term "${term}": every coefficient (${coefs.join(', ')}) is aliased; nothing to test`, { field: 'term' });
  }
  const plan = kind === 'marginal' ? marginalRows(design, fit, usable) : { rows: usable.map((c) => unitRow(design, c)), partners: [] };
  const result = contrastTest(design, fit, plan.rows, method);
  if (aliased.length) result.warnings.push(`term "${term}": ${aliased.join(', ')} aliased, left out of the test`);
  return { ...result, kind, contrast: plan.rows.map((r) => contrastText(design.fixedNames, r)), description: describe(term, kind, plan.partners) };
}

function unitRow(design: DesignMatrices, coefficient: string): number[] {
  return design.fixedNames.map((n) => (n === coefficient ? 1 : 0));
}

/** Column and level of one part of a coefficient name: `habitat=wet` → habitat, wet; `x` → x. */
function nameParts(part: string): { column: string; level?: string } {
  return splitLevelName(part) ?? { column: part };
}

interface Partner { column: string; weight: (part: string) => number; text: string }

/**
 * Rows of L for the marginal effect of each coefficient: the coefficient plus, for every
 * interaction column that extends it by one factor F, that column times 1/(levels of F) (the
 * reference level of F contributes 0), or times the mean of a numeric partner column.
 */
function marginalRows(design: DesignMatrices, fit: FitResult, coefs: string[]): { rows: number[][]; partners: Partner[] } {
  const { fixedNames: names, X, n, p } = design;
  const partners = new Map<string, Partner>();
  const partnerOf = (column: string): Partner => {
    let found = partners.get(column);
    if (found) return found;
    const j = names.indexOf(column);
    if (j >= 0) {
      // a numeric partner: its mean over the rows used
      let sum = 0;
      for (let i = 0; i < n; i++) sum += X[i * p + j];
      const mean = sum / n;
      found = { column, weight: () => mean, text: `at the mean of ${column} (${mean.toPrecision(4)})` };
    } else {
      const levels = new Set<string>();
      for (const name of names) for (const part of name.split(':')) { const q = nameParts(part); if (q.column === column && q.level !== undefined) levels.add(q.level); }
      const count = levels.size + 1; // products keep the reduced coding: the reference level has no column
      found = { column, weight: () => 1 / count, text: `averaged over the ${count} levels of ${column}` };
    }
    partners.set(column, found);
    return found;
  };
  const rows = coefs.map((c) => {
    const row = unitRow(design, c);
    const own = c.split(':');
    names.forEach((name, j) => {
      const parts = name.split(':');
      if (parts.length !== own.length + 1 || fit.fixed[j]?.aliased) return;
      const extra = parts.filter((x) => !own.includes(x));
      if (extra.length !== 1 || !own.every((x) => parts.includes(x))) return;
      const partner = partnerOf(nameParts(extra[0]).column);
      row[j] = partner.weight(extra[0]);
    });
    return row;
  });
  const used = new Set<string>();
  rows.forEach((row) => row.forEach((w, j) => {
    if (w === 0 || coefs.includes(names[j])) return;
    for (const part of names[j].split(':')) { const col = nameParts(part).column; if (partners.has(col)) used.add(col); }
  }));
  return { rows, partners: [...used].map((c) => partners.get(c)!) };
}

function describe(term: string, kind: TermTestKind, partners: Partner[]): string {
  if (kind === 'reference') return `${term}: its own coefficients (treatment coding: the effect at the reference level of any factor it interacts with)`;
  if (!partners.length) return `${term}: no interaction includes it, so its coefficients are its marginal effect`;
  return `${term}: marginal effect, ${partners.map((q) => q.text).join(' and ')} (equal weights)`;
}

function contrastText(names: readonly string[], row: number[]): string {
  const terms: string[] = [];
  row.forEach((w, j) => {
    if (w === 0) return;
    const mag = Math.abs(w);
    const inv = 1 / mag;
    const coef = mag === 1 ? '' : Math.abs(inv - Math.round(inv)) < 1e-9 ? `1/${Math.round(inv)} ` : `${mag.toPrecision(4)} `;
    terms.push(`${terms.length === 0 ? (w < 0 ? '-' : '') : w < 0 ? ' - ' : ' + '}${coef}${names[j]}`);
  });
  return terms.join('');
}

/**
 * Test H₀: Lβ = 0, L given as rows over the design's columns (full length, aliased columns 0).
 * Throws a clear error for malformed L or a method the fit does not allow.
 */
export function contrastTest(design: DesignMatrices, fit: FitResult, rows: number[][], method: TestMethod = 'satterthwaite'): ContrastTestResult {
  if (!rows.length) throw new QuadratInputError('contrast: give at least one row of L', { field: 'contrast' });
  rows.forEach((r, i) => {
    if (r.length !== design.p) throw new QuadratInputError(`contrast row ${i}: expected ${design.p} weights (one per coefficient: ${design.fixedNames.join(', ')}), got ${r.length}`, { field: `contrast[${i}]` });
    r.forEach((v, j) => {
      if (!Number.isFinite(v)) throw new QuadratInputError(`contrast row ${i}, column ${design.fixedNames[j]}: expected a finite number, got ${v}`, { field: `contrast[${i}]` });
      if (v !== 0 && fit.fixed[j]?.aliased) throw new QuadratInputError(`contrast row ${i}: coefficient ${design.fixedNames[j]} is aliased (not estimable); give it weight 0`, { field: `contrast[${i}]` });
    });
  });
  // the tests' df are those of the interval methods of the same name: the same rule applies
  checkInterval(method, { family: 'gaussian', estimation: fit.estimation, random: design.random.length > 0 }, 'method');
  const ctx = contextFromFit(design, fit);
  const l = new Float64Array(rows.length * ctx.design.p);
  rows.forEach((r, i) => ctx.columns.forEach((col, a) => { l[i * ctx.design.p + a] = r[col]; }));
  const coefficients = design.fixedNames.filter((_, j) => rows.some((r) => r[j] !== 0));
  return method === 'kenward-roger' ? krTest(ctx, l, rows.length, coefficients) : satterthwaiteTest(ctx, l, rows.length, coefficients);
}

function estimates(ctx: InferenceContext, l: Float64Array, ell: number): number[] {
  const p = ctx.design.p;
  return Array.from({ length: ell }, (_, r) => { let s = 0; for (let a = 0; a < p; a++) s += l[r * p + a] * ctx.beta[a]; return s; });
}

function krTest(ctx: InferenceContext, l: Float64Array, ell: number, coefficients: string[]): ContrastTestResult {
  const size = kenwardRogerSizeProblem(ctx.dev);
  if (size) throw new QuadratInputError(size, { field: 'model.interval' });
  const core = kenwardRogerCore(ctx.design, ctx.dev, ctx.theta, ctx.sigma2);
  const t = kenwardRogerTest(core, ctx.beta, l, ell);
  return {
    method: 'kenward-roger', coefficients, estimate: estimates(ctx, l, ell), statistic: t.statistic, numDf: ell, denDf: t.denDf,
    pValue: fSurvival(t.statistic, ell, t.denDf), scale: t.scale, warnings: [...core.warnings, ...t.warnings],
  };
}

/**
 * Fai-Cornelius: with LΦLᵀ = PDPᵀ, the rows of PᵀL are independent contrasts with Satterthwaite df νₘ;
 * E = Σ νₘ/(νₘ − 2) and the denominator df is 2E/(E − ℓ). When some νₘ ≤ 2, E does not exist; the
 * smallest νₘ is used instead and flagged.
 */
function satterthwaiteTest(ctx: InferenceContext, l: Float64Array, ell: number, coefficients: string[]): ContrastTestResult {
  const p = ctx.design.p;
  const core = withResidualResponse(ctx, () => satterthwaiteCore(ctx.dev, ctx.theta, ctx.sigma2));
  const warnings = [...core.warnings];
  const m = sandwich(l, core.phi, ell, p);
  const eig = symmetricEigen(m, ell);
  const top = Math.max(...eig.values);
  if (!(eig.values[ell - 1] > 1e-10 * top)) {
    throw new QuadratInputError('contrast: the rows of L are linearly dependent (or test a combination that is not estimable)', { field: 'contrast' });
  }
  let fStat = 0;
  const nus: number[] = [];
  for (let k = 0; k < ell; k++) {
    const c = new Float64Array(p);
    for (let a = 0; a < p; a++) { let s = 0; for (let r = 0; r < ell; r++) s += eig.vectors[k * ell + r] * l[r * p + a]; c[a] = s; }
    let cb = 0;
    for (let a = 0; a < p; a++) cb += c[a] * ctx.beta[a];
    fStat += (cb * cb) / eig.values[k];
    nus.push(satterthwaiteDf(core, c));
  }
  fStat /= ell;
  let denDf: number;
  if (nus.some(Number.isNaN)) denDf = NaN;
  else if (nus.every((v) => v > 2)) {
    const e = nus.reduce((s, v) => s + (Number.isFinite(v) ? v / (v - 2) : 1), 0);
    denDf = e > ell ? (2 * e) / (e - ell) : Infinity;
  } else {
    denDf = Math.min(...nus);
    warnings.push(`Satterthwaite F: a contrast has ν ≤ 2 (${denDf.toPrecision(3)}), where the Fai-Cornelius mean does not exist; the smallest ν is used`);
  }
  return {
    method: 'satterthwaite', coefficients, estimate: estimates(ctx, l, ell), statistic: fStat, numDf: ell, denDf,
    pValue: fSurvival(fStat, ell, denDf), scale: 1, warnings,
  };
}
